// What a person was doing in a view, kept per widget model so that a view drawn
// again (a re-rendered output, a second view of the same model) restores it:
// which element had keyboard focus, scroll positions of the scrolling panels and
// the information grid's keyboard cursor (by column names, not by position).
// Elements opt in with data-keep="<stable key>".

export function createMemory() {
  return { focus: null, scroll: new Map(), cursor: null };
}

// Save the state of the view under `root` into `memory`.
export function save(memory, root) {
  const active = root.ownerDocument.activeElement;
  const kept = active && root.contains(active) ? active.closest("[data-keep]") : null;
  memory.focus = kept ? kept.getAttribute("data-keep") : memory.focus;
  for (const el of root.querySelectorAll("[data-keep-scroll]")) {
    memory.scroll.set(el.getAttribute("data-keep-scroll"), [el.scrollTop, el.scrollLeft]);
  }
}

// Put the saved scroll positions and focus back into the view under `root`.
export function restore(memory, root) {
  for (const el of root.querySelectorAll("[data-keep-scroll]")) {
    const at = memory.scroll.get(el.getAttribute("data-keep-scroll"));
    if (at) { el.scrollTop = at[0]; el.scrollLeft = at[1]; }
  }
  if (memory.focus != null) {
    const el = [...root.querySelectorAll("[data-keep]")].find((e) => e.getAttribute("data-keep") === memory.focus);
    if (el && typeof el.focus === "function") el.focus({ preventScroll: true });
  }
}

// Redraw the children of `container` with `redraw` and give keyboard focus back to
// the element with the same data-keep key, if it had focus before.
export function keepFocus(container, redraw) {
  const doc = container.ownerDocument;
  const active = doc.activeElement;
  const kept = active && container.contains(active) ? active.closest("[data-keep]") : null;
  const key = kept ? kept.getAttribute("data-keep") : null;
  const top = container.scrollTop, left = container.scrollLeft;
  redraw();
  if (container.scrollTop !== top) container.scrollTop = top;
  if (container.scrollLeft !== left) container.scrollLeft = left;
  if (key == null) return;
  const again = [...container.querySelectorAll("[data-keep]")].find((e) => e.getAttribute("data-keep") === key);
  if (again) again.focus({ preventScroll: true });
}
