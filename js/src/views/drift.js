// The drift panel: how far each column of this frame moved from the reference, as a
// PSI bar (nats) against the band that sampling alone gives at these sizes (the 95%
// point of random splits of the pooled rows), with the record's flag as a note and
// the numbers on hover. Reads `_drift`, the infoscope-drift record (docs/drift-json.md),
// and `_drift_over`, the column x period strip; drawn only when one of them is sent.
//
// A small control sorts the bars (PSI, PSI beyond chance, q-value, name); a click, or
// Enter / Space on a focused row, opens the column's bins below the bars (both
// distributions on the shared alphabet and each bin's share of PSI); Escape closes
// it. The sort, the open column and the strip's cursor are kept in the model's
// memory (memory.js), so a redraw or a re-rendered output keeps them.
import { h, clear, iso, nameEl, tipOnFocus } from "../dom.js";
import { parseJSON } from "../decode.js";
import { amount, axisPct, count, niceMax, num, pct, pWords, ticks } from "../format.js";
import { keepFocus } from "../memory.js";
import { DRIFT_FINDINGS, DRIFT_SORTS, beyondChance, nextSortKey, sortDriftRows } from "../driftdata.js";
import { driftDetail } from "./driftdetail.js";
import { pairDriftList } from "./driftpairs.js";
import { driftStrip } from "./driftstrip.js";

export { DRIFT_FINDINGS };

// the panel's own choices, per widget model (kept across redraws and re-renders)
function driftMemory(ctx) {
  const m = ctx.memory || (ctx.memory = {});
  if (!m.drift) m.drift = { sort: "psi", open: null, cursor: null };
  return m.drift;
}

export function driftView(ctx) {
  const mem = driftMemory(ctx);
  const el = h("section", { class: "isc-panel isc-drift", "aria-label": "drift from the reference" });
  const sub = h("span", { class: "isc-punit" });
  const sortBox = h("div", { class: "isc-dsort", role: "radiogroup", "aria-label": "sort the drift bars by" });
  const body = h("div", { class: "isc-bars" });
  const detail = h("div", { class: "isc-ddetail-slot" });
  const legend = h("div", { class: "isc-legend" });
  const notes = h("div", { class: "isc-dnotes" });
  const pairs = h("div", { class: "isc-dpairs-slot" });
  const strip = h("div", { class: "isc-dstrip-slot" });
  el.append(h("div", { class: "isc-phead" }, h("span", { class: "isc-ptitle" }, "Drift"), sub, sortBox),
    body, legend, detail, notes, pairs, strip);

  const rowOf = (column) => [...body.querySelectorAll(".isc-erow")].find((r) => r.dataset.column === String(column));
  const setOpen = (column, { focusRow = false } = {}) => {
    const was = mem.open;
    mem.open = column;
    draw();
    if (focusRow && (column ?? was) != null) { const r = rowOf(column ?? was); if (r) r.focus({ preventScroll: true }); }
  };
  // Escape closes the detail from anywhere in the panel and gives focus back to its row
  el.addEventListener("keydown", (ev) => {
    if (ev.key === "Escape" && mem.open != null) {
      ev.preventDefault(); ev.stopPropagation();
      setOpen(null, { focusRow: true });
    }
  });

  function draw() { keepFocus(el, drawAll); }

  function drawSort(rec) {
    clear(sortBox);
    sortBox.style.display = rec ? "" : "none";
    sortBox.append(h("span", { class: "isc-lab", "aria-hidden": "true" }, "sort"));
    for (const [key, label] of DRIFT_SORTS) {
      const on = mem.sort === key;
      sortBox.append(h("button", {
        type: "button", class: "isc-dsortbtn", role: "radio", "aria-checked": String(on), tabindex: on ? 0 : -1,
        "data-sort": key, "data-keep": `drift-sort:${key}`,
        onclick: () => { mem.sort = key; draw(); },
        onkeydown: (ev) => {
          const next = nextSortKey(mem.sort, ev.key);
          if (!next) return;
          ev.preventDefault();
          mem.sort = next;
          draw();
          const b = sortBox.querySelector(`[data-sort="${next}"]`);
          if (b) b.focus({ preventScroll: true });
        },
      }, label));
    }
  }

  function drawAll() {
    for (const part of [sub, body, detail, legend, notes, pairs, strip]) clear(part);
    const rec = parseJSON(ctx.get("_drift"));
    const over = parseJSON(ctx.get("_drift_over"));
    const columns = rec && Array.isArray(rec.columns) ? rec.columns : null;
    el.style.display = columns || over ? "" : "none";
    el.dataset.generation = rec && rec.generation != null ? String(rec.generation) : "";
    drawSort(columns);
    let order = [];
    if (columns) {
      const rows = sortDriftRows(columns, mem.sort);
      order = rows.map((r) => r.column);
      drawBars(rec, rows);
      if (mem.open != null) {
        const col = columns.find((c) => String(c.column) === String(mem.open));
        if (col) detail.append(driftDetail(ctx, rec, col, { onClose: () => setOpen(null, { focusRow: true }) }));
        else mem.open = null; // the column left the record
      }
      pairs.append(pairDriftList(ctx, rec));
    }
    if (over) strip.append(driftStrip(ctx, over, order, mem));
  }

  function drawBars(rec, rows) {
    const ref = rec.reference || {}, cur = rec.current || {};
    sub.append(`PSI in nats, this frame (${count(cur.rows)} rows) against the reference (${count(ref.rows)} rows)`);
    const flags = rec.flags || {};
    legend.append(
      h("span", null, h("span", { class: "isc-swatch", style: { background: "var(--isc-warm)" } }), "moved beyond chance (moderate or major)"),
      h("span", null, h("span", { class: "isc-swatch", style: { background: "var(--isc-bar-muted)" } }), "within what sampling gives"),
      h("span", null, h("span", { class: "isc-swatch isc-swatch-chance" }), "band: 95% of random splits of the pooled rows"),
      h("span", null, "click a row, or Enter, for its bins; Escape closes"));
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
      const open = mem.open != null && String(mem.open) === String(r.column);
      const track = h("span", { class: "isc-track" });
      if (Number.isFinite(r.psi_chance_high)) track.append(h("span", { class: "isc-chance", style: { width: x(r.psi_chance_high) } }));
      if (Number.isFinite(r.psi)) track.append(h("span", { class: "isc-fill", style: { width: x(r.psi), background: moved ? "var(--isc-warm)" : "var(--isc-bar-muted)" } }));
      const word = r.flag ? String(r.flag).replace(/_/g, " ") : "not compared";
      const toggle = () => setOpen(open ? null : r.column);
      const rowEl = h("div", {
        class: "isc-erow isc-drow", role: "button", tabindex: 0, "aria-expanded": String(open), "aria-pressed": String(open),
        "data-keep": `drift:${r.column}`, "data-flag": r.flag || "",
        "aria-label": `${iso(r.column)}: PSI ${amount(r.psi)} nats, chance up to ${amount(r.psi_chance_high)}, ${word}`,
        onclick: toggle,
        onkeydown: (ev) => {
          if (ev.key === "Enter" || ev.key === " ") { ev.preventDefault(); toggle(); }
        },
        onfocus: () => tipOnFocus(rowEl), onblur: () => ctx.tip.hide(), onmouseleave: () => ctx.tip.hide(),
        onmousemove: (ev) => ctx.tip.show([[nameEl(r.column)],
          `${r.kind || ""}, K = ${count(r.k)} shared levels \u00b7 n = ${count(r.n)} (reference ${count(r.n_reference)})`,
          `PSI ${amount(r.psi)} nats; sampling alone gives ${amount(r.psi_chance)} on average, up to ${amount(r.psi_chance_high)}`,
          `beyond chance ${amount(beyondChance(r))} nats`,
          `KL ${amount(r.kl)} \u00b7 JS ${amount(r.js)} ${(rec.units && rec.units.kl) || ""}`,
          `${pWords("p", r.p_value)}, ${pWords("q", r.q_value)}`,
          Number.isFinite(r.new_share) && r.new_share > 0 ? `${pct(r.new_share)} of rows hold values the reference never had` : null,
          flags[r.flag] ? `\u25b8 ${flags[r.flag]}` : null].filter(Boolean), ev.clientX, ev.clientY),
      }, h("span", { class: "isc-name" }, nameEl(r.column)), track, h("span", { class: "isc-val" }, amount(r.psi)),
      h("span", { class: "isc-notes" }, word));
      rowEl.dataset.column = String(r.column);
      body.append(rowEl);
    }
    const missing = (rec.summary && rec.summary.missing_columns) || [];
    const extra = (rec.summary && rec.summary.extra_columns) || [];
    if (missing.length || extra.length) {
      notes.append(h("div", { class: "isc-note" },
        missing.length ? ["only in the reference: ", ...missing.flatMap((c, i) => [i ? ", " : "", nameEl(c)])] : null,
        missing.length && extra.length ? "; " : null,
        extra.length ? ["only in this frame: ", ...extra.flatMap((c, i) => [i ? ", " : "", nameEl(c)])] : null));
    }
  }
  draw();
  return { el, draw };
}
