// Pure helpers of the drift panel: sorting the column bars, the detail of one column's
// bins, the relationship-drift list and the column x period strip. No DOM.

// A column's flag that counts as a finding (the record's verdict: significant and
// beyond chance by at least the common-practice bands).
export const DRIFT_FINDINGS = new Set(["major", "moderate"]);
// A pair's flag that counts as moved (significant after Benjamini-Hochberg).
export const PAIR_MOVED = new Set(["stronger", "weaker"]);

// The orders of the column bars, in the order the control offers them.
export const DRIFT_SORTS = [
  ["psi", "PSI"],
  ["beyond", "PSI beyond chance"],
  ["q", "q-value"],
  ["name", "name"],
];
export const DRIFT_SORT_KEYS = DRIFT_SORTS.map(([k]) => k);

const finite = (v) => typeof v === "number" && Number.isFinite(v);

// PSI beyond what sampling alone gives (psi - psi_chance), the number the flag reads.
export function beyondChance(r) {
  return r && finite(r.psi) && finite(r.psi_chance) ? r.psi - r.psi_chance : null;
}

const byName = (a, b) => String(a.column).localeCompare(String(b.column));

// The column records sorted by `key` (one of DRIFT_SORT_KEYS): PSI and PSI beyond
// chance from the largest, q from the smallest, names A-Z; a number that is missing
// goes last; ties by name. Returns a new array.
export function sortDriftRows(rows, key) {
  const out = [...(rows || [])];
  if (key === "name") return out.sort(byName);
  const value = key === "beyond" ? beyondChance : key === "q" ? (r) => r.q_value : (r) => r.psi;
  const sign = key === "q" ? 1 : -1;
  return out.sort((a, b) => {
    const va = value(a), vb = value(b);
    const fa = finite(va), fb = finite(vb);
    if (fa !== fb) return fa ? -1 : 1;
    if (fa && va !== vb) return sign * (va - vb);
    return byName(a, b);
  });
}

// The next sort key for a key press on the sort control (arrows wrap; Home/End).
export function nextSortKey(key, press) {
  const keys = DRIFT_SORT_KEYS, i = Math.max(0, keys.indexOf(key));
  if (press === "ArrowRight" || press === "ArrowDown") return keys[(i + 1) % keys.length];
  if (press === "ArrowLeft" || press === "ArrowUp") return keys[(i - 1 + keys.length) % keys.length];
  if (press === "Home") return keys[0];
  if (press === "End") return keys[keys.length - 1];
  return null;
}

// The detail of one column: its bins (label, both shares, contribution, hidden) and
// the axis ends of the share bars and of the contribution bars. Hidden bins keep
// their place with null numbers (the record already hid them: nothing is derived).
export function binDetail(column) {
  const bins = Array.isArray(column && column.bins) ? column.bins : [];
  let shareMax = 0, contribMax = 0, shown = 0, hidden = 0;
  for (const b of bins) {
    for (const v of [b.reference_share, b.current_share]) if (finite(v)) shareMax = Math.max(shareMax, v);
    if (finite(b.contribution)) { contribMax = Math.max(contribMax, b.contribution); shown += b.contribution; }
    if (b.hidden) hidden += 1;
  }
  return { bins, shareMax, contribMax, contributionShown: shown, hidden };
}

// The pairs to list: the record's order (most changed first: by p-value, then by
// the size of the change), at most `k`, and whether any moved beyond chance.
export function topPairDrift(pairs, k = 10) {
  const list = Array.isArray(pairs) ? pairs : [];
  return { rows: list.slice(0, k), total: list.length, moved: list.filter((p) => PAIR_MOVED.has(p.flag)).length };
}

// The column x period strip of the `_drift_over` part: periods in order, the
// columns in `order` first (the bars' order) then the others, and the cell of
// every (column, period) (undefined for the reference period, which has none).
export function stripLayout(over, order = []) {
  const periods = Array.isArray(over && over.periods) ? over.periods : [];
  const cells = Array.isArray(over && over.cells) ? over.cells : [];
  const names = Array.isArray(over && over.columns) ? over.columns.map(String) : [];
  const known = new Set(names);
  const columns = [...order.map(String).filter((c) => known.has(c)), ...names.filter((c) => !order.map(String).includes(c))];
  const at = new Map();
  for (const c of cells) at.set(`${c.column}\u0000${c.period}`, c);
  const cell = (column, period) => at.get(`${column}\u0000${period}`);
  return { periods, columns, cell };
}

// What a strip cell shows: "major" / "moderate" (coloured), "calm" (compared, not a
// finding), "empty" (a period without rows, or not compared), "reference" (none).
export function stripTone(c) {
  if (!c) return "reference";
  if (DRIFT_FINDINGS.has(c.flag)) return c.flag;
  return c.flag ? "calm" : "empty";
}

// The strip's cursor moved by a key: [row, column] kept inside rows x cols.
export function moveCursor([r, c], key, rows, cols) {
  const clamp = (v, n) => Math.max(0, Math.min(n - 1, v));
  if (key === "ArrowUp") return [clamp(r - 1, rows), c];
  if (key === "ArrowDown") return [clamp(r + 1, rows), c];
  if (key === "ArrowLeft") return [r, clamp(c - 1, cols)];
  if (key === "ArrowRight") return [r, clamp(c + 1, cols)];
  if (key === "Home") return [r, 0];
  if (key === "End") return [r, Math.max(0, cols - 1)];
  return null;
}
