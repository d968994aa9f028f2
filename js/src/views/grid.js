// The information grid: every pair's measure as a canvas heat map, with labels,
// a keyboard cursor (arrow keys move, Enter opens the pair) and a legend.
import { h, iso } from "../dom.js";
import { asFloat32, asInt32, asUint8 } from "../decode.js";
import { amount, count, num, pWords } from "../format.js";
import { SEQUENTIAL, gridT, mute } from "../scales.js";
import { cellAt as cellUnder, fitText, gridLayout, reorderSquare } from "../layout.js";
import { HAS_UNIT, MEASURE_LABELS, MEASURE_SHORT, ORDER_LABELS } from "../vocabulary.js";
import { cellReading } from "../gridcells.js";
import { select } from "../controls.js";

export function gridView(ctx) {
  const el = h("section", { class: "isc-panel isc-grid", "aria-label": "information grid" });
  const order = select(ctx, "order", "Order", ["cluster", "name"], ORDER_LABELS);
  const unitEl = h("span", { class: "isc-punit" });
  const canvas = h("canvas", { tabindex: 0, role: "img", "data-keep": "grid", "aria-label": "information grid: arrow keys move, Enter opens the pair" });
  const wrap = h("div", { class: "isc-gridwrap", "data-keep-scroll": "grid" }, canvas);
  const live = h("div", { class: "isc-sr", "aria-live": "polite" });
  const legendBar = h("canvas", { width: 140, height: 10, "aria-hidden": "true" });
  const legendMin = h("span"), legendMax = h("span");
  const mutedSw = h("span", { class: "isc-swatch" });
  const mutedText = h("span");
  const fewSw = h("span", { class: "isc-swatch isc-swatch-few" });
  const fewText = h("span");
  const countsText = h("span", { class: "isc-paircounts" });
  const legend = h("div", { class: "isc-legend" }, h("span", null, legendMin, " ", legendBar, " ", legendMax),
    h("span", null, mutedSw, mutedText), h("span", null, fewSw, fewText),
    h("span", null, h("span", { class: "isc-swatch", style: { background: "linear-gradient(135deg,#fff 45%,#c9c4b8 45% 55%,#fff 55%)" } }), "a column with itself"),
    h("span", null, "colour \u221d \u221a value; full colour only for findings"), countsText);
  const held = h("span", { class: "isc-held", role: "note" });
  const memory = ctx.memory || {};
  el.append(h("div", { class: "isc-phead" }, h("span", { class: "isc-ptitle" }, "Information grid"), unitEl, held, order.el), wrap, legend, live);
  const st = { names: [], size: 0, values: null, n: null, q: null, cell: 10, mx: 0, my: 0, max: 1, cursor: [0, 1], alpha: 0.05 };


  function load() {
    const meta = ctx.get("_grid_meta") || {};
    let names = meta.names || [];
    let values = asFloat32(ctx.get("_grid_values")), n = asInt32(ctx.get("_grid_n")), q = asFloat32(ctx.get("_grid_q"));
    let rel = asUint8(ctx.get("_grid_reliability"));
    if (rel.length !== values.length) rel = null; // a kernel without reliability codes
    // while a control is being moved the columns keep the order on screen, so cells
    // do not jump under the pointer; the new order comes when the control is let go
    held.textContent = "";
    if (ctx.hold.active() && st.names.length === names.length && st.names.join("\u0000") !== names.join("\u0000")) {
      const keep = st.names;
      const moved = [reorderSquare(values, names, keep), reorderSquare(n, names, keep), reorderSquare(q, names, keep),
        rel ? reorderSquare(rel, names, keep) : null];
      if (moved.slice(0, 3).every(Boolean)) {
        [values, n, q, rel] = moved;
        names = keep;
        held.textContent = "order kept while a control moves";
      }
    }
    st.names = names;
    st.size = st.names.length;
    st.values = values; st.n = n; st.q = q; st.rel = rel;
    st.states = meta.reliability_states || ["ok", "sparse", "too_few"];
    st.counts = meta.pair_counts || null;
    st.alpha = ctx.get("alpha_fdr") ?? meta.alpha ?? 0.05;
    st.measure = meta.measure || ctx.get("measure") || "mi";
    st.unit = meta.unit || ctx.unit();
    // the keyboard cursor stays on the same pair of columns, wherever they moved
    const want = memory.cursor;
    if (Array.isArray(want)) {
      const i = st.names.indexOf(want[0]), j = st.names.indexOf(want[1]);
      if (i >= 0 && j >= 0) st.cursor = [i, j];
    }
    st.cursor = [Math.min(st.cursor[0], Math.max(0, st.size - 1)), Math.min(st.cursor[1], Math.max(0, st.size - 1))];
    if (st.values.length !== st.size * st.size) st.size = 0; // incomplete update: draw nothing stale
    let top = 0;
    for (let i = 0; i < st.size; i++) for (let j = 0; j < st.size; j++) {
      const v = st.values[i * st.size + j];
      if (i !== j && Number.isFinite(v)) top = Math.max(top, v);
    }
    st.max = Math.max(top, 1e-12);
  }

  function layout() {
    const avail = Math.max(200, (wrap.clientWidth || el.clientWidth || 520) - 4);
    const g = canvas.getContext("2d");
    g.font = "11px system-ui, sans-serif";
    let widest = 0;
    if (st.size && st.size <= 80) for (const n of st.names) widest = Math.max(widest, g.measureText(n).width);
    Object.assign(st, gridLayout({ avail, size: st.size, labelWidth: widest }));
  }

  function reading(i, j) {
    const k = i * st.size + j;
    return cellReading({ value: st.values[k], q: st.q[k], alpha: st.alpha, state: st.rel ? st.states[st.rel[k]] : null });
  }

  function colourAt(i, j) {
    if (i === j) return [255, 255, 255];
    const r = reading(i, j);
    if (r.kind === "unknown" || r.kind === "too_few") return [240, 239, 235];
    const c = SEQUENTIAL.at(gridT(st.values[i * st.size + j], st.max));
    return r.kind === "finding" ? c : mute(c);
  }

  function draw() {
    load();
    unitEl.textContent = st.size ? `${MEASURE_LABELS[st.measure] || st.measure}${HAS_UNIT[st.measure] ? `, ${st.unit}` : ", unit-free"}${st.measure === "vi" ? " (a distance: 0 = same information)" : ""}` : "";
    mutedText.textContent = `muted: not significant (BH q \u2265 ${num(st.alpha)}) or few rows per cell (under 5 on average)`;
    fewText.textContent = "grey with a dot: too few rows to tell anything";
    const c = st.counts;
    countsText.textContent = c && c.pairs ? `${count(c.pairs)} pairs: ${count(c.sparse || 0)} with few rows per cell, ${count(c.too_few || 0)} with too few rows${c.permutation ? `; ${count(c.permutation)} tested by shuffling` : ""}` : "";
    const mc = mute(SEQUENTIAL.at(0.6));
    mutedSw.style.background = `rgb(${mc.join(",")})`;
    order.sync();
    if (!st.size) {
      canvas.width = 1; canvas.height = 1; canvas.style.width = "1px"; canvas.style.height = "1px";
      return;
    }
    layout();
    const dpr = window.devicePixelRatio || 1;
    const W = st.mx + st.size * st.cell + 2, H = st.my + st.size * st.cell + 2;
    canvas.width = Math.round(W * dpr); canvas.height = Math.round(H * dpr);
    canvas.style.width = `${W}px`; canvas.style.height = `${H}px`;
    canvas.dataset.cell = String(st.cell); canvas.dataset.offset = String(st.mx); // for tests and tools
    if (st.size <= 200) canvas.dataset.order = JSON.stringify(st.names); else delete canvas.dataset.order;
    const g = canvas.getContext("2d");
    g.setTransform(dpr, 0, 0, dpr, 0, 0);
    g.clearRect(0, 0, W, H);
    const gap = st.cell >= 8 ? 1 : 0;
    for (let i = 0; i < st.size; i++) for (let j = 0; j < st.size; j++) {
      const [r, gg, b] = colourAt(i, j);
      g.fillStyle = `rgb(${r},${gg},${b})`;
      g.fillRect(st.mx + j * st.cell, st.my + i * st.cell, st.cell - gap, st.cell - gap);
    }
    if (st.cell >= 6 && st.rel) { // too few rows to tell: a dot in the grey cell
      g.fillStyle = "#8c8a84";
      const rad = Math.max(1, Math.min(2.5, st.cell / 8));
      for (let i = 0; i < st.size; i++) for (let j = 0; j < st.size; j++) {
        if (i === j || reading(i, j).kind !== "too_few") continue;
        g.beginPath(); g.arc(st.mx + j * st.cell + (st.cell - gap) / 2, st.my + i * st.cell + (st.cell - gap) / 2, rad, 0, 2 * Math.PI); g.fill();
      }
    }
    if (st.cell >= 6) { // the diagonal: a column with itself, struck through
      g.strokeStyle = "#c9c4b8"; g.lineWidth = 1;
      for (let i = 0; i < st.size; i++) {
        const x0 = st.mx + i * st.cell, y0 = st.my + i * st.cell;
        g.strokeRect(x0 + 0.5, y0 + 0.5, st.cell - gap - 1, st.cell - gap - 1);
        g.beginPath(); g.moveTo(x0 + 2, y0 + 2); g.lineTo(x0 + st.cell - gap - 2, y0 + st.cell - gap - 2); g.stroke();
      }
    }
    if (st.mx) { // labels: left (right-aligned) and top (rotated), truncated to the margin
      g.fillStyle = getComputedStyle(ctx.root).getPropertyValue("--isc-ink2").trim() || "#57606a"; g.font = `${Math.min(11, st.cell)}px system-ui, sans-serif`; g.textBaseline = "middle";
      for (let i = 0; i < st.size; i++) {
        const text = fitText((t) => g.measureText(t).width, st.names[i], st.mx - 6);
        g.textAlign = "right";
        g.fillText(text, st.mx - 4, st.my + i * st.cell + st.cell / 2);
        g.save();
        g.translate(st.mx + i * st.cell + st.cell / 2, st.my - 4);
        g.rotate(-Math.PI / 2);
        g.textAlign = "left";
        g.fillText(text, 0, 0);
        g.restore();
      }
    }
    const sel = ctx.get("selected_pair");
    if (Array.isArray(sel)) {
      const a = st.names.indexOf(sel[0]), b = st.names.indexOf(sel[1]);
      if (a >= 0 && b >= 0) for (const [i, j] of [[a, b], [b, a]]) box(g, i, j, "#d9822b", 2);
    }
    if (document.activeElement === canvas) box(g, st.cursor[0], st.cursor[1], "#1f2328", 1.5, [3, 2]);
    drawLegend();
  }

  function box(g, i, j, colour, width, dash) {
    g.save(); g.strokeStyle = colour; g.lineWidth = width; if (dash) g.setLineDash(dash);
    g.strokeRect(st.mx + j * st.cell - 0.5, st.my + i * st.cell - 0.5, st.cell, st.cell);
    g.restore();
  }

  function drawLegend() {
    const g = legendBar.getContext("2d");
    // the bar runs linearly in value; the colour follows the grid's square-root scale
    for (let x = 0; x < legendBar.width; x++) { g.fillStyle = SEQUENTIAL.css(gridT(x / (legendBar.width - 1), 1)); g.fillRect(x, 0, 1, legendBar.height); }
    legendMin.textContent = "0";
    legendMax.textContent = `${amount(st.max)}${HAS_UNIT[st.measure] ? ` ${st.unit}` : ""}`;
  }

  function cellAt(ev) {
    const r = canvas.getBoundingClientRect();
    return cellUnder(ev.clientX - r.left, ev.clientY - r.top, st);
  }

  function describe(i, j) {
    const k = i * st.size + j, a = st.names[i], b = st.names[j];
    if (i === j) return [iso(a), "a column with itself (its own entropy)"];
    const r = reading(i, j);
    return [`${iso(a)} \u00d7 ${iso(b)}`,
      `${MEASURE_SHORT[st.measure] || st.measure} = ${amount(st.values[k])}${HAS_UNIT[st.measure] ? ` ${st.unit}` : ""}`,
      `n = ${count(st.n[k])} rows with both present`,
      `${pWords("q", st.q[k])}: ${r.text}`];
  }

  function open(i, j) {
    if (i === j || !st.size) return;
    ctx.set("selected_pair", [st.names[i], st.names[j]]);
  }

  function labelAt(ev) { // a name in the left or top margin (drawn truncated to fit)
    if (!st.mx) return null;
    const r = canvas.getBoundingClientRect();
    const x = ev.clientX - r.left, y = ev.clientY - r.top;
    const i = Math.floor((y - st.my) / st.cell), j = Math.floor((x - st.mx) / st.cell);
    if (x < st.mx && y >= st.my && i >= 0 && i < st.size) return st.names[i];
    if (y < st.my && x >= st.mx && j >= 0 && j < st.size) return st.names[j];
    return null;
  }

  canvas.addEventListener("mousemove", (ev) => {
    const c = cellAt(ev);
    const name = c ? null : labelAt(ev);
    // the full name of a margin label, as text (a title and the view's own tooltip)
    if (name != null) { canvas.title = String(name); canvas.dataset.label = String(name); ctx.tip.show([iso(name)], ev.clientX, ev.clientY); return; }
    if (canvas.title) { canvas.removeAttribute("title"); delete canvas.dataset.label; }
    if (!c) { ctx.tip.hide(); canvas.style.cursor = "default"; return; }
    canvas.style.cursor = c[0] === c[1] ? "default" : "pointer";
    ctx.tip.show(describe(c[0], c[1]), ev.clientX, ev.clientY);
  });
  canvas.addEventListener("mouseleave", () => ctx.tip.hide());
  const setCursor = (c) => {
    st.cursor = c;
    memory.cursor = [st.names[c[0]], st.names[c[1]]];
    canvas.dataset.cursor = JSON.stringify(memory.cursor);
  };
  canvas.addEventListener("click", (ev) => { const c = cellAt(ev); if (c) { setCursor(c); open(c[0], c[1]); } });
  canvas.addEventListener("focus", () => draw());
  canvas.addEventListener("blur", () => draw());
  canvas.addEventListener("keydown", (ev) => {
    if (!st.size) return;
    const moves = { ArrowUp: [-1, 0], ArrowDown: [1, 0], ArrowLeft: [0, -1], ArrowRight: [0, 1] };
    if (moves[ev.key]) {
      ev.preventDefault();
      const [di, dj] = moves[ev.key];
      setCursor([Math.max(0, Math.min(st.size - 1, st.cursor[0] + di)), Math.max(0, Math.min(st.size - 1, st.cursor[1] + dj))]);
      live.textContent = describe(...st.cursor).join(", ");
      draw();
    } else if (ev.key === "Enter" || ev.key === " ") {
      ev.preventDefault();
      open(...st.cursor);
    }
  });
  let ro = null;
  if (typeof ResizeObserver !== "undefined") {
    let last = 0;
    ro = new ResizeObserver(() => { const w = wrap.clientWidth; if (Math.abs(w - last) > 4) { last = w; draw(); } });
    ro.observe(wrap);
  }
  const unhold = ctx.hold.onRelease(() => draw()); // the new order, once let go
  requestAnimationFrame(draw);
  return { el, draw, destroy: () => { if (ro) ro.disconnect(); unhold(); }, state: st, canvas };
}
