// The entropy bars: one row per column, the estimate against its maximum log K,
// with its interval and flags; a row is a button that selects the column.
import { h, clear, tipOnFocus } from "../dom.js";
import { table } from "../decode.js";
import { count, niceMax, num, pct, ticks, val, axisPct } from "../format.js";
import { ESTIMATOR_LABELS, FLAG_HELP, FLAG_LABELS, SORT_LABELS } from "../vocabulary.js";
import { select } from "../controls.js";

export function entropyView(ctx) {
  const el = h("section", { class: "isc-panel isc-entropy", "aria-label": "entropy bars" });
  const sortSel = select(ctx, "sort_by", "Sort", ["entropy", "name", "efficiency", "missing_share"], SORT_LABELS);
  sortSel.input.onchange = null;
  sortSel.input.addEventListener("change", () => { ctx.model.set("sort_by", sortSel.input.value); ctx.model.save_changes(); draw(); });
  const unitEl = h("span", { class: "isc-punit" });
  const head = h("div", { class: "isc-phead" }, h("span", { class: "isc-ptitle" }, "Entropy bars"), unitEl, sortSel.el);
  const body = h("div", { class: "isc-bars" });
  const legend = h("div", { class: "isc-legend" },
    h("span", null, h("span", { class: "isc-swatch", style: { background: "var(--isc-bar)" } }), "estimate"),
    h("span", null, h("span", { class: "isc-swatch isc-swatch-max" }), "maximum, log K"),
    h("span", null, "\u251c\u2500\u2524 95% interval"));
  el.append(head, body, legend);

  function draw() {
    sortSel.sync();
    const data = ctx.entropy();
    const unit = (data && data.unit) || ctx.unit();
    unitEl.textContent = data ? `${unit} per column \u00b7 ${ESTIMATOR_LABELS[data.estimator] || data.estimator || ""}` : "";
    clear(body);
    const rows = table(data);
    if (!rows.length) { body.append(h("div", { class: "isc-empty" }, data ? "No columns." : "Computing\u2026")); return; }
    const key = ctx.get("sort_by") || "entropy";
    const sortKey = (r) => (r[key] == null ? -Infinity : r[key]);
    rows.sort(key === "name" ? (a, b) => String(a.column).localeCompare(String(b.column))
      : (a, b) => sortKey(b) - sortKey(a) || String(a.column).localeCompare(String(b.column)));
    let top = 0;
    for (const r of rows) for (const f of ["max_entropy", "ci_high", "entropy"]) if (Number.isFinite(r[f])) top = Math.max(top, r[f]);
    const max = niceMax(top);
    const x = (v) => axisPct(v, max);
    const tickBox = h("div", { class: "isc-ticks" });
    for (const t of ticks(max)) tickBox.append(h("span", { class: "isc-tick", style: { left: x(t) } }, num(t)));
    body.append(h("div", { class: "isc-axis", "aria-hidden": "true" },
      h("span", { class: "isc-name", style: { color: "var(--isc-ink3)", fontSize: "11px" } }, "column"),
      tickBox, h("span", { class: "isc-val", style: { color: "var(--isc-ink3)", fontSize: "11px" } }, unit),
      h("span", { style: { color: "var(--isc-ink3)", fontSize: "11px" } }, "flags")));
    const selected = ctx.get("selected_column");
    const gridTicks = ticks(max);
    for (const r of rows) {
      const track = h("span", { class: "isc-track" });
      for (const t of gridTicks.slice(1)) track.append(h("span", { class: "isc-gridline", style: { left: x(t) } }));
      if (Number.isFinite(r.max_entropy)) track.append(h("span", { class: "isc-max", style: { width: x(r.max_entropy) } }));
      if (Number.isFinite(r.entropy)) track.append(h("span", { class: "isc-fill", style: { width: x(r.entropy) } }));
      if (Number.isFinite(r.ci_low) && Number.isFinite(r.ci_high)) {
        track.append(h("span", { class: "isc-whisk", style: { left: x(r.ci_low), width: `calc(${x(r.ci_high)} - ${x(r.ci_low)})` } }));
      }
      const flags = String(r.flags || "").split(",").map((s) => s.trim()).filter(Boolean);
      const flagBox = h("span", { class: "isc-flags" }, flags.map((f) => h("span", { class: "isc-flag", title: FLAG_HELP[f] || f }, FLAG_LABELS[f] || f)));
      const label = `${r.column}: entropy ${num(r.entropy)} ${unit}, 95% interval ${num(r.ci_low)} to ${num(r.ci_high)}, maximum ${num(r.max_entropy)}`;
      const btn = h("button", {
        class: "isc-erow", type: "button", "aria-pressed": String(selected === r.column), "aria-label": label,
        "data-column": r.column,
        onclick: () => ctx.set("selected_column", ctx.get("selected_column") === r.column ? null : r.column),
        onfocus: () => tipOnFocus(btn),
        onblur: () => ctx.tip.hide(),
        onmousemove: (ev) => ctx.tip.show([
          String(r.column),
          `${r.kind}, K = ${count(r.k)} symbols`,
          `H = ${num(r.entropy)} ${unit}  (95%: ${num(r.ci_low)} \u2013 ${num(r.ci_high)})`,
          `maximum log K = ${num(r.max_entropy)} ${unit}`,
          `efficiency ${pct(r.efficiency)} \u00b7 effective categories ${num(r.effective_categories)}`,
          `n = ${count(r.n)} \u00b7 missing ${count(r.missing)} (${pct(r.missing_share)})`,
          ...flags.map((f) => `\u25b8 ${FLAG_HELP[f] || f}`),
        ], ev.clientX, ev.clientY),
        onmouseleave: () => ctx.tip.hide(),
        onkeydown: (ev) => {
          if (ev.key !== "ArrowDown" && ev.key !== "ArrowUp") return;
          ev.preventDefault();
          const sib = ev.key === "ArrowDown" ? btn.nextElementSibling : btn.previousElementSibling;
          if (sib && sib.classList.contains("isc-erow")) sib.focus();
        },
      }, h("span", { class: "isc-name" }, String(r.column)), track, h("span", { class: "isc-val" }, val(r.entropy)), flagBox);
      body.append(btn);
    }
  }
  draw();
  return { el, draw };
}
