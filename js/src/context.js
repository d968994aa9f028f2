// What every view shares: the model, the root element, the tooltip, and helpers
// to read and write traits.
import { makeTip } from "./dom.js";
import { parseJSON } from "./decode.js";

// How long after the last touch of a control it still counts as "being moved"
// (keyboard repeats, a slider dragged in small steps).
export const HOLD_MS = 900;

export function makeCtx(model, root) {
  const offline = !!model.get("_offline");
  // a control is being moved: the grid keeps its column order until it is let go
  let pressed = 0, last = -Infinity, timer = 0;
  const released = new Set();
  const settle = () => {
    clearTimeout(timer);
    timer = setTimeout(() => { if (!pressed) for (const cb of [...released]) cb(); }, HOLD_MS + 20);
  };
  const hold = {
    touch() { last = performance.now(); settle(); },
    press() { pressed++; last = performance.now(); },
    release() { pressed = Math.max(0, pressed - 1); last = performance.now(); settle(); },
    active() { return pressed > 0 || performance.now() - last < HOLD_MS; },
    onRelease(cb) { released.add(cb); return () => released.delete(cb); },
    stop() { clearTimeout(timer); released.clear(); },
  };
  return {
    model, root, offline, tip: makeTip(root), hold,
    get: (k) => model.get(k),
    set(k, v) { model.set(k, v); model.save_changes(); },
    unit() { return model.get("unit") || "bits"; },
    entropy() { return parseJSON(model.get("_entropy")); },
  };
}
