// Drift over time: a strip with one row per column and one cell per period of the
// time column (the `_drift_over` part: session.drift_over). A cell is coloured only
// where the period's flag is a finding (moderate or major: significant within the
// period and beyond chance by the common-practice bands); other compared cells are
// plain, empty periods hatched, the reference period marked. Hover, or the arrow
// keys on the focused strip, show a cell's numbers; the cursor is kept across redraws.
import { h, iso, nameEl, uid } from "../dom.js";
import { amount, count, num, pWords } from "../format.js";
import { moveCursor, stripLayout, stripTone } from "../driftdata.js";

const AGAINST = { first: "the first period", previous: "the period before", frame: "the reference frame" };

export function driftStrip(ctx, over, order, mem) {
  const { periods, columns, cell } = stripLayout(over, order);
  const box = h("div", { class: "isc-dstrip", role: "region", "aria-label": "drift over time" });
  if (over.error) { // the kernel could not cut the periods (a bad time column or frequency)
    box.append(h("div", { class: "isc-dhead" }, h("span", { class: "isc-ptitle" }, "Drift over time")),
      h("div", { class: "isc-error isc-dstrip-error", role: "status" }, String(over.error)));
    return box;
  }
  const against = AGAINST[over.reference] || String(over.reference || "");
  box.append(h("div", { class: "isc-dhead" }, h("span", { class: "isc-ptitle" }, "Drift over time"),
    h("span", { class: "isc-punit" }, "periods of ", nameEl(over.time_column), ` (every ${over.every}), each against ${against}`)));
  if (!periods.length || !columns.length) {
    box.append(h("div", { class: "isc-empty" }, "No periods to show."));
    return box;
  }
  // the cursor by names (a new order or new numbers keep it on the same cell)
  let [ri, ci] = [0, 0];
  if (mem.cursor) {
    const r = columns.indexOf(String(mem.cursor[0])), c = periods.findIndex((p) => p.period === mem.cursor[1]);
    if (r >= 0 && c >= 0) [ri, ci] = [r, c];
  }
  const base = uid("dstrip");
  const width = cellWidth(periods.length);
  const scroller = h("div", { class: "isc-dscroll", "data-keep-scroll": "drift-strip" });
  const grid = h("div", {
    class: "isc-dgrid", role: "grid", tabindex: 0, "data-keep": "drift-strip",
    "aria-label": `drift of ${columns.length} columns over ${periods.length} periods; arrow keys move between cells`,
    style: { gridTemplateColumns: `minmax(6em,10em) repeat(${periods.length}, ${width}px)` },
  });
  grid.style.setProperty("--isc-dcell-w", `${width}px`);
  const head = [h("span", { class: "isc-axislab", role: "columnheader" }, "column")];
  const every = Math.max(1, Math.ceil(38 / width)); // a start label is about 38 px wide
  periods.forEach((p, c) => head.push(h("span", { class: "isc-dper", role: "columnheader", title: p.period, "aria-label": p.period },
    c % every === 0 ? shortStart(p) : "")));
  grid.append(h("div", { class: "isc-drowh", role: "row", style: { display: "contents" } }, ...head));
  const words = (column, p) => {
    const c = cell(column, p.period);
    if (p.is_reference) return [[nameEl(column), ` \u00b7 ${p.period}`], "the reference period: the others are compared with it"];
    if (!c) return [[nameEl(column), ` \u00b7 ${p.period}`], "not compared"];
    const lines = [[nameEl(column), ` \u00b7 ${p.period}`],
      c.reference && c.reference !== "frame" ? ["against ", c.reference] : "against the reference frame",
      `rows ${c.n == null ? (c.hidden ? "hidden (small)" : "\u2014") : count(c.n)} (reference ${c.n_reference == null ? (c.hidden ? "hidden" : "\u2014") : count(c.n_reference)})`];
    if (!c.flag) lines.push("no rows in this period: nothing compared");
    else {
      lines.push(`PSI ${amount(c.psi)} nats; sampling alone gives ${amount(c.psi_chance)}, up to ${amount(c.psi_chance_high)}`);
      lines.push(`${pWords("p", c.p_value)}, ${pWords("q", c.q_value)} (within the period)`);
      lines.push(`\u25b8 ${(over.flags || {})[c.flag] || String(c.flag).replace(/_/g, " ")}`);
    }
    return lines;
  };
  const cellsEl = [];
  columns.forEach((column, r) => {
    const kids = [h("span", { class: "isc-name", role: "rowheader" }, nameEl(column))];
    const row = [];
    periods.forEach((p, c) => {
      const tone = p.is_reference ? "reference" : stripTone(cell(column, p.period));
      const c0 = cell(column, p.period);
      const id = `${base}-${r}-${c}`;
      const el = h("span", {
        id, role: "gridcell", class: `isc-dcell isc-d-${tone}`, "data-tone": tone, "data-column": String(column), "data-period": p.period,
        "aria-label": `${iso(column)}, ${p.period}: ${tone === "reference" ? "reference period" : c0 && c0.flag ? `PSI ${amount(c0.psi)} nats, ${String(c0.flag).replace(/_/g, " ")}` : "no rows"}`,
        onmousemove: (ev) => ctx.tip.show(words(column, p), ev.clientX, ev.clientY),
        onmouseleave: () => ctx.tip.hide(),
        onclick: () => { ri = r; ci = c; place(true); grid.focus({ preventScroll: true }); },
      });
      row.push(el);
      kids.push(el);
    });
    cellsEl.push(row);
    grid.append(h("div", { role: "row", style: { display: "contents" } }, ...kids));
  });
  const place = (showTip) => {
    for (const row of cellsEl) for (const el of row) el.classList.remove("isc-dcur-cell");
    const el = cellsEl[ri][ci];
    el.classList.add("isc-dcur-cell");
    grid.setAttribute("aria-activedescendant", el.id);
    mem.cursor = [columns[ri], periods[ci].period];
    grid.dataset.cursor = JSON.stringify(mem.cursor);
    if (showTip) {
      const b = el.getBoundingClientRect();
      ctx.tip.show(words(columns[ri], periods[ci]), b.right, b.bottom);
    }
  };
  grid.addEventListener("keydown", (ev) => {
    const next = moveCursor([ri, ci], ev.key, columns.length, periods.length);
    if (!next) return;
    ev.preventDefault();
    [ri, ci] = next;
    place(true);
    cellsEl[ri][ci].scrollIntoView({ block: "nearest", inline: "nearest" });
  });
  grid.addEventListener("focus", () => place(true));
  grid.addEventListener("blur", () => ctx.tip.hide());
  scroller.append(grid);
  box.append(scroller);
  place(false);
  const sw = (tone) => h("span", { class: `isc-swatch isc-dcell isc-d-${tone}` });
  const level = over.level ?? 0.05;
  box.append(h("div", { class: "isc-legend" },
    h("span", null, sw("major"), "major: q < ", num(level), ", PSI beyond chance \u2265 0.25"),
    h("span", null, sw("moderate"), "moderate: q < ", num(level), ", beyond chance \u2265 0.10"),
    h("span", null, sw("calm"), "compared, not a finding"),
    h("span", null, sw("empty"), "no rows in the period"),
    over.reference === "first" ? h("span", null, sw("reference"), "the reference period") : null,
    over.min_count ? h("span", null, `row counts below ${over.min_count} hidden`) : null));
  return box;
}

// cells are wider when there are few periods (a strip of 7 periods still reads as one)
function cellWidth(n) { return n <= 12 ? 34 : n <= 24 ? 22 : 16; }

// the start of a period, short: "01-05" for a day or week, "2026-01" for months and longer
function shortStart(p) {
  const s = String(p.start || p.period);
  return /^\d{4}-\d{2}-\d{2}/.test(s) ? s.slice(5, 10) : s;
}
