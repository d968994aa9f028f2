// What every view shares: the model, the root element, the tooltip, and helpers
// to read and write traits.
import { makeTip } from "./dom.js";
import { parseJSON } from "./decode.js";

export function makeCtx(model, root) {
  const offline = !!model.get("_offline");
  return {
    model, root, offline, tip: makeTip(root),
    get: (k) => model.get(k),
    set(k, v) { model.set(k, v); model.save_changes(); },
    unit() { return model.get("unit") || "bits"; },
    entropy() { return parseJSON(model.get("_entropy")); },
  };
}
