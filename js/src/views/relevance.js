// The relevance view: how much each column tells about the chosen target; bars of
// pairs that are not findings (not significant, or too few rows per cell) are muted.
import { h, clear, iso, nameEl, tipOnFocus } from "../dom.js";
import { keepFocus } from "../memory.js";
import { testWords } from "../pairdata.js";
import { parseJSON, table } from "../decode.js";
import { amount, axisPct, count, levelText, niceMax, num, pct, pWords, ticks, val } from "../format.js";
import { RELIABILITY_HELP, RELIABILITY_WORDS, reliabilityOf } from "../vocabulary.js";

const rowsAbove = (data) => Array.isArray(data.fields) && data.fields.includes("mi_above_chance");

export function relevanceView(ctx) {
  const el = h("section", { class: "isc-panel isc-relevance", "aria-label": "relevance" });
  const sub = h("span", { class: "isc-punit" });
  const body = h("div", { class: "isc-bars" });
  const legend = h("div", { class: "isc-legend" });
  el.append(h("div", { class: "isc-phead" }, h("span", { class: "isc-ptitle" }, "Relevance"), sub), body, legend);
  function draw() { keepFocus(body, drawRows); }
  function drawRows() {
    clear(body);
    const data = parseJSON(ctx.get("_relevance"));
    if (!data || data.target == null) {
      clear(sub);
      clear(legend);
      body.append(h("div", { class: "isc-empty" }, ctx.get("target") != null ? "Computing\u2026"
        : "Pick a relevance target in the controls to see how much each column tells about it."));
      return;
    }
    const unit = data.unit || ctx.unit();
    const level = levelText(data.ci);
    clear(sub);
    sub.append(rowsAbove(data) ? "mutual information above chance with " : "mutual information with ", nameEl(data.target), `, ${unit}`);
    const alpha = ctx.get("alpha_fdr") || 0.05;
    clear(legend);
    legend.append(h("span", null, h("span", { class: "isc-swatch", style: { background: "var(--isc-bar)" } }), "a finding: significant after Benjamini\u2013Hochberg and enough rows"),
      h("span", null, h("span", { class: "isc-swatch", style: { background: "var(--isc-bar-muted)" } }),
        `muted: not significant (q \u2265 ${num(alpha)}) or too few rows per cell to tell`),
      h("span", null, h("span", { class: "isc-leakword" }, "may leak the target"), ": carries \u2265 95% of the target's entropy"),
      h("span", null, `\u251c\u2500\u2524 ${level} interval`));
    // the bar and its interval: MI above its chance level where the kernel sends it
    // (the interval belongs to that number), else the estimator's MI
    const shown = (r) => (Number.isFinite(r.mi_above_chance) ? r.mi_above_chance : r.mi);
    const rows = table(data).sort((a, b) => (shown(b) ?? -1) - (shown(a) ?? -1));
    let top = 0;
    for (const r of rows) for (const v of [shown(r), r.ci_high, r.mi]) if (Number.isFinite(v)) top = Math.max(top, v);
    const max = niceMax(top);
    const x = (v) => axisPct(v, max);
    const tickBox = h("div", { class: "isc-ticks" });
    for (const t of ticks(max)) tickBox.append(h("span", { class: "isc-tick", style: { left: x(t) } }, num(t)));
    body.append(h("div", { class: "isc-axis", "aria-hidden": "true" },
      h("span", { class: "isc-name isc-axislab" }, "column"), tickBox,
      h("span", { class: "isc-val isc-axislab" }, unit), h("span", { class: "isc-axislab" }, "notes")));
    for (const r of rows) {
      const sig = r.q_value != null && r.q_value < alpha;
      const rel = reliabilityOf(r);
      const finding = sig && rel !== "too_few" && rel !== "sparse";
      const track = h("span", { class: "isc-track" });
      if (Number.isFinite(shown(r))) track.append(h("span", { class: "isc-fill", style: { width: x(shown(r)), background: finding ? "var(--isc-bar)" : "var(--isc-bar-muted)" } }));
      if (Number.isFinite(r.ci_low) && Number.isFinite(r.ci_high)) {
        track.append(h("span", { class: "isc-whisk", style: { left: x(r.ci_low), width: `calc(${x(r.ci_high)} - ${x(r.ci_low)})` } }));
      }
      const words = [RELIABILITY_WORDS[rel] || (rel !== "ok" ? rel : ""), !sig ? "not significant" : ""].filter(Boolean);
      const notes = h("span", { class: "isc-relmarks" },
        r.leakage ? h("span", { class: "isc-leakword" }, "may leak the target") : null,
        r.leakage && words.length ? ", " : null, words.join(", "));
      const rowEl = h("div", {
        class: "isc-erow", style: { cursor: "default" }, tabindex: 0, "data-keep": `relevance:${r.column}`,
        "data-finding": String(finding), "data-reliability": rel,
        onfocus: () => tipOnFocus(rowEl),
        onblur: () => ctx.tip.hide(),
        "aria-label": `${iso(r.column)}: ${amount(r.mi)} ${unit} about ${iso(data.target)}${r.leakage ? ", may leak the target" : ""}${words.length ? `, ${words.join(", ")}` : ""}`,
        onmousemove: (ev) => ctx.tip.show([[nameEl(r.column)],
          Number.isFinite(r.mi_above_chance)
            ? ["I(", nameEl(r.column), "; ", nameEl(data.target), `) = ${amount(r.mi)} ${unit}; above chance ${amount(r.mi_above_chance)} (${level}: ${amount(r.ci_low)} \u2013 ${amount(r.ci_high)})`]
            : ["I(", nameEl(r.column), "; ", nameEl(data.target), `) = ${amount(r.mi)} ${unit}  (${level}: ${amount(r.ci_low)} \u2013 ${amount(r.ci_high)})`],
          `share of the target's entropy ${pct(r.share_of_target)} \u00b7 NMI ${amount(r.nmi)}`,
          `${pWords("p", r.p_value)}, ${pWords("q", r.q_value)} \u00b7 n = ${count(r.n)}`,
          testWords(r) ? `p from a ${testWords(r)}` : null,
          RELIABILITY_HELP[rel] ? `\u25b8 ${RELIABILITY_HELP[rel]}` : null,
          !sig ? "\u25b8 Not significant after Benjamini\u2013Hochberg: as much as chance alone gives." : null,
          r.leakage ? "\u25b8 May leak the target: it nearly determines the target; check it is not derived from it." : null].filter(Boolean), ev.clientX, ev.clientY),
        onmouseleave: () => ctx.tip.hide(),
      }, h("span", { class: "isc-name" }, nameEl(r.column)), track, h("span", { class: "isc-val" }, val(shown(r))), notes);
      body.append(rowEl);
    }
  }
  draw();
  return { el, draw };
}
