// The words the views use for settings, measures and flags: one place for each label.

export const ESTIMATOR_LABELS = {
  plugin: "plug-in", miller_madow: "Miller\u2013Madow", chao_shen: "Chao\u2013Shen",
  james_stein: "James\u2013Stein shrinkage", dirichlet: "Dirichlet pseudocount",
  grassberger: "Grassberger", nsb: "NSB",
};
export const MEASURE_LABELS = { mi: "mutual information", nmi: "normalised MI", adjusted_mi: "MI adjusted for chance", vi: "variation of information" };
export const MEASURE_SHORT = { mi: "MI", nmi: "NMI", adjusted_mi: "AMI", vi: "VI" };
export const HAS_UNIT = { mi: true, vi: true };
export const STRATEGY_LABELS = {
  quantile: "quantile bins", uniform: "equal-width bins", fd: "Freedman\u2013Diaconis rule", scott: "Scott rule",
  sturges: "Sturges rule", doane: "Doane rule", rice: "Rice rule", sqrt: "square-root rule",
  stone: "Stone rule", auto: "auto rule", knuth: "Knuth rule",
};
export const MISSING_LABELS = { drop: "leave out missing", category: "missing as a value" };
export const ORDER_LABELS = { cluster: "by similarity", name: "by name" };
export const SORT_LABELS = { entropy: "entropy", name: "name", efficiency: "efficiency", missing_share: "missing share" };
// Per-column notes, in the product's information vocabulary. WORDS are the short
// notes beside a bar; SENTENCES say on hover what each one means for the numbers.
export const FLAG_WORDS = {
  constant: "no information", id_like: "near log N", mostly_missing: "mostly missing",
  sparse_cells: "few rows per level", heavy_tail: "long tail", levels_folded: "levels merged",
  mixed_types: "mixed value types", infinite_values: "\u00b1\u221e as missing", rare_levels: "thin levels",
  exceeds_log_k: "above log K", one_bin: "one bin",
};
export const FLAG_HELP = {
  constant: "One value only: the column carries no information (H = 0).",
  id_like: "Nearly every row has its own value: the entropy sits near log N, the most N rows can show, and says little about the column.",
  mostly_missing: "Most rows are missing: the estimate rests on the few that are present.",
  sparse_cells: "Fewer than 5 rows per level on average: the estimate is unreliable.",
  heavy_tail: "A long tail: equal-width bins would crowd most rows into a few bins.",
  levels_folded: "Rare levels were merged into one: the grid and pair views use the merged levels; the bar counts every level.",
  mixed_types: "The values are of mixed types (e.g. numbers and text).",
  infinite_values: "Infinite values were treated as missing.",
  exceeds_log_k: "The estimate is above log K of the levels seen: the bias correction credits levels not seen, so K is a lower bound of the true alphabet.",
  rare_levels: "Many thin levels (fewer than 5 rows or under 1% each) hold at least 5% of the rows.",
  one_bin: "The binning rule put every value into one bin: the entropy is 0 by the binning, not by the data, and normalised measures are undefined. Choose more bins or another rule.",
};
// a numeric column cut into equal-count (quantile) bins: log K by construction
export const BY_CONSTRUCTION_WORD = "equal-count bins";

// How far a pair's table can be trusted (the `reliability` of pairs and relevance):
// the rule lives in the Python core; these are its words.
export const RELIABILITY_WORDS = { ok: "", sparse: "few rows per cell", too_few: "too few rows to tell" };
export const RELIABILITY_HELP = {
  sparse: "Few rows per cell of the joint table (1 to 5 on average): read the number as rough.",
  too_few: "Too few rows for this table to tell anything: the number is not a finding.",
};
// the reliability of a row, from `reliability` or the older boolean `sparse`
export function reliabilityOf(r) {
  if (r && typeof r.reliability === "string") return r.reliability;
  return r && r.sparse ? "sparse" : "ok";
}
