// The controls: one labelled <select> or range input per setting, each writing its
// trait; sync() brings them in step with the model without moving a control the
// user is holding.
import { h, uid, clear, nameEl } from "./dom.js";
import { table } from "./decode.js";
import { ESTIMATOR_LABELS, MEASURE_LABELS, MISSING_LABELS, STRATEGY_LABELS } from "./vocabulary.js";

export function select(ctx, name, label, choices, labels, opts = {}) {
  const id = uid(name);
  const sel = h("select", { id, "aria-label": opts.aria || label, "data-keep": `ctl:${name}`, onkeydown: () => ctx.hold.touch(), onchange: () => {
    ctx.hold.touch();
    const v = sel.value;
    ctx.set(name, opts.parse ? opts.parse(v) : v);
  } });
  const fill = (values) => {
    clear(sel);
    for (const [v, text] of values) sel.append(h("option", { value: v }, text));
  };
  fill(choices.map((c) => [c, (labels && labels[c]) || c]));
  const wrap = h("div", { class: "isc-ctl" }, h("label", { for: id }, label), sel);
  return {
    el: wrap, input: sel, fill,
    sync() { const v = ctx.get(name); sel.value = opts.format ? opts.format(v) : (v == null ? "" : String(v)); },
  };
}

export function range(ctx, name, label, { min, max, step, format = (v) => String(v), parse = Number, read, write }) {
  const id = uid(name);
  const out = h("output", { for: id });
  const input = h("input", { id, type: "range", min, max, step, "aria-label": label, "data-keep": `ctl:${name}` });
  // moving the slider (dragged or keys held) counts as one gesture for the views
  input.addEventListener("pointerdown", () => {
    ctx.hold.press();
    const up = () => { ctx.hold.release(); window.removeEventListener("pointerup", up); window.removeEventListener("pointercancel", up); };
    window.addEventListener("pointerup", up);
    window.addEventListener("pointercancel", up);
  });
  input.addEventListener("keydown", () => ctx.hold.touch());
  input.addEventListener("input", () => {
    ctx.hold.touch();
    const v = parse(input.value);
    out.textContent = format(v);
    if (write) write(v); else ctx.set(name, v);
  });
  const wrap = h("div", { class: "isc-ctl" }, h("label", { for: id }, label),
    h("div", { class: "isc-range" }, input, out));
  return {
    el: wrap, input, out,
    sync() {
      const v = read ? read() : ctx.get(name);
      if (document.activeElement !== input && v != null) input.value = String(v);
      out.textContent = v == null ? "" : format(v);
    },
  };
}

export function controlsView(ctx) {
  const meta = ctx.get("_meta") || {};
  const ch = meta.choices || {};
  const rules = new Set(meta.bin_rules || []);
  const el = h("div", { class: "isc-controls", role: "group", "aria-label": "profile controls" });
  const bins = range(ctx, "bins", "Bins per numeric column", { min: 2, max: 64, step: 1, format: (v) => `${v}` });
  const strategy = select(ctx, "strategy", "Binning", ch.strategy || ["quantile", "uniform"], STRATEGY_LABELS);
  const estimator = select(ctx, "estimator", "Estimator", ch.estimator || ["miller_madow"], ESTIMATOR_LABELS);
  const alpha = range(ctx, "alpha", "Pseudocount per cell", { min: 0.05, max: 2, step: 0.05, format: (v) => Number(v).toFixed(2) });
  const measure = select(ctx, "measure", "Grid measure", ch.measure || ["mi"], MEASURE_LABELS);
  const unit = select(ctx, "unit", "Unit", ch.unit || ["bits", "nats"], null);
  const target = select(ctx, "target", "Relevance target", [], null, {
    parse: (v) => (v === "" ? null : v), format: (v) => (v == null ? "" : v),
  });
  target.fill([["", "(none)"], ...(meta.names || []).map((n) => [n, n])]);
  const missing = select(ctx, "missing", "Missing values", ch.missing || ["drop"], MISSING_LABELS);
  const mcId = uid("min_count");
  const minCount = h("input", { id: mcId, type: "number", min: 0, max: 1000, step: 1, "aria-label": "hide pair-view cells with fewer rows than" });
  minCount.addEventListener("change", () => {
    const v = Math.max(0, Math.round(Number(minCount.value) || 0));
    minCount.value = String(v);
    ctx.set("min_count", v);
  });
  const minWrap = h("div", { class: "isc-ctl" }, h("label", { for: mcId }, "Hide cells below (rows)"), minCount);
  // per-column bins for the selected column
  const colBins = range(ctx, "column_bins", "Bins for the selected column", {
    min: 2, max: 64, step: 1,
    read: () => { const c = ctx.get("selected_column"); const o = ctx.get("column_bins") || {}; return c != null && o[c] != null ? o[c] : ctx.get("bins"); },
    write: (v) => { // the override is one entry of a dict, not a number
      const c = ctx.get("selected_column");
      if (c != null) ctx.set("column_bins", { ...(ctx.get("column_bins") || {}), [c]: v });
    },
  });
  const colReset = h("button", { class: "isc-btn", type: "button", onclick: () => {
    const c = ctx.get("selected_column");
    if (c == null) return;
    const next = { ...(ctx.get("column_bins") || {}) };
    delete next[c];
    ctx.set("column_bins", next);
  } }, "use default");
  const colLabel = colBins.el.querySelector("label");
  colBins.el.querySelector(".isc-range").append(colReset);

  el.append(strategy.el, bins.el, estimator.el, alpha.el, measure.el, unit.el, target.el, missing.el, minWrap, colBins.el);
  const all = [bins, strategy, estimator, alpha, measure, unit, target, missing, colBins];

  function sync() {
    for (const c of all) c.sync();
    minCount.value = String(ctx.get("min_count") || 0);
    const rule = rules.has(ctx.get("strategy"));
    bins.input.disabled = rule || ctx.offline;
    bins.el.classList.toggle("isc-off", rule);
    if (rule) bins.out.textContent = "by rule";
    const dirichlet = ctx.get("estimator") === "dirichlet";
    alpha.input.disabled = !dirichlet || ctx.offline;
    alpha.el.classList.toggle("isc-off", !dirichlet);
    const col = ctx.get("selected_column");
    const rows = table(ctx.entropy());
    const row = rows.find((r) => r.column === col);
    const numeric = row && row.kind === "numeric";
    colBins.input.disabled = !numeric || rule || ctx.offline;
    colReset.disabled = !numeric || ctx.offline || !((ctx.get("column_bins") || {})[col] != null);
    colBins.el.classList.toggle("isc-off", !numeric);
    clear(colLabel);
    if (col == null) colLabel.append("Bins for a column (pick one)");
    else colLabel.append("Bins for \u201c", nameEl(col, { max: "14em" }), "\u201d");
    if (!numeric) colBins.out.textContent = col == null ? "" : "not binned";
    for (const c of [strategy, estimator, measure, unit, target, missing]) {
      c.input.disabled = ctx.offline;
      c.el.classList.toggle("isc-off", ctx.offline); // look off, like the pseudocount slider
      if (ctx.offline) c.el.title = "saved copy: needs the live notebook"; else c.el.removeAttribute("title");
    }
    if (ctx.offline) { bins.el.classList.add("isc-off"); colBins.el.classList.add("isc-off"); }
    minCount.disabled = ctx.offline;
    minWrap.classList.toggle("isc-off", ctx.offline);
  }
  sync();
  return { el, sync, parts: { bins, strategy, estimator, alpha, measure, unit, target, missing, minCount, colBins } };
}
