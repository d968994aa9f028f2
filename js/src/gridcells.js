// How the information grid reads one pair: a finding (significant after
// Benjamini-Hochberg and enough rows per cell), or why not. The view colours only
// findings in full; the rest are muted or grey, and the legend says which is which.
// Pure function.

// value: the measure; q: BH q-value; alpha: the FDR level; state: the pair's
// reliability ("ok" | "sparse" | "too_few", null when the kernel did not say).
export function cellReading({ value, q, alpha = 0.05, state = null }) {
  // NaN off the diagonal: not computed, or a normalised measure that is undefined
  // because a column has no entropy on the pair's rows (0/0, never 0 or 1)
  if (value == null || !Number.isFinite(value)) return { kind: "unknown", text: "undefined or not computed (e.g. a column with no entropy on these rows)" };
  if (state === "too_few") return { kind: "too_few", text: "too few rows to tell anything: not a finding" };
  if (state === "sparse") return { kind: "sparse", text: "few rows per cell (under 5 on average): muted, read as rough" };
  if (!(q < alpha)) return { kind: "not_significant", text: "not significant after BH: as much as chance gives" };
  return { kind: "finding", text: "significant after BH" };
}
