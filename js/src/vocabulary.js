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
export const FLAG_LABELS = {
  constant: "constant", id_like: "ID-like", mostly_missing: "mostly missing", sparse_cells: "sparse cells",
  heavy_tail: "heavy tail", levels_folded: "levels folded", mixed_types: "mixed types",
  infinite_values: "infinite values", rare_levels: "rare levels", exceeds_log_k: "above log K",
};
export const FLAG_HELP = {
  constant: "one value only: carries no information",
  id_like: "nearly every row distinct: entropy near log n says little",
  mostly_missing: "most rows missing",
  sparse_cells: "fewer than 5 rows per cell on average: estimates unreliable",
  heavy_tail: "heavy tail: equal-width bins would crowd",
  levels_folded: "rare levels folded into one: the grid and pair views use the folded levels, the entropy bar counts every level",
  mixed_types: "values of mixed types",
  infinite_values: "infinite values treated as missing",
  exceeds_log_k: "estimate above log K of the observed levels: the bias correction credits unseen levels; K is a lower bound of the true alphabet",
  rare_levels: "many thin levels (fewer than 5 rows or under 1% each) hold at least 5% of rows",
};
