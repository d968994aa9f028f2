// Number formatting and axis ticks. Pure functions: no DOM.

const DASH = "\u2014"; // shown for a missing or undefined number

export function num(v, digits = 3) {
  if (v == null || !Number.isFinite(v)) return DASH;
  const a = Math.abs(v);
  if (a !== 0 && (a < 0.001 || a >= 1e6)) return v.toExponential(1);
  return String(Number(v.toPrecision(digits)));
}

// a shown estimate in a column of estimates: trailing zeros kept for alignment
export function val(v) { return amount(v, { fixed: true }); }

// An information quantity (entropy, MI, NMI, ...) at the display's precision:
// three significant digits, never finer than 0.001, so rounding noise of a
// constant column (6.4e-16) or a bias-corrected estimate a hair below 0 (-1.9e-5)
// reads "0", and 0.00296 reads "0.003". `fixed` keeps trailing zeros for columns.
export function amount(v, { fixed = false } = {}) {
  if (v == null || !Number.isFinite(v)) return DASH;
  const a = Math.abs(v);
  if (a < 0.0005) return "0";
  if (a >= 1e6) return v.toExponential(2);
  if (a < 0.01) return v.toFixed(3);
  return fixed ? v.toPrecision(3) : String(Number(v.toPrecision(3)));
}

// A p- or q-value in a sentence: "q below 0.001", "q = 0.03", "q not computed".
export function pWords(name, p) {
  if (p == null || !Number.isFinite(p)) return `${name} not computed`;
  return p < 0.001 ? `${name} below 0.001` : `${name} = ${num(p, 2)}`;
}

// A p- or q-value in a table cell or after its label: "below 0.001", "0.03".
export function pShort(p) { return p == null || !Number.isFinite(p) ? DASH : p < 0.001 ? "below 0.001" : num(p, 2); }

// An interval level as a percentage: 0.95 -> "95%", 0.995 -> "99.5%"; the default
// only where the payload does not say.
export function levelText(ci, fallback = 0.95) {
  const v = Number.isFinite(ci) && ci > 0 && ci < 1 ? ci : fallback;
  return `${Number((v * 100).toPrecision(4))}%`;
}

// A signed number for deviations: "+3.2", "−4.1".
export function signed(v, digits = 2) {
  if (v == null || !Number.isFinite(v)) return DASH;
  const t = num(Math.abs(v), digits);
  return t === "0" ? "0" : `${v < 0 ? "−" : "+"}${t}`;
}

// Expected rows under independence, in words.
export function expectedWords(e) {
  if (e == null || !Number.isFinite(e)) return "expected count unknown";
  return `${e < 10 ? num(e, 2) : count(e)} expected`;
}

export function count(v) { return v == null || !Number.isFinite(v) ? DASH : Math.round(v).toLocaleString("en-US"); }
// a share of rows in a table of shares: one decimal below 10% ("3.4%"), whole percent above
export function shareText(v) {
  if (v == null || !Number.isFinite(v)) return DASH;
  return v < 0.1 ? `${(v * 100).toFixed(1)}%` : pct(v);
}
export function pct(v) { return v == null || !Number.isFinite(v) ? DASH : `${Math.round(v * 100)}%`; }

export function tickStep(max, n = 5) {
  const raw = max / n, p = 10 ** Math.floor(Math.log10(raw)), m = raw / p;
  return (m <= 1 ? 1 : m <= 2 ? 2 : m <= 5 ? 5 : 10) * p;
}

// the axis end: the first tick at or above v
export function niceMax(v) {
  if (!(v > 0) || !Number.isFinite(v)) return 1;
  const step = tickStep(v);
  return Number((Math.ceil(v / step - 1e-9) * step).toPrecision(6));
}

export function ticks(max, n = 5) {
  const step = tickStep(max, n);
  const out = [];
  for (let v = 0; v <= max + step * 1e-9; v += step) out.push(Number(v.toPrecision(6)));
  return out;
}

// a position on a bar axis from 0 to max, as a CSS percentage clipped to [0, 100]
export function axisPct(v, max) { return `${Math.max(0, Math.min(100, (v / max) * 100))}%`; }
