// Number formatting and axis ticks. Pure functions: no DOM.

const DASH = "\u2014"; // shown for a missing or undefined number

export function num(v, digits = 3) {
  if (v == null || !Number.isFinite(v)) return DASH;
  const a = Math.abs(v);
  if (a !== 0 && (a < 0.001 || a >= 1e6)) return v.toExponential(1);
  return String(Number(v.toPrecision(digits)));
}

// a shown estimate: three significant digits, trailing zeros kept for alignment
export function val(v) {
  if (v == null || !Number.isFinite(v)) return DASH;
  const a = Math.abs(v);
  if (a !== 0 && (a < 0.001 || a >= 1e6)) return v.toExponential(1);
  return a === 0 ? "0" : v.toPrecision(3);
}

export function count(v) { return v == null || !Number.isFinite(v) ? DASH : Math.round(v).toLocaleString("en-US"); }
export function pval(p) { return p == null || !Number.isFinite(p) ? DASH : p < 0.001 ? "< 0.001" : num(p, 2); }
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
