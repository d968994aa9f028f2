// The pair view: the joint count table of the selected pair, cells coloured by how
// far each count is from independence (standardised residual when the margins are
// shown, pointwise MI otherwise), small cells hidden on request (with the cells
// that would give them away).
import { h, clear, iso, nameEl } from "../dom.js";
import { amount, count, expectedWords, num, pShort, signed } from "../format.js";
import { DIVERGING, PAPER, inkOn } from "../scales.js";
import { choosePair, expectedCounts, maxAbs, residuals, testWords } from "../pairdata.js";
import { RELIABILITY_HELP } from "../vocabulary.js";

export function pairFor(ctx) { // the view to show for selected_pair, in its orientation
  return choosePair(ctx.get("selected_pair"), ctx.get("_pair"), ctx.get("_pair_cache"));
}

const COMPLEMENT_MARK = "\u00b7"; // a cell hidden to protect a small one (not itself small)

export function hiddenNote(view) {
  let small = 0, other = 0;
  for (const row of view.hidden_reasons || []) for (const r of row || []) { if (r === "complement") other++; else if (r) small++; }
  if (!view.hidden_reasons) small = view.hidden_cells;
  const parts = [`${small} cell${small === 1 ? "" : "s"} with fewer than ${view.min_count} rows hidden (\u201c<${view.min_count}\u201d)`];
  if (other) parts.push(`${other} more hidden to protect them (\u201c${COMPLEMENT_MARK}\u201d, any size)`);
  return `${parts.join("; ")}; totals are hidden too.`;
}

export function pairView(ctx) {
  const el = h("section", { class: "isc-panel isc-pair", "aria-label": "pair view" });
  const titleEl = h("span", { class: "isc-punit" });
  const body = h("div");
  el.append(h("div", { class: "isc-phead" }, h("span", { class: "isc-ptitle" }, "Pair view"), titleEl), body);
  // one observer for the view's life: each redraw points it at the new table
  let cue = null;
  const ro = typeof ResizeObserver !== "undefined" ? new ResizeObserver(() => cue && cue()) : null;

  let shownKey = null;
  function draw() {
    if (ro) ro.disconnect();
    cue = null;
    // the same pair redrawn (new numbers, a setting) keeps its table's scroll
    const prev = body.querySelector(".isc-tablewrap");
    const scroll = prev ? [prev.scrollTop, prev.scrollLeft] : null;
    const prevKey = shownKey;
    clear(body);
    const { view, pending, wanted } = pairFor(ctx);
    if (!view) {
      clear(titleEl);
      body.append(h("div", { class: "isc-empty" }, pending
        ? (ctx.offline ? "This pair was not saved with the export; open it in a live notebook." : "Computing the joint table\u2026")
        : "Click a cell of the information grid to open that pair's joint table."));
      return;
    }
    const unit = view.unit || ctx.unit();
    clear(titleEl);
    titleEl.append(nameEl(view.a, { max: "40%" }), " (rows) \u00d7 ", nameEl(view.b, { max: "40%" }), " (columns)");
    titleEl.title = `${iso(view.a)} (rows) \u00d7 ${iso(view.b)} (columns)`;
    const holder = h("div", { class: pending ? "isc-dim" : "" });
    if (pending) body.append(h("div", { class: "isc-note" }, ctx.offline
      ? ["\u201c", nameEl(wanted[0]), " \u00d7 ", nameEl(wanted[1]), "\u201d was not saved with this export; showing the last pair."]
      : ["Computing \u201c", nameEl(wanted[0]), " \u00d7 ", nameEl(wanted[1]), "\u201d\u2026"]));
    const stat = (k, v) => h("span", null, `${k} `, h("b", null, v));
    holder.append(h("div", { class: "isc-stats" },
      stat("MI", `${amount(view.mi)} ${unit}`), stat("NMI", amount(view.nmi)),
      stat("G", view.g == null ? "\u2014" : `${num(view.g, 4)} (dof ${count(view.dof)})`), stat("p", pShort(view.p_value)),
      stat("n", count(view.n))));
    const how = testWords(view);
    const rel = RELIABILITY_HELP[view.reliability];
    if (how || rel) holder.append(h("div", { class: "isc-note isc-testline" }, how ? `p from a ${how}.` : null, rel ? ` ${rel}` : null));
    // colour: the standardised residual where the margins are shown (an empty cell
    // where many rows were expected is the most surprising); else pointwise MI
    const resid = residuals(view);
    const E = expectedCounts(view);
    const shade = resid || view.pmi || [];
    const top = maxAbs(shade);
    const hiddenLabel = view.min_count ? `<${view.min_count}` : "";
    const thead = h("thead", null, h("tr", null,
      h("th", { class: "isc-corner", scope: "col", title: `rows: ${iso(view.a)}; columns: ${iso(view.b)}` }, nameEl(view.a), " \u2193  ", nameEl(view.b), " \u2192"),
      (view.cols || []).map((c) => h("th", { scope: "col", title: c }, c)),
      view.row_totals ? h("th", { scope: "col", class: "isc-tot" }, "total") : null));
    const tbody = h("tbody");
    (view.rows || []).forEach((rowLabel, i) => {
      const tr = h("tr", null, h("th", { scope: "row", title: rowLabel }, rowLabel));
      (view.cols || []).forEach((colLabel, j) => {
        const n = view.counts[i][j], p = view.pmi[i][j], z = shade[i] ? shade[i][j] : null;
        if (n == null) {
          // a complementary cell (hidden only so a small one cannot be worked out from
          // the totals) may hold many rows: it must not say "fewer than"
          const why = (view.hidden_reasons && view.hidden_reasons[i]) ? view.hidden_reasons[i][j] : "small";
          const small = why !== "complement";
          tr.append(h("td", {
            class: small ? "isc-hid" : "isc-hid isc-hid2", "data-hidden": small ? "small" : "complement",
            title: small ? `hidden: fewer than ${view.min_count} rows` : "hidden to protect a small cell",
            "aria-label": small ? `${iso(rowLabel)}, ${iso(colLabel)}: hidden, fewer than ${view.min_count} rows`
              : `${iso(rowLabel)}, ${iso(colLabel)}: hidden to protect a small cell`,
          }, small ? hiddenLabel : COMPLEMENT_MARK));
          return;
        }
        const rgb = z == null || !Number.isFinite(z) ? PAPER : DIVERGING.at(0.5 + z / (2 * top));
        const e = E ? E[i][j] : null;
        const td = h("td", {
          style: { background: `rgb(${rgb.join(",")})`, color: inkOn(rgb) },
          "data-shade": z == null ? null : z.toFixed(3),
          onmousemove: (ev) => ctx.tip.show([`${iso(rowLabel)} \u00d7 ${iso(colLabel)}`,
            e == null ? `${count(n)} rows` : `${count(n)} rows; ${expectedWords(e)} if independent`,
            resid && z != null ? `standardised residual ${signed(z)}: ${Math.abs(z) < 2 ? "within chance of independence" : z > 0 ? "more rows than independence gives" : "fewer rows than independence gives"}` : null,
            p == null || !Number.isFinite(p) ? (n === 0 ? "no rows: pointwise MI is minus infinity" : null) : `pointwise MI ${amount(p)} ${unit}`].filter(Boolean), ev.clientX, ev.clientY),
          onmouseleave: () => ctx.tip.hide(),
        }, count(n));
        tr.append(td);
      });
      if (view.row_totals) tr.append(h("td", { class: "isc-tot" }, count(view.row_totals[i])));
      tbody.append(tr);
    });
    const tfoot = view.col_totals ? h("tfoot", null, h("tr", null, h("th", { scope: "row", class: "isc-tot" }, "total"),
      view.col_totals.map((v) => h("td", { class: "isc-tot" }, count(v))), h("td", { class: "isc-tot" }, count(view.n)))) : null;
    const tableWrap = h("div", { class: "isc-tablewrap", "data-keep-scroll": "pair" }, h("table", { class: "isc-ptable" }, thead, tbody, tfoot));
    const more = h("div", { class: "isc-note isc-more", "aria-hidden": "true", style: { display: "none" } }, "scroll sideways for more columns \u2192");
    const box = h("div", { class: "isc-tablebox" }, tableWrap);
    holder.append(box, more);
    // a visible cue when the joint table is wider than its panel: a fade at the
    // right edge and a note, both gone once scrolled to the end
    cue = () => {
      const over = tableWrap.scrollWidth - tableWrap.clientWidth > 2;
      const atEnd = tableWrap.scrollLeft + tableWrap.clientWidth >= tableWrap.scrollWidth - 2;
      box.classList.toggle("isc-overflow", over && !atEnd);
      more.style.display = over ? "" : "none";
    };
    shownKey = `${view.a}\u0000${view.b}`;
    if (scroll && prevKey === shownKey) requestAnimationFrame(() => { tableWrap.scrollTop = scroll[0]; tableWrap.scrollLeft = scroll[1]; });
    else if (ctx.memory && ctx.memory.scroll.get("pair") && prevKey == null) {
      const at = ctx.memory.scroll.get("pair");
      requestAnimationFrame(() => { tableWrap.scrollTop = at[0]; tableWrap.scrollLeft = at[1]; });
    }
    tableWrap.addEventListener("scroll", cue);
    requestAnimationFrame(cue);
    if (ro) ro.observe(tableWrap);
    const bar = h("canvas", { width: 140, height: 10, "aria-hidden": "true" });
    const g = bar.getContext("2d");
    for (let x = 0; x < bar.width; x++) { g.fillStyle = DIVERGING.css(x / (bar.width - 1)); g.fillRect(x, 0, 1, bar.height); }
    holder.append(h("div", { class: "isc-legend" }, resid
      ? [h("span", null, `\u2212${num(top)} fewer `, bar, ` more +${num(top)}`),
        h("span", null, "colour: standardised residual (observed \u2212 expected) / \u221aexpected, expected = rows if the two columns were independent")]
      : [h("span", null, `\u2212${num(top)} fewer `, bar, ` more +${num(top)} ${unit}`),
        h("span", null, "colour: pointwise MI, log of observed over independent share (margins hidden with the small cells)")]));
    if (view.min_count) {
      holder.append(h("div", { class: "isc-note" }, view.hidden_cells
        ? hiddenNote(view)
        : `Cells with fewer than ${view.min_count} rows would be hidden; none are.`));
    }
    body.append(holder);
  }
  draw();
  return { el, draw, destroy: () => ro && ro.disconnect(), observer: ro };
}
