// The pair view: the joint count table of the selected pair, cells coloured by
// pointwise MI, small cells hidden on request (with the cells that would give them away).
import { h, clear } from "../dom.js";
import { count, num, pval } from "../format.js";
import { DIVERGING, PAPER, inkOn } from "../scales.js";

export function pairKey(a, b) { return `${a}\u0000${b}`; }
export function pairFor(ctx) { // the view to show for selected_pair: the kernel's answer, else a precomputed one
  const sel = ctx.get("selected_pair");
  const live = ctx.get("_pair") || {};
  if (!Array.isArray(sel)) return { view: live.a != null ? live : null, pending: false };
  const [a, b] = sel;
  if (live.a === a && live.b === b) return { view: live, pending: false, flipped: false };
  if (live.a === b && live.b === a) return { view: live, pending: false, flipped: true };
  const cache = ctx.get("_pair_cache") || {};
  if (cache[pairKey(a, b)]) return { view: cache[pairKey(a, b)], pending: false };
  if (cache[pairKey(b, a)]) return { view: cache[pairKey(b, a)], pending: false, flipped: true };
  return { view: live.a != null ? live : null, pending: true, wanted: sel };
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

  function draw() {
    if (ro) ro.disconnect();
    cue = null;
    clear(body);
    const { view, pending, wanted } = pairFor(ctx);
    if (!view) {
      titleEl.textContent = "";
      body.append(h("div", { class: "isc-empty" }, pending
        ? (ctx.offline ? "This pair was not saved with the export; open it in a live notebook." : "Computing the joint table\u2026")
        : "Click a cell of the information grid to open that pair's joint table."));
      return;
    }
    const unit = view.unit || ctx.unit();
    titleEl.textContent = `${view.a} (rows) \u00d7 ${view.b} (columns)`;
    titleEl.title = titleEl.textContent;
    const holder = h("div", { class: pending ? "isc-dim" : "" });
    if (pending) body.append(h("div", { class: "isc-note" }, ctx.offline
      ? `\u201c${wanted[0]} \u00d7 ${wanted[1]}\u201d was not saved with this export; showing the last pair.`
      : `Computing \u201c${wanted[0]} \u00d7 ${wanted[1]}\u201d\u2026`));
    const stat = (k, v) => h("span", null, `${k} `, h("b", null, v));
    holder.append(h("div", { class: "isc-stats" },
      stat("MI", `${num(view.mi)} ${unit}`), stat("NMI", num(view.nmi)),
      stat("G", view.g == null ? "\u2014" : `${num(view.g, 4)} (dof ${count(view.dof)})`), stat("p", pval(view.p_value)),
      stat("n", count(view.n))));
    let top = 0;
    for (const row of view.pmi || []) for (const v of row) if (v != null && Number.isFinite(v)) top = Math.max(top, Math.abs(v));
    top = top || 1;
    const hiddenLabel = view.min_count ? `<${view.min_count}` : "";
    const thead = h("thead", null, h("tr", null,
      h("th", { class: "isc-corner", scope: "col", title: `rows: ${view.a}; columns: ${view.b}` }, `${view.a} \u2193  ${view.b} \u2192`),
      (view.cols || []).map((c) => h("th", { scope: "col", title: c }, c)),
      view.row_totals ? h("th", { scope: "col", class: "isc-tot" }, "total") : null));
    const tbody = h("tbody");
    (view.rows || []).forEach((rowLabel, i) => {
      const tr = h("tr", null, h("th", { scope: "row", title: rowLabel }, rowLabel));
      (view.cols || []).forEach((colLabel, j) => {
        const n = view.counts[i][j], p = view.pmi[i][j];
        if (n == null) {
          // a complementary cell (hidden only so a small one cannot be worked out from
          // the totals) may hold many rows: it must not say "fewer than"
          const why = (view.hidden_reasons && view.hidden_reasons[i]) ? view.hidden_reasons[i][j] : "small";
          const small = why !== "complement";
          tr.append(h("td", {
            class: small ? "isc-hid" : "isc-hid isc-hid2", "data-hidden": small ? "small" : "complement",
            title: small ? `hidden: fewer than ${view.min_count} rows` : "hidden to protect a small cell",
            "aria-label": small ? `${rowLabel}, ${colLabel}: hidden, fewer than ${view.min_count} rows`
              : `${rowLabel}, ${colLabel}: hidden to protect a small cell`,
          }, small ? hiddenLabel : COMPLEMENT_MARK));
          return;
        }
        const rgb = p == null || !Number.isFinite(p) ? PAPER : DIVERGING.at(0.5 + p / (2 * top));
        const td = h("td", {
          style: { background: `rgb(${rgb.join(",")})`, color: inkOn(rgb) },
          onmousemove: (ev) => ctx.tip.show([`${rowLabel} \u00d7 ${colLabel}`, `${count(n)} rows`,
            p == null || !Number.isFinite(p) ? "no rows: pointwise MI undefined" : `pointwise MI ${num(p)} ${unit} (${p > 0 ? "more" : "fewer"} rows than if independent)`], ev.clientX, ev.clientY),
          onmouseleave: () => ctx.tip.hide(),
        }, count(n));
        tr.append(td);
      });
      if (view.row_totals) tr.append(h("td", { class: "isc-tot" }, count(view.row_totals[i])));
      tbody.append(tr);
    });
    const tfoot = view.col_totals ? h("tfoot", null, h("tr", null, h("th", { scope: "row", class: "isc-tot" }, "total"),
      view.col_totals.map((v) => h("td", { class: "isc-tot" }, count(v))), h("td", { class: "isc-tot" }, count(view.n)))) : null;
    const tableWrap = h("div", { class: "isc-tablewrap" }, h("table", { class: "isc-ptable" }, thead, tbody, tfoot));
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
    tableWrap.addEventListener("scroll", cue);
    requestAnimationFrame(cue);
    if (ro) ro.observe(tableWrap);
    const bar = h("canvas", { width: 140, height: 10, "aria-hidden": "true" });
    const g = bar.getContext("2d");
    for (let x = 0; x < bar.width; x++) { g.fillStyle = DIVERGING.css(x / (bar.width - 1)); g.fillRect(x, 0, 1, bar.height); }
    holder.append(h("div", { class: "isc-legend" }, h("span", null, `\u2212${num(top)} fewer `, bar, ` more +${num(top)} ${unit}`),
      h("span", null, "colour: pointwise MI, log of observed over independent share")));
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
