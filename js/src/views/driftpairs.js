// Relationship drift: the pairs whose dependence moved most from the reference (the
// record's `pairs`, most changed first), at most ten: MI in both frames, the change
// with its interval against the band random splits of the pooled rows give, and the
// flag (stronger / weaker at q < 0.05, else unchanged). A note says when none moved
// beyond chance.
import { h, iso, nameEl, tipOnFocus } from "../dom.js";
import { amount, count, num, pWords, signed } from "../format.js";
import { PAIR_MOVED, topPairDrift } from "../driftdata.js";

const SHOWN = 10;

export function pairDriftList(ctx, rec) {
  const box = h("div", { class: "isc-dpairs", role: "region", "aria-label": "relationship drift" });
  const unit = (rec.units && rec.units.kl) || ctx.unit();
  box.append(h("div", { class: "isc-dhead" }, h("span", { class: "isc-ptitle" }, "Relationships that moved"),
    h("span", { class: "isc-punit" }, `change of mutual information, ${unit}: this frame minus the reference`)));
  if (!Array.isArray(rec.pairs)) {
    box.append(h("div", { class: "isc-empty" }, "Relationship drift was not computed for this record."));
    return box;
  }
  const { rows, total, moved } = topPairDrift(rec.pairs, SHOWN);
  if (!total) {
    box.append(h("div", { class: "isc-empty" }, "Fewer than two comparable columns: no pairs to compare."));
    return box;
  }
  const level = rec.level ?? 0.05;
  if (!moved) {
    box.append(h("div", { class: "isc-note isc-dnone", "data-none-moved": "true" },
      `No pair's dependence moved beyond chance: q \u2265 ${num(level)} for all ${count(total)} pairs. The ${rows.length} with the smallest p-values:`));
  }
  let top = 0;
  for (const p of rows) for (const v of [p.change, p.ci_low, p.ci_high, p.chance_low, p.chance_high]) if (Number.isFinite(v)) top = Math.max(top, Math.abs(v));
  const half = top > 0 ? top * 1.05 : 1;
  const pos = (v) => `${Math.max(0, Math.min(100, 50 + (v / half) * 50))}%`;
  const span = (lo, hi, cls) => h("span", { class: cls, style: { left: pos(Math.min(lo, hi)), width: `calc(${pos(Math.max(lo, hi))} - ${pos(Math.min(lo, hi))})` } });
  box.append(h("div", { class: "isc-dprow isc-daxis", "aria-hidden": "true" },
    h("span", { class: "isc-axislab" }, "pair"), h("span", { class: "isc-axislab isc-dnum" }, "MI: reference \u2192 now"),
    h("span", { class: "isc-axislab isc-dcentre" }, `\u2212${num(half)}  \u00b7  0  \u00b7  +${num(half)}`),
    h("span", { class: "isc-axislab isc-dnum" }, "change"), h("span", { class: "isc-axislab" }, "flag")));
  for (const p of rows) {
    const hit = PAIR_MOVED.has(p.flag);
    const track = h("span", { class: "isc-track isc-dctr" }, h("span", { class: "isc-dzero" }));
    if (Number.isFinite(p.chance_low) && Number.isFinite(p.chance_high)) track.append(span(p.chance_low, p.chance_high, "isc-chance"));
    if (Number.isFinite(p.change)) {
      const fill = span(0, p.change, "isc-fill");
      fill.style.background = hit ? "var(--isc-warm)" : "var(--isc-bar-muted)";
      track.append(fill);
    }
    if (Number.isFinite(p.ci_low) && Number.isFinite(p.ci_high)) track.append(span(p.ci_low, p.ci_high, "isc-whisk"));
    const interval = Number.isFinite(p.ci_low) && Number.isFinite(p.ci_high) ? ` (interval ${amount(p.ci_low)} to ${amount(p.ci_high)})` : "";
    const row = h("div", {
      class: "isc-dprow", tabindex: 0, "data-keep": `drift-pair:${p.a}\u0000${p.b}`, "data-flag": p.flag || "",
      "aria-label": `${iso(p.a)} and ${iso(p.b)}: MI ${amount(p.mi_reference)} to ${amount(p.mi)} ${unit}, change ${signed(p.change, 3)}${interval}, ${p.flag || "not tested"}`,
      onfocus: () => tipOnFocus(row), onblur: () => ctx.tip.hide(), onmouseleave: () => ctx.tip.hide(),
      onmousemove: (ev) => ctx.tip.show([[nameEl(p.a), " \u00d7 ", nameEl(p.b)],
        `MI in the reference ${amount(p.mi_reference)} ${unit} (${count(p.n_reference)} rows), in this frame ${amount(p.mi)} ${unit} (${count(p.n)} rows)`,
        `change ${signed(p.change, 3)} ${unit}${interval}`,
        `random splits of the pooled rows give ${signed(p.change_chance, 3)} on average, 95% within ${amount(p.chance_low)} to ${amount(p.chance_high)}`,
        `${pWords("p", p.p_value)}, ${pWords("q", p.q_value)}`,
        hit ? `\u25b8 the dependence is ${p.flag} than in the reference, beyond chance` : "\u25b8 within what sampling gives"].filter(Boolean), ev.clientX, ev.clientY),
    }, h("span", { class: "isc-name isc-dpair" }, nameEl(p.a), " \u00d7 ", nameEl(p.b)),
    h("span", { class: "isc-dnum" }, `${amount(p.mi_reference)} \u2192 ${amount(p.mi)}`), track,
    h("span", { class: "isc-dnum" }, signed(p.change, 3)), h("span", { class: "isc-notes" }, p.flag || "\u2014"));
    box.append(row);
  }
  if (total > rows.length) box.append(h("div", { class: "isc-note" }, `${count(total - rows.length)} more pairs changed less (in the record).`));
  return box;
}
