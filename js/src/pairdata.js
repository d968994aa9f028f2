// The data of a pair view, apart from the DOM: which saved or live view answers a
// selected pair, the same view seen the other way round, and how far each cell is
// from independence. Pure functions.

export function pairKey(a, b) { return `${a}\u0000${b}`; }

const T = (m) => (Array.isArray(m) && m.length ? m[0].map((_, j) => m.map((row) => (row ? row[j] : null))) : m);

// The pair (b, a) of a view of (a, b): rows and columns swap, so the view always
// shows the pair in the orientation it was asked for (row = first name).
export function transposeView(view) {
  if (!view) return view;
  return {
    ...view, a: view.b, b: view.a, rows: view.cols, cols: view.rows,
    counts: T(view.counts), pmi: T(view.pmi), hidden_reasons: view.hidden_reasons ? T(view.hidden_reasons) : view.hidden_reasons,
    row_totals: view.col_totals, col_totals: view.row_totals,
    ...(view.expected ? { expected: T(view.expected) } : {}),
  };
}

// The view to show for the selected pair [a, b]: the kernel's live answer or a saved
// one (pair_cache), turned to the asked orientation; `pending` while none matches.
export function choosePair(selected, live, cache) {
  live = live || {};
  cache = cache || {};
  if (!Array.isArray(selected)) return { view: live.a != null ? live : null, pending: false };
  const [a, b] = selected;
  if (live.a === a && live.b === b) return { view: live, pending: false };
  if (live.a === b && live.b === a) return { view: transposeView(live), pending: false };
  if (cache[pairKey(a, b)]) return { view: cache[pairKey(a, b)], pending: false };
  if (cache[pairKey(b, a)]) return { view: transposeView(cache[pairKey(b, a)]), pending: false };
  return { view: live.a != null ? live : null, pending: true, wanted: selected };
}

// Expected counts under independence, r_i c_j / n: the kernel's `expected` when it
// sent them, else from the margins; null when neither is shown (a view with hidden
// cells drops both on purpose: they would give the hidden counts back).
export function expectedCounts(view) {
  if (view && Array.isArray(view.expected) && view.expected.length) return view.expected; // the kernel's own
  const r = view && view.row_totals, c = view && view.col_totals;
  if (!Array.isArray(r) || !Array.isArray(c)) return null;
  const n = r.reduce((s, v) => s + (v || 0), 0);
  if (!(n > 0)) return null;
  return r.map((ri) => c.map((cj) => ((ri || 0) * (cj || 0)) / n));
}

// Standardised residuals (O - E) / sqrt(E) of the shown cells (common practice for
// reading a contingency table): a zero cell where many rows were expected is far
// from 0, unlike its pointwise MI, which is -infinity for every empty cell.
// null where a cell is hidden or E = 0.
export function residuals(view) {
  const E = expectedCounts(view);
  if (!E) return null;
  return view.counts.map((row, i) => row.map((o, j) => (o == null || !(E[i][j] > 0) ? null : (o - E[i][j]) / Math.sqrt(E[i][j]))));
}

// The largest |value| of a matrix with nulls (1 when there is none), the end of a
// symmetric colour scale.
export function maxAbs(m) {
  let top = 0;
  for (const row of m || []) for (const v of row || []) if (v != null && Number.isFinite(v)) top = Math.max(top, Math.abs(v));
  return top || 1;
}

// The test behind a pair's p-value, in words: the method, its size and its
// Monte-Carlo error where it has one.
export function testWords(view) {
  const m = view && view.p_method;
  if (m === "permutation") {
    const n = Number.isFinite(view.n_permutations) ? view.n_permutations.toLocaleString("en-US") : "?";
    const err = Number.isFinite(view.p_error) && view.p_error > 0 ? `, Monte-Carlo error of p \u00b1${Number(view.p_error.toPrecision(2))}` : "";
    return `permutation test, ${n} shuffles${err}`;
  }
  if (m === "chi2") return "G-test against chi-square (Williams' correction)";
  if (m === "none") return "no test: nothing to compare";
  return "";
}
