// DOM helpers. h(tag, props, ...children): strings become text nodes; props are set
// as properties or attributes; no HTML string is ever parsed, so column names and
// values (data) reach the page only as text.

// Elements that take keyboard focus carry data-lm-suppress-shortcuts: JupyterLab's
// keymap (Lumino) walks up from the focused element and stops at an element with
// that attribute, but matches the focused element itself first, so the attribute
// must sit on the focused element, not only on the view's root. Keys typed into the
// widget then never reach the notebook's command-mode shortcuts.
const FOCUSABLE = new Set(["input", "select", "button", "textarea", "canvas"]);

export function h(tag, props, ...kids) {
  const e = document.createElement(tag);
  if (FOCUSABLE.has(tag) || (props && props.tabindex != null)) e.setAttribute("data-lm-suppress-shortcuts", "true");
  for (const [k, v] of Object.entries(props || {})) {
    if (v == null || v === false) continue;
    if (k === "class") e.className = v;
    else if (k === "text") e.textContent = String(v);
    else if (k === "style") Object.assign(e.style, v);
    else if (k.startsWith("on") && typeof v === "function") e.addEventListener(k.slice(2), v);
    else if (k === "value" || k === "checked" || k === "disabled" || k === "selected") e[k] = v;
    else e.setAttribute(k, v === true ? "" : String(v));
  }
  for (const c of kids.flat(Infinity)) {
    if (c == null || c === false) continue;
    e.append(c instanceof Node ? c : document.createTextNode(String(c)));
  }
  return e;
}

let UID = 0;
export const uid = (p) => `isc-${p}-${++UID}`;

export function clear(el) { while (el.firstChild) el.removeChild(el.firstChild); }

// One tooltip per view root: lines of text near the pointer, kept inside the window.
export function makeTip(root) {
  const el = h("div", { class: "isc-tip", role: "tooltip" });
  root.append(el);
  return {
    el,
    show(lines, x, y) {
      clear(el);
      for (const line of lines) el.append(h("div", null, line));
      el.style.display = "block";
      const w = el.offsetWidth, ht = el.offsetHeight;
      const left = x + 14 + w > window.innerWidth ? x - w - 10 : x + 14;
      const top = y + 14 + ht > window.innerHeight ? y - ht - 10 : y + 14;
      el.style.left = `${Math.max(4, left)}px`;
      el.style.top = `${Math.max(4, top)}px`;
    },
    hide() { el.style.display = "none"; },
  };
}

// Show the tooltip of an element that got keyboard focus, as if hovered.
export function tipOnFocus(target) {
  const b = target.getBoundingClientRect();
  target.dispatchEvent(new MouseEvent("mousemove", { clientX: b.left + 140, clientY: b.bottom - 10 }));
}

// Names are data: a column name may hold right-to-left text or bidi control
// characters (U+202E reverses what follows it) and may be thousands of characters
// long. In plain text (tooltips, titles, aria labels) a name goes between the
// Unicode first-strong isolate and its pop (U+2068 ... U+2069, UAX #9), so it cannot
// reorder the words around it; in the DOM it is a <bdi> (unicode-bidi: isolate)
// cut to its box with an ellipsis, its full text in the title.
export const iso = (name) => `\u2068${String(name)}\u2069`;

export function nameEl(name, { cls = "", max } = {}) {
  const text = String(name);
  return h("bdi", { class: `isc-nm${cls ? ` ${cls}` : ""}`, title: text, style: max ? { maxWidth: max } : null }, text);
}
