// The selection view: columns chosen for the target one step at a time, with their
// relevance I(X;Y) and their gain I(X;Y | chosen before) as bars; the stop point is
// marked and the columns left out are listed with the reason.
import { h, clear, iso, nameEl, tipOnFocus } from "../dom.js";
import { parseJSON, table } from "../decode.js";
import { keepFocus } from "../memory.js";
import { amount, axisPct, niceMax, num, pWords, ticks, val } from "../format.js";
import { STATUS_WORDS, selectionMax, selectionState, splitSelection } from "../selection.js";

const METHOD_WORDS = { mrmr: "mRMR (Peng, Long & Ding 2005)", jmi: "JMI (Yang & Moody 1999)", cmim: "CMIM (Fleuret 2004)" };

// onlyWithTarget: the profile layout hides the panel while no target is set.
export function selectionView(ctx, { onlyWithTarget = false } = {}) {
  const el = h("section", { class: "isc-panel isc-selection", "aria-label": "selection" });
  const sub = h("span", { class: "isc-punit" });
  const tools = h("div", { class: "isc-seltools" });
  const body = h("div", { class: "isc-bars" });
  const legend = h("div", { class: "isc-legend" });
  el.append(h("div", { class: "isc-phead" }, h("span", { class: "isc-ptitle" }, "Selection"), sub), tools, body, legend);

  const method = h("select", { "aria-label": "selection method", onchange: () => ctx.set("selection_method", method.value) },
    ...Object.entries(METHOD_WORDS).map(([k, text]) => h("option", { value: k }, text)));
  const kBox = h("input", {
    type: "number", min: 1, step: 1, placeholder: "until not significant", "aria-label": "number of steps",
    onchange: () => { const v = parseInt(kBox.value, 10); ctx.set("selection_k", Number.isFinite(v) && v >= 1 ? v : null); },
  });
  if (!ctx.offline) tools.append(h("label", null, "method ", method), h("label", null, " steps ", kBox));

  // redraws keep the focused step (keyboard users) and the scroll position
  function draw() { keepFocus(body, drawRows); }

  function drawRows() {
    clear(body);
    clear(legend);
    clear(sub);
    method.value = ctx.get("selection_method") || "mrmr";
    const k = ctx.get("selection_k");
    if (document.activeElement !== kBox) kBox.value = k == null ? "" : String(k);
    const data = parseJSON(ctx.get("_selection"));
    const state = selectionState(data, { target: ctx.get("target"), method: method.value, k });
    el.style.display = onlyWithTarget && state === "no_target" ? "none" : "";
    if (state === "no_target" || state === "computing") {
      body.append(h("div", { class: "isc-empty" }, state === "computing" ? "Choosing columns for the target\u2026"
        : "Pick a target in the controls to choose columns for it."));
      return;
    }
    if (data.note) { // the kernel says why there is no selection for this target
      body.append(h("div", { class: "isc-empty" }, String(data.note)));
      return;
    }
    const unit = data.unit || ctx.unit();
    sub.append("columns for ", nameEl(data.target), ` by ${METHOD_WORDS[data.method] || data.method}, ${unit}`);
    // the controls moved and the kernel has not answered yet: say that these are the last numbers
    if (state === "stale") sub.append(h("span", { class: "isc-stale" }, " \u00b7 recomputing\u2026"));
    const { steps, leftOut } = splitSelection(table(data));
    const max = niceMax(selectionMax(steps));
    const x = (v) => axisPct(v, max);
    const tickBox = h("div", { class: "isc-ticks" });
    for (const t of ticks(max)) tickBox.append(h("span", { class: "isc-tick", style: { left: x(t) } }, num(t)));
    body.append(h("div", { class: "isc-axis", "aria-hidden": "true" },
      h("span", { class: "isc-name isc-axislab" }, "step \u00b7 column"), tickBox,
      h("span", { class: "isc-val isc-axislab" }, "gain"), h("span", { class: "isc-axislab" }, "notes")));
    for (const r of steps) {
      const chosen = r.status === "selected" || r.status === "past_stop";
      const track = h("span", { class: "isc-track" });
      if (Number.isFinite(r.relevance)) track.append(h("span", { class: "isc-fill isc-relfill", style: { width: x(Math.max(0, r.relevance)) } }));
      if (Number.isFinite(r.gain)) track.append(h("span", { class: "isc-fill isc-gainfill", style: { width: x(Math.max(0, r.gain)), background: r.significant ? "var(--isc-bar)" : "var(--isc-bar-muted)" } }));
      const words = [STATUS_WORDS[r.status] || r.status, r.gain_supported ? "" : "gain not estimated: too few rows per cell"].filter(Boolean);
      const rowEl = h("div", {
        class: `isc-erow isc-selrow${r.status === "stop" ? " isc-stop" : ""}`, tabindex: 0, style: { cursor: "default" },
        "data-status": r.status, "data-step": String(r.step), "data-keep": `step:${r.step}`,
        onfocus: () => tipOnFocus(rowEl), onblur: () => ctx.tip.hide(),
        "aria-label": `step ${r.step}: ${iso(r.column)}, gain ${amount(r.gain)} ${unit}, ${words.join(", ")}`,
        onmousemove: (ev) => ctx.tip.show([[`step ${r.step}: `, nameEl(r.column)],
          ["relevance I(", nameEl(r.column), "; ", nameEl(data.target), `) = ${amount(r.relevance)} ${unit}`],
          `gain given the columns chosen before: ${r.gain_supported ? `${amount(r.gain)} ${unit}` : "not estimated"}`,
          `criterion ${amount(r.criterion)} \u00b7 redundancy with the chosen ${amount(r.redundancy)} ${unit}`,
          `${pWords("p", r.p_value)}, ${pWords("q", r.q_value)} (shuffles of the target within the chosen columns' strata)`,
          r.note ? `\u25b8 ${r.note}` : null].filter(Boolean), ev.clientX, ev.clientY),
        onmouseleave: () => ctx.tip.hide(),
      }, h("span", { class: "isc-name" }, `${r.step}. `, nameEl(r.column)), track,
        h("span", { class: "isc-val" }, r.gain_supported ? val(r.gain) : "\u2014"),
        h("span", { class: `isc-relmarks${chosen ? "" : " isc-stopword"}` }, words.join(", ")));
      body.append(rowEl);
    }
    if (!steps.length) body.append(h("div", { class: "isc-empty" }, "No column was chosen."));
    for (const r of leftOut) {
      body.append(h("div", { class: "isc-erow isc-leftout", "data-status": r.status, tabindex: 0, "data-keep": `out:${r.column}`,
        "aria-label": `${iso(r.column)}: ${STATUS_WORDS[r.status] || r.status}${r.note ? `; ${r.note}` : ""}` },
        h("span", { class: "isc-name" }, nameEl(r.column)), h("span", { class: "isc-track" }),
        h("span", { class: "isc-val" }, val(r.relevance)),
        h("span", { class: "isc-relmarks" }, r.status === "leakage" ? h("span", { class: "isc-leakword" }, STATUS_WORDS[r.status]) : STATUS_WORDS[r.status] || r.status)));
    }
    legend.append(
      h("span", null, h("span", { class: "isc-swatch", style: { background: "var(--isc-bar-muted)" } }), "relevance I(X;Y)"),
      h("span", null, h("span", { class: "isc-swatch", style: { background: "var(--isc-bar)" } }), `gain I(X;Y | chosen before), significant (BH q \u2264 ${num(data.fdr)})`),
      h("span", null, "the stop row is the best next column: its gain is not significant"),
      h("span", null, "a chosen column tells about the target; it need not cause it"));
  }
  draw();
  return { el, draw };
}
