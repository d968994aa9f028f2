// The relevance view: how much each column tells about the chosen target.
import { h, clear, tipOnFocus } from "../dom.js";
import { parseJSON, table } from "../decode.js";
import { count, niceMax, num, pct, pval, ticks, val, axisPct } from "../format.js";
import { FLAG_HELP } from "../vocabulary.js";

export function relevanceView(ctx) {
  const el = h("section", { class: "isc-panel isc-relevance", "aria-label": "relevance" });
  const sub = h("span", { class: "isc-punit" });
  const body = h("div", { class: "isc-bars" });
  const legend = h("div", { class: "isc-legend" });
  el.append(h("div", { class: "isc-phead" }, h("span", { class: "isc-ptitle" }, "Relevance"), sub), body, legend);
  function draw() {
    clear(body);
    const data = parseJSON(ctx.get("_relevance"));
    if (!data || data.target == null) {
      sub.textContent = "";
      clear(legend);
      body.append(h("div", { class: "isc-empty" }, ctx.get("target") != null ? "Computing\u2026"
        : "Pick a relevance target in the controls to see how much each column tells about it."));
      return;
    }
    const unit = data.unit || ctx.unit();
    sub.textContent = `mutual information with \u201c${data.target}\u201d, ${unit}`;
    clear(legend);
    legend.append(h("span", null, h("span", { class: "isc-swatch", style: { background: "var(--isc-bar-muted)" } }),
      `n.s.: not significant after Benjamini\u2013Hochberg (q \u2265 ${num(ctx.get("alpha_fdr") ?? 0.05)})`),
    h("span", null, h("span", { class: "isc-flag isc-leak" }, "possible leak"), " carries \u2265 95% of the target's entropy"),
    h("span", null, "\u251c\u2500\u2524 95% interval"));
    const rows = table(data).sort((a, b) => (b.mi ?? -1) - (a.mi ?? -1));
    let top = 0;
    for (const r of rows) for (const f of ["mi", "ci_high"]) if (Number.isFinite(r[f])) top = Math.max(top, r[f]);
    const max = niceMax(top);
    const x = (v) => axisPct(v, max);
    const tickBox = h("div", { class: "isc-ticks" });
    for (const t of ticks(max)) tickBox.append(h("span", { class: "isc-tick", style: { left: x(t) } }, num(t)));
    body.append(h("div", { class: "isc-axis", "aria-hidden": "true" },
      h("span", { class: "isc-name", style: { color: "var(--isc-ink3)", fontSize: "11px" } }, "column"), tickBox,
      h("span", { class: "isc-val", style: { color: "var(--isc-ink3)", fontSize: "11px" } }, unit), h("span")));
    const alpha = ctx.get("alpha_fdr") || 0.05;
    for (const r of rows) {
      const sig = r.q_value != null && r.q_value < alpha;
      const track = h("span", { class: "isc-track" });
      if (Number.isFinite(r.mi)) track.append(h("span", { class: "isc-fill", style: { width: x(r.mi), background: sig ? "var(--isc-bar)" : "var(--isc-bar-muted)" } }));
      if (Number.isFinite(r.ci_low) && Number.isFinite(r.ci_high)) {
        track.append(h("span", { class: "isc-whisk", style: { left: x(r.ci_low), width: `calc(${x(r.ci_high)} - ${x(r.ci_low)})` } }));
      }
      const marks = h("span", { class: "isc-flags" },
        r.leakage ? h("span", { class: "isc-flag isc-leak", title: "carries at least 95% of the target's entropy: check it is not derived from the target" }, "possible leak") : null,
        r.sparse ? h("span", { class: "isc-flag", title: FLAG_HELP.sparse_cells }, "sparse cells") : null,
        !sig ? h("span", { class: "isc-flag", title: "not significant after Benjamini\u2013Hochberg" }, "n.s.") : null);
      const rowEl = h("div", {
        class: "isc-erow", style: { cursor: "default" }, tabindex: 0,
        onfocus: () => tipOnFocus(rowEl),
        onblur: () => ctx.tip.hide(),
        "aria-label": `${r.column}: ${num(r.mi)} ${unit} about ${data.target}${r.leakage ? ", possible leak" : ""}`,
        onmousemove: (ev) => ctx.tip.show([String(r.column),
          `I(${r.column}; ${data.target}) = ${num(r.mi)} ${unit}  (95%: ${num(r.ci_low)} \u2013 ${num(r.ci_high)})`,
          `share of the target's entropy ${pct(r.share_of_target)} \u00b7 NMI ${num(r.nmi)}`,
          `p = ${pval(r.p_value)}, q = ${pval(r.q_value)} \u00b7 n = ${count(r.n)}`,
          r.leakage ? "\u25b8 possible leak: nearly determines the target" : null].filter(Boolean), ev.clientX, ev.clientY),
        onmouseleave: () => ctx.tip.hide(),
      }, h("span", { class: "isc-name" }, String(r.column)), track, h("span", { class: "isc-val" }, val(r.mi)), marks);
      body.append(rowEl);
    }
  }
  draw();
  return { el, draw };
}
