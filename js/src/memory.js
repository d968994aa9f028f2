// What a person was doing in a view, kept per widget model so that a view drawn
// again (an output re-rendered by the notebook, a second view of the same model)
// restores it: which element had keyboard focus, scroll positions of the scrolling
// panels and the information grid's keyboard cursor (by column names, not by
// position). Elements opt in with data-keep="<key>" (focus) and
// data-keep-scroll="<key>" (scroll). A view may keep its own choices under its name
// (the drift panel: `drift`, its sort, open column and strip cursor).

// A focus lost without a new owner (its view was taken down) is given back to the
// next view only within this time; focus the person moved elsewhere stays there.
const REFOCUS_MS = 4000;

export function createMemory() {
  return { focus: null, lostAt: -Infinity, scroll: new Map(), cursor: null, drift: null };
}

// Follow focus and scrolling inside `root` as they happen (a view may be taken
// down before its clean-up runs, when focus has already fallen to the page body).
export function track(memory, root) {
  const keyOf = (el) => (el && el.closest ? el.closest("[data-keep]") : null);
  const onIn = (ev) => { const k = keyOf(ev.target); memory.focus = k ? k.getAttribute("data-keep") : null; memory.lostAt = -Infinity; };
  const onOut = (ev) => {
    if (ev.relatedTarget && !root.contains(ev.relatedTarget)) memory.focus = null; // moved elsewhere on purpose
    else if (!ev.relatedTarget) memory.lostAt = performance.now();
  };
  const onScroll = (ev) => {
    const el = ev.target;
    if (el && el.getAttribute && el.hasAttribute("data-keep-scroll")) memory.scroll.set(el.getAttribute("data-keep-scroll"), [el.scrollTop, el.scrollLeft]);
  };
  root.addEventListener("focusin", onIn);
  root.addEventListener("focusout", onOut);
  root.addEventListener("scroll", onScroll, true);
  return () => {
    root.removeEventListener("focusin", onIn);
    root.removeEventListener("focusout", onOut);
    root.removeEventListener("scroll", onScroll, true);
  };
}

// Save the state of the view under `root` into `memory` (at clean-up).
export function save(memory, root) {
  const active = root.ownerDocument.activeElement;
  const kept = active && root.contains(active) ? active.closest("[data-keep]") : null;
  if (kept) { memory.focus = kept.getAttribute("data-keep"); memory.lostAt = performance.now(); }
  for (const el of root.querySelectorAll("[data-keep-scroll]")) {
    memory.scroll.set(el.getAttribute("data-keep-scroll"), [el.scrollTop, el.scrollLeft]);
  }
}

// Put the saved scroll positions and focus back into the view under `root`; focus
// only when nothing else holds it and it was lost a moment ago.
export function restore(memory, root) {
  for (const el of root.querySelectorAll("[data-keep-scroll]")) {
    const at = memory.scroll.get(el.getAttribute("data-keep-scroll"));
    if (at) { el.scrollTop = at[0]; el.scrollLeft = at[1]; }
  }
  const doc = root.ownerDocument;
  const free = !doc.activeElement || doc.activeElement === doc.body;
  if (memory.focus != null && free && performance.now() - memory.lostAt < REFOCUS_MS) {
    const el = [...root.querySelectorAll("[data-keep]")].find((e) => e.getAttribute("data-keep") === memory.focus);
    if (el && typeof el.focus === "function") el.focus({ preventScroll: true });
  }
}

// Redraw the children of `container` with `redraw` and give keyboard focus back to
// the element with the same data-keep key, if it had focus before; scroll stays.
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
