// render({model, el}, memory): draws the view named by the model's `_view` trait and
// returns the clean-up function anywidget calls when the view goes away (which saves
// focus and scroll into `memory` for the next view of the same model).
import { h } from "./dom.js";
import { createMemory, restore, save, track } from "./memory.js";
import { makeCtx } from "./context.js";
import { ESTIMATOR_LABELS } from "./vocabulary.js";
import { controlsView } from "./controls.js";
import { entropyView } from "./views/entropy.js";
import { gridView } from "./views/grid.js";
import { pairView } from "./views/pair.js";
import { relevanceView } from "./views/relevance.js";
import { driftView } from "./views/drift.js";
import { selectionView } from "./views/selection.js";
import { surprisingView } from "./views/surprising.js";
import { statusView, cautionView } from "./views/status.js";

export function render({ model, el }, memory = createMemory()) {
  // data-lm-suppress-shortcuts on the root and on every focusable element (dom.js):
  // keys typed into the widget never reach the notebook's command-mode shortcuts
  const root = h("div", { class: "isc-root", "data-lm-suppress-shortcuts": "true" });
  el.append(root);
  const ctx = makeCtx(model, root);
  ctx.memory = memory;
  const untrack = track(memory, root);
  const view = model.get("_view") || "profile";
  const status = statusView(ctx, () => model.send({ type: "cancel" }));
  const parts = {};
  const header = h("div", { class: "isc-head" },
    h("span", { class: "isc-title" }, view === "profile" ? "Information profile" : ""),
    h("span", { class: "isc-sub" }), status.el);
  root.append(header, status.err);
  if (view === "profile") {
    parts.controls = controlsView(ctx);
    parts.entropy = entropyView(ctx);
    parts.grid = gridView(ctx);
    parts.pair = pairView(ctx);
    parts.relevance = relevanceView(ctx);
    parts.drift = driftView(ctx); // hidden unless the profile has a reference (_drift)
    root.append(parts.controls.el, h("div", { class: "isc-row" }, parts.entropy.el, parts.grid.el),
      h("div", { class: "isc-row" }, parts.pair.el, parts.relevance.el), h("div", { class: "isc-row" }, parts.drift.el));
    // the selection view shows itself when a target is set (the kernel sends it after
    // the other parts); the surprising rows travel in exports
    parts.selection = selectionView(ctx, { onlyWithTarget: true });
    const extra = [parts.selection.el];
    if (model.get("_surprising")) { parts.surprising = surprisingView(ctx); extra.push(parts.surprising.el); }
    root.append(h("div", { class: "isc-row" }, ...extra));
  } else {
    const make = { entropy: entropyView, grid: gridView, pair: pairView, relevance: relevanceView, drift: driftView,
      selection: selectionView, surprising: surprisingView }[view] || entropyView;
    parts[view] = make(ctx);
    if (view === "pair") { parts.grid = null; }
    root.append(h("div", { class: "isc-row" }, parts[view].el));
  }
  parts.caution = cautionView(ctx);
  root.append(parts.caution.el);
  const sub = header.querySelector(".isc-sub");
  const drawSub = () => {
    const meta = model.get("_meta") || {};
    sub.textContent = `${(meta.names || []).length} columns \u00b7 ${ESTIMATOR_LABELS[model.get("estimator")] || model.get("estimator")} \u00b7 ${model.get("unit")}`;
  };
  drawSub();

  // batch redraws of one frame: a hold_sync update arrives as several change events
  const dirty = new Set();
  let frame = 0;
  const schedule = (...names) => {
    for (const n of names) dirty.add(n);
    if (frame) return;
    frame = requestAnimationFrame(() => {
      frame = 0;
      const todo = [...dirty];
      dirty.clear();
      for (const n of todo) if (n === "sub") drawSub(); else if (parts[n]) parts[n].draw ? parts[n].draw() : parts[n].sync();
    });
  };
  const wiring = {
    _entropy: ["entropy", "caution", "controls"], sort_by: ["entropy"], selected_column: ["entropy", "controls"],
    _grid_meta: ["grid"], _grid_values: ["grid"], _grid_n: ["grid"], _grid_q: ["grid"], order: ["grid", "controls"],
    selected_pair: ["grid", "pair"], _pair: ["pair"], _relevance: ["relevance"], _drift: ["drift"], _drift_over: ["drift"], _status: ["status", "caution"],
    _meta: ["caution", "sub"], alpha_fdr: ["grid", "relevance"],
    _selection: ["selection"], selection_method: ["selection"], selection_k: ["selection"], _surprising: ["surprising"],
  };
  for (const k of ["bins", "strategy", "estimator", "alpha", "measure", "unit", "target", "missing", "column_bins", "min_count"]) {
    wiring[k] = ["controls", "sub", ...(k === "target" ? ["relevance", "selection"] : [])];
  }
  parts.status = status;
  const handlers = [];
  for (const [name, targets] of Object.entries(wiring)) {
    const cb = () => schedule(...targets);
    model.on(`change:${name}`, cb);
    handlers.push([`change:${name}`, cb]);
  }
  // controls sync is a method named sync, not draw
  if (parts.controls) parts.controls.draw = parts.controls.sync;
  requestAnimationFrame(() => requestAnimationFrame(() => restore(memory, root)));
  return () => {
    save(memory, root);
    untrack();
    ctx.hold.stop();
    for (const [evt, cb] of handlers) model.off(evt, cb);
    for (const part of Object.values(parts)) if (part && part.destroy) part.destroy();
    if (frame) cancelAnimationFrame(frame);
    root.remove();
  };
}
