// The entropy bars: one row per column. The bar's own geometry carries what the
// numbers need beside them: the estimate and its interval against the box of
// log K (the most K levels can hold), a tick at log N (the most N rows can show),
// an underline for the share of rows missing, and a hatched fill where log K is
// reached by construction (quantile bins). Short notes follow each bar; a sentence
// for each is on hover. A row is a button that selects the column.
import { h, clear, iso, nameEl, tipOnFocus } from "../dom.js";
import { table } from "../decode.js";
import { amount, axisPct, count, levelText, niceMax, num, pct, ticks, val } from "../format.js";
import { ESTIMATOR_LABELS, SORT_LABELS } from "../vocabulary.js";
import { entropyMarks } from "../marks.js";
import { select } from "../controls.js";
import { keepFocus } from "../memory.js";

function legendItems(level) {
  const sw = (cls, style) => h("span", { class: `isc-swatch ${cls || ""}`, style });
  return [
    h("span", null, sw("", { background: "var(--isc-bar)" }), "estimate"),
    h("span", null, sw("isc-swatch-max"), "box: log K, the most K levels can hold"),
    h("span", null, `\u251c\u2500\u2524 ${level} interval`),
    h("span", null, h("span", { class: "isc-key-logn", "aria-hidden": "true" }), "log N, the most N rows can show"),
    h("span", null, h("span", { class: "isc-key-missing", "aria-hidden": "true" }), "underline: share of rows missing"),
    h("span", null, sw("isc-swatch-bycon"), "equal-count bins: at log K by construction"),
  ];
}

export function entropyView(ctx) {
  const el = h("section", { class: "isc-panel isc-entropy", "aria-label": "entropy bars" });
  const sortSel = select(ctx, "sort_by", "Sort", ["entropy", "name", "efficiency", "missing_share"], SORT_LABELS);
  sortSel.input.onchange = null;
  sortSel.input.addEventListener("change", () => { ctx.model.set("sort_by", sortSel.input.value); ctx.model.save_changes(); draw(); });
  const unitEl = h("span", { class: "isc-punit" });
  const head = h("div", { class: "isc-phead" }, h("span", { class: "isc-ptitle" }, "Entropy bars"), unitEl, sortSel.el);
  const body = h("div", { class: "isc-bars" });
  const legend = h("div", { class: "isc-legend" });
  el.append(head, body, legend);

  function draw() { keepFocus(body, drawRows); }

  function drawRows() {
    sortSel.sync();
    const data = ctx.entropy();
    const unit = (data && data.unit) || ctx.unit();
    const level = levelText(data && data.ci);
    clear(legend);
    legend.append(...legendItems(level));
    unitEl.textContent = data ? `${unit} per column \u00b7 ${ESTIMATOR_LABELS[data.estimator] || data.estimator || ""}` : "";
    clear(body);
    const rows = table(data);
    if (!rows.length) { body.append(h("div", { class: "isc-empty" }, data ? "No columns." : "Computing\u2026")); return; }
    const key = ctx.get("sort_by") || "entropy";
    const sortKey = (r) => (r[key] == null ? -Infinity : r[key]);
    rows.sort(key === "name" ? (a, b) => String(a.column).localeCompare(String(b.column))
      : (a, b) => sortKey(b) - sortKey(a) || String(a.column).localeCompare(String(b.column)));
    const settings = { unit, strategy: ctx.get("strategy"), missing: ctx.get("missing") };
    const overrides = ctx.get("column_bins") || {};
    const marks = new Map(rows.map((r) => [r, entropyMarks(r, { ...settings, bins: overrides[r.column] ?? ctx.get("bins") })]));
    let top = 0;
    for (const r of rows) for (const f of ["max_entropy", "ci_high", "entropy"]) if (Number.isFinite(r[f])) top = Math.max(top, r[f]);
    const max = niceMax(top);
    const x = (v) => axisPct(v, max);
    const tickBox = h("div", { class: "isc-ticks" });
    for (const t of ticks(max)) tickBox.append(h("span", { class: "isc-tick", style: { left: x(t) } }, num(t)));
    body.append(h("div", { class: "isc-axis", "aria-hidden": "true" },
      h("span", { class: "isc-name isc-axislab" }, "column"),
      tickBox, h("span", { class: "isc-val isc-axislab" }, unit),
      h("span", { class: "isc-axislab" }, "notes")));
    const selected = ctx.get("selected_column");
    const gridTicks = ticks(max);
    for (const r of rows) {
      const m = marks.get(r);
      const track = h("span", { class: "isc-track" });
      for (const t of gridTicks.slice(1)) track.append(h("span", { class: "isc-gridline", style: { left: x(t) } }));
      if (Number.isFinite(r.max_entropy)) track.append(h("span", { class: `isc-max${m.overLogK ? " isc-over" : ""}`, style: { width: x(r.max_entropy) } }));
      if (Number.isFinite(r.entropy)) track.append(h("span", { class: `isc-fill${m.byConstruction ? " isc-bycon" : ""}`, style: { width: x(r.entropy) } }));
      if (Number.isFinite(r.ci_low) && Number.isFinite(r.ci_high)) {
        track.append(h("span", { class: "isc-whisk", style: { left: x(r.ci_low), width: `calc(${x(r.ci_high)} - ${x(r.ci_low)})` } }));
      }
      if (m.logN != null && m.logN <= max) track.append(h("span", { class: `isc-logn${m.nearLogN ? " isc-near" : ""}`, style: { left: x(m.logN) } }));
      if (m.missing > 0) track.append(h("span", { class: "isc-missing", style: { width: `${(m.missing * 100).toFixed(1)}%` } }));
      const notes = h("span", { class: "isc-notes" }, m.words.join(", "));
      const label = `${iso(r.column)}: entropy ${amount(r.entropy)} ${unit}, ${level} interval ${amount(r.ci_low)} to ${amount(r.ci_high)}, `
        + `maximum ${amount(r.max_entropy)}${m.words.length ? `; ${m.words.join(", ")}` : ""}`;
      const btn = h("button", {
        class: "isc-erow", type: "button", "aria-pressed": String(selected === r.column), "aria-label": label,
        "data-column": r.column, "data-keep": `entropy:${r.column}`,
        onclick: () => ctx.set("selected_column", ctx.get("selected_column") === r.column ? null : r.column),
        onfocus: () => tipOnFocus(btn),
        onblur: () => ctx.tip.hide(),
        onmousemove: (ev) => ctx.tip.show([
          [nameEl(r.column)],
          `${r.kind}, K = ${count(r.k)} levels`,
          `H = ${amount(r.entropy)} ${unit}  (${level}: ${amount(r.ci_low)} \u2013 ${amount(r.ci_high)})`,
          `log K = ${amount(r.max_entropy)} ${unit}${m.logN != null ? ` \u00b7 log N = ${amount(m.logN)} ${unit} (${count(m.present)} rows)` : ""}`,
          `efficiency ${pct(r.efficiency)} \u00b7 effective levels ${num(r.effective_categories)}`,
          `missing ${count(r.missing)} of ${count(r.n)} rows (${pct(r.missing_share)})`,
          ...m.sentences.map((s) => `\u25b8 ${s}`),
        ], ev.clientX, ev.clientY),
        onmouseleave: () => ctx.tip.hide(),
        onkeydown: (ev) => {
          if (ev.key !== "ArrowDown" && ev.key !== "ArrowUp") return;
          ev.preventDefault();
          const sib = ev.key === "ArrowDown" ? btn.nextElementSibling : btn.previousElementSibling;
          if (sib && sib.classList.contains("isc-erow")) sib.focus();
        },
      }, h("span", { class: "isc-name" }, nameEl(r.column)), track, h("span", { class: "isc-val" }, val(r.entropy)), notes);
      body.append(btn);
    }
  }
  draw();
  return { el, draw };
}
