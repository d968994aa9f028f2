// The detail of one drift column: both distributions on the shared alphabet (the
// reference's share and this frame's share of each bin or level, side by side) and
// each bin's contribution to PSI in nats (the contributions sum to the column's PSI).
// Shares are the record's smoothed shares (pseudocount per cell, as PSI uses them).
// Bins the record hid (small counts and their complements, `min_count`) keep their
// place, hatched, with no number: nothing is derived from what was hidden.
import { h, iso, nameEl } from "../dom.js";
import { amount, axisPct, count, niceMax, pWords, shareText as pctFine } from "../format.js";
import { beyondChance, binDetail } from "../driftdata.js";

const HIDDEN_WORDS = {
  small: (n) => `hidden: a count below ${n}`,
  complement: () => "hidden: would give a small count back",
};

export function driftDetail(ctx, rec, col, { onClose }) {
  const { bins, shareMax, contribMax, contributionShown, hidden } = binDetail(col);
  const settings = rec.settings || {};
  const minCount = settings.min_count;
  const pseudo = settings.pseudocount ?? 0.5;
  const word = col.flag ? String(col.flag).replace(/_/g, " ") : "not compared";
  const box = h("div", { class: "isc-ddetail", role: "region", "aria-label": `bins of ${iso(col.column)}`, "data-column": String(col.column) });
  const close = h("button", { type: "button", class: "isc-btn isc-dclose", "data-keep": "drift-close", "aria-label": "close the bins (Escape)", onclick: onClose }, "Close");
  box.append(h("div", { class: "isc-dhead" },
    h("span", { class: "isc-ptitle" }, "Bins of ", nameEl(col.column)),
    h("span", { class: "isc-punit" }, `PSI ${amount(col.psi)} nats (chance ${amount(col.psi_chance)}, up to ${amount(col.psi_chance_high)}; beyond chance ${amount(beyondChance(col))}) \u00b7 ${pWords("q", col.q_value)} \u00b7 ${word}`),
    close));
  if (!bins.length) {
    box.append(h("div", { class: "isc-empty" }, (rec.flags || {})[col.flag] || "This column was not compared: it has no bins."));
    return box;
  }
  const sx = (v) => axisPct(v, niceMax(shareMax));
  const cx = (v) => axisPct(v, niceMax(contribMax));
  box.append(h("div", { class: "isc-dbin isc-daxis", "aria-hidden": "true" },
    h("span", { class: "isc-axislab" }, col.kind === "numeric" ? "bin" : "level"),
    h("span", { class: "isc-axislab" }, "share of rows: reference / this frame"),
    h("span", { class: "isc-axislab isc-dnum" }, "shares"),
    h("span", { class: "isc-axislab" }, "contribution to PSI"),
    h("span", { class: "isc-axislab isc-dnum" }, "nats")));
  for (const b of bins) {
    const why = b.hidden ? (HIDDEN_WORDS[b.hidden] || (() => "hidden"))(minCount) : null;
    const shares = h("span", { class: "isc-dshares" });
    for (const [side, cls] of [["reference_share", "isc-dref"], ["current_share", "isc-dcur"]]) {
      const track = h("span", { class: "isc-dtrack" });
      if (Number.isFinite(b[side])) track.append(h("span", { class: `isc-dfill ${cls}`, style: { width: sx(b[side]) } }));
      else if (b.hidden) track.classList.add("isc-hid");
      shares.append(track);
    }
    const contrib = h("span", { class: "isc-dtrack isc-dctrack" });
    if (Number.isFinite(b.contribution)) contrib.append(h("span", { class: "isc-dfill isc-dcon", style: { width: cx(b.contribution) } }));
    else if (b.hidden) contrib.classList.add("isc-hid");
    const sharesWords = b.hidden && !(Number.isFinite(b.reference_share) && Number.isFinite(b.current_share))
      ? why : `${pctFine(b.reference_share)} \u2192 ${pctFine(b.current_share)}`;
    const row = h("div", {
      class: "isc-dbin", "data-label": String(b.label), "data-hidden": b.hidden || "",
      onmouseleave: () => ctx.tip.hide(),
      onmousemove: (ev) => ctx.tip.show([[nameEl(col.column), " \u00b7 ", nameEl(b.label)],
        `reference: ${b.reference == null ? "hidden" : `${count(b.reference)} rows`}, share ${pctFine(b.reference_share)}`,
        `this frame: ${b.current == null ? "hidden" : `${count(b.current)} rows`}, share ${pctFine(b.current_share)}`,
        `contribution to PSI ${b.contribution == null ? "hidden" : `${amount(b.contribution)} nats`} of ${amount(col.psi)}`,
        why ? `\u25b8 ${why}` : null].filter(Boolean), ev.clientX, ev.clientY),
    }, h("span", { class: "isc-name" }, nameEl(b.label)), shares, h("span", { class: "isc-dnum" }, sharesWords),
      contrib, h("span", { class: "isc-dnum" }, b.contribution == null ? "\u2014" : amount(b.contribution)));
    box.append(row);
  }
  const lines = [
    h("span", null, h("span", { class: "isc-swatch isc-dref" }), "reference"),
    h("span", null, h("span", { class: "isc-swatch isc-dcur" }), "this frame"),
    h("span", null, h("span", { class: "isc-swatch isc-dcon" }), "contribution (a\u2212e)\u00b7ln(a/e), nats; they sum to PSI"),
    h("span", null, `shares smoothed with ${amount(pseudo)} per bin, as PSI reads them`),
  ];
  if (hidden) {
    lines.push(h("span", null, h("span", { class: "isc-swatch isc-hid" }),
      `${hidden} bin${hidden === 1 ? "" : "s"} hidden (counts below ${minCount} and the ones that would give them back); the shown contributions sum to ${amount(contributionShown)} of ${amount(col.psi)}`));
  }
  box.append(h("div", { class: "isc-legend" }, ...lines));
  return box;
}
