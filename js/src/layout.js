// Layout arithmetic of the views, kept apart from the DOM so it can be unit-tested.

// The information grid: cell size and label margin for `size` columns in `avail`
// pixels, given the widest label (pixels). Labels are shown for at most 80 columns
// and dropped when they would leave cells under 9 px; cells are 2 .. 30 px.
export function gridLayout({ avail, size, labelWidth = 0 }) {
  let label = 0;
  if (size && size <= 80) label = Math.min(110, Math.ceil(labelWidth) + 8);
  let cell = Math.floor((avail - label) / Math.max(1, size));
  if (cell < 9) { label = 0; cell = Math.floor(avail / Math.max(1, size)); }
  return { cell: Math.max(2, Math.min(30, cell)), mx: label, my: label };
}

// The grid cell (row i, column j) under a point (x, y) in canvas pixels, or null.
export function cellAt(x, y, { cell, mx, my, size }) {
  const j = Math.floor((x - mx) / cell), i = Math.floor((y - my) / cell);
  return i >= 0 && j >= 0 && i < size && j < size ? [i, j] : null;
}

// The longest prefix of text that, with an ellipsis, fits `width` under `measure`
// (a function text -> pixels, e.g. a canvas context's measureText(...).width).
export function fitText(measure, text, width) {
  text = String(text);
  if (measure(text) <= width) return text;
  let lo = 0, hi = text.length;
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (measure(text.slice(0, mid) + "\u2026") <= width) lo = mid; else hi = mid - 1;
  }
  return text.slice(0, lo) + "\u2026";
}

// A row-major size x size matrix `values` over `names`, rearranged to the order of
// `order` (the same names in another order); null when the two name sets differ.
export function reorderSquare(values, names, order) {
  const n = names.length;
  if (!values || order.length !== n || values.length !== n * n) return null;
  const at = new Map(names.map((name, i) => [name, i]));
  const idx = order.map((name) => at.get(name));
  if (idx.some((i) => i === undefined) || new Set(idx).size !== n) return null;
  const out = new values.constructor(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[i * n + j] = values[idx[i] * n + idx[j]];
  return out;
}
