// The drift view: how far each column of this frame moved from the reference, as a
// PSI bar (nats) against the band that sampling alone gives at these sizes (the 95%
// point of random splits of the pooled rows), with the record's flag as a note and
// the numbers on hover. Reads `_drift`, the infoscope-drift record (docs/drift-json.md);
// drawn only when the profile has a reference.
import { h, clear, iso, nameEl, tipOnFocus } from "../dom.js";
import { parseJSON } from "../decode.js";
import { amount, axisPct, count, niceMax, num, pct, pWords, ticks } from "../format.js";
import { keepFocus } from "../memory.js";

export const DRIFT_FINDINGS = new Set(["major", "moderate"]);

export function driftView(ctx) {
  const el = h("section", { class: "isc-panel isc-drift", "aria-label": "drift from the reference" });
  const sub = h("span", { class: "isc-punit" });
  const body = h("div", { class: "isc-bars" });
  const legend = h("div", { class: "isc-legend" });
  el.append(h("div", { class: "isc-phead" }, h("span", { class: "isc-ptitle" }, "Drift"), sub), body, legend);

  function draw() { keepFocus(body, drawRows); }

  function drawRows() {
    clear(body); clear(sub); clear(legend);
    const rec = parseJSON(ctx.get("_drift"));
    el.style.display = rec ? "" : "none";
    if (!rec || !Array.isArray(rec.columns)) return;
    const ref = rec.reference || {}, cur = rec.current || {};
    sub.append(`PSI in nats, this frame (${count(cur.rows)} rows) against the reference (${count(ref.rows)} rows)`);
    const flags = rec.flags || {};
    legend.append(
      h("span", null, h("span", { class: "isc-swatch", style: { background: "var(--isc-warm)" } }), "moved beyond chance (moderate or major)"),
      h("span", null, h("span", { class: "isc-swatch", style: { background: "var(--isc-bar-muted)" } }), "within what sampling gives"),
      h("span", null, h("span", { class: "isc-swatch isc-swatch-chance" }), "band: 95% of random splits of the pooled rows"));
    const rows = [...rec.columns].sort((a, b) => (b.psi ?? -1) - (a.psi ?? -1));
    let top = 0;
    for (const r of rows) for (const v of [r.psi, r.psi_chance_high]) if (Number.isFinite(v)) top = Math.max(top, v);
    const max = niceMax(top);
    const x = (v) => axisPct(v, max);
    const tickBox = h("div", { class: "isc-ticks" });
    for (const t of ticks(max)) tickBox.append(h("span", { class: "isc-tick", style: { left: x(t) } }, num(t)));
    body.append(h("div", { class: "isc-axis", "aria-hidden": "true" },
      h("span", { class: "isc-name isc-axislab" }, "column"), tickBox,
      h("span", { class: "isc-val isc-axislab" }, "PSI"), h("span", { class: "isc-axislab" }, "notes")));
    for (const r of rows) {
      const moved = DRIFT_FINDINGS.has(r.flag);
      const track = h("span", { class: "isc-track" });
      if (Number.isFinite(r.psi_chance_high)) track.append(h("span", { class: "isc-chance", style: { width: x(r.psi_chance_high) } }));
      if (Number.isFinite(r.psi)) track.append(h("span", { class: "isc-fill", style: { width: x(r.psi), background: moved ? "var(--isc-warm)" : "var(--isc-bar-muted)" } }));
      const word = r.flag ? String(r.flag).replace(/_/g, " ") : "not compared";
      const rowEl = h("div", {
        class: "isc-erow", style: { cursor: "default" }, tabindex: 0, "data-keep": `drift:${r.column}`, "data-flag": r.flag || "",
        "aria-label": `${iso(r.column)}: PSI ${amount(r.psi)} nats, chance up to ${amount(r.psi_chance_high)}, ${word}`,
        onfocus: () => tipOnFocus(rowEl), onblur: () => ctx.tip.hide(), onmouseleave: () => ctx.tip.hide(),
        onmousemove: (ev) => ctx.tip.show([[nameEl(r.column)],
          `${r.kind || ""}, K = ${count(r.k)} shared levels \u00b7 n = ${count(r.n)} (reference ${count(r.n_reference)})`,
          `PSI ${amount(r.psi)} nats; sampling alone gives ${amount(r.psi_chance)} on average, up to ${amount(r.psi_chance_high)}`,
          `KL ${amount(r.kl)} \u00b7 JS ${amount(r.js)} ${(rec.units && rec.units.kl) || ""}`,
          `${pWords("p", r.p_value)}, ${pWords("q", r.q_value)}`,
          Number.isFinite(r.new_share) && r.new_share > 0 ? `${pct(r.new_share)} of rows hold values the reference never had` : null,
          flags[r.flag] ? `\u25b8 ${flags[r.flag]}` : null].filter(Boolean), ev.clientX, ev.clientY),
      }, h("span", { class: "isc-name" }, nameEl(r.column)), track, h("span", { class: "isc-val" }, amount(r.psi)),
      h("span", { class: "isc-notes" }, word));
      body.append(rowEl);
    }
    const missing = (rec.summary && rec.summary.missing_columns) || [];
    const extra = (rec.summary && rec.summary.extra_columns) || [];
    if (missing.length || extra.length) {
      body.append(h("div", { class: "isc-note" },
        missing.length ? ["only in the reference: ", ...missing.flatMap((c, i) => [i ? ", " : "", nameEl(c)])] : null,
        missing.length && extra.length ? "; " : null,
        extra.length ? ["only in this frame: ", ...extra.flatMap((c, i) => [i ? ", " : "", nameEl(c)])] : null));
    }
  }
  draw();
  return { el, draw };
}
