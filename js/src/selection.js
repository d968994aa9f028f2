// Pure helpers of the selection and surprising-rows views: no DOM.

// The steps of a selection (rows with a step number, in order) and the columns
// left out (rows without one), from the `_selection` table objects.
export function splitSelection(rows) {
  const steps = rows.filter((r) => r.step != null).sort((a, b) => a.step - b.step);
  const leftOut = rows.filter((r) => r.step == null);
  return { steps, leftOut };
}

// The axis maximum of the relevance and gain bars (0 when nothing is finite).
export function selectionMax(steps) {
  let top = 0;
  for (const r of steps) for (const f of ["relevance", "gain"]) if (Number.isFinite(r[f])) top = Math.max(top, r[f]);
  return top;
}

// What a step's status means, in the view's words.
export const STATUS_WORDS = {
  selected: "chosen", stop: "stop: gain not significant", past_stop: "chosen after the stop (k asked for it)",
  leakage: "left out: may leak the target", constant: "left out: one value", id_like: "left out: an identifier",
};

// What the selection view can show: "no_target" (none is set), "computing" (a target
// is set and no answer for it has come), "stale" (an answer for another method or k
// while the kernel recomputes) or "ready". `data` is the parsed `_selection` record.
export function selectionState(data, { target, method, k }) {
  if (target == null) return "no_target";
  if (!data || data.target == null || String(data.target) !== String(target)) return "computing";
  const same = (data.method == null || data.method === method) && (data.k ?? null) === (k ?? null);
  return same ? "ready" : "stale";
}

// Names and values are data: in plain text (titles, aria labels) each goes between the
// Unicode first-strong isolate and its pop (U+2068 ... U+2069), as dom.iso does.
const isolate = (text) => `\u2068${text}\u2069`;

// A cell of a surprising row in words: "weight_lb = 2.4 given weight_kg = 5.3" (values
// may be hidden: null with hidden = true), every name and value isolated.
export function cellWords(cell, hidden) {
  const v = (x, sym) => (hidden ? "(hidden)" : x != null ? isolate(String(x)) : sym != null ? isolate(String(sym)) : "missing");
  const own = `${isolate(String(cell.column))} = ${v(cell.value, cell.symbol)}`;
  return cell.parent != null ? `${own} given ${isolate(String(cell.parent))} = ${v(cell.parent_value, cell.parent_symbol)}` : own;
}
