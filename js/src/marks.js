// What the entropy bar of one column marks in its own geometry: where the estimate
// stands against log K (the most K levels can hold) and log N (the most N rows can
// show), how much of the column is missing, and whether log K is reached by
// construction (quantile bins hold equal counts). Pure functions.
import { BY_CONSTRUCTION_WORD, FLAG_HELP, FLAG_WORDS } from "./vocabulary.js";

// kinds whose levels are bins cut by the binning strategy
const BINNED_KINDS = new Set(["numeric", "datetime", "timedelta"]);
const LOG_OF_UNIT = { bits: Math.LN2, nats: 1, hartleys: Math.LN10 };

// log of n rows in the view's unit (NaN for an unknown unit or n < 1)
export function logIn(unit, n) {
  const base = LOG_OF_UNIT[unit];
  return base && n >= 1 ? Math.log(n) / base : NaN;
}

export function flagList(flags) { return String(flags || "").split(",").map((s) => s.trim()).filter(Boolean); }

// The marks of one entropy row. `strategy` and `bins` are the binning settings
// (a per-column bin count in `bins` when set); `unit` the view's unit.
export function entropyMarks(row, { unit = "bits", strategy = "quantile", bins = null, missing = "drop" } = {}) {
  const flags = flagList(row.flags);
  // n counts every row; missing rows are left out of the estimate under "drop"
  const present = Math.max(0, (row.n || 0) - (missing === "drop" ? row.missing || 0 : 0));
  const logN = logIn(unit, present);
  const byConstruction = BINNED_KINDS.has(row.kind) && strategy === "quantile" && row.k > 1;
  const words = flags.map((f) => FLAG_WORDS[f] || f.replace(/_/g, " "));
  const sentences = flags.map((f) => FLAG_HELP[f] || f.replace(/_/g, " "));
  if (byConstruction) {
    words.unshift(BY_CONSTRUCTION_WORD);
    const asked = Number.isFinite(bins) ? bins : null;
    sentences.unshift(`Cut into ${row.k} equal-count (quantile) bins, so its entropy sits at log K by construction: `
      + "the bar says how finely the column was cut, not how much it varies. "
      + (asked && row.k < asked ? `Tied values left ${row.k} of the ${asked} bins asked. ` : "")
      + "What such a column tells about the others shows in the grid and the relevance view.");
  }
  return {
    flags, words, sentences, byConstruction, present,
    logN: Number.isFinite(logN) ? logN : null,
    missing: Number.isFinite(row.missing_share) ? Math.max(0, Math.min(1, row.missing_share)) : 0,
    overLogK: flags.includes("exceeds_log_k") || (Number.isFinite(row.entropy) && Number.isFinite(row.max_entropy) && row.entropy > row.max_entropy + 1e-9),
    nearLogN: flags.includes("id_like"),
  };
}
