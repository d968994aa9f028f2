// What an entropy bar marks (js/src/marks.js).
import { test } from "node:test";
import assert from "node:assert/strict";
import { entropyMarks, flagList, logIn } from "../src/marks.js";

test("log N in the view's unit", () => {
  assert.equal(logIn("bits", 1024), 10);
  assert.ok(Math.abs(logIn("nats", Math.E ** 3) - 3) < 1e-12);
  assert.ok(Math.abs(logIn("hartleys", 1000) - 3) < 1e-12);
  assert.ok(Number.isNaN(logIn("furlongs", 10)));
});

test("flags split on commas; unknown flags keep a readable word", () => {
  assert.deepEqual(flagList("id_like, levels_folded,"), ["id_like", "levels_folded"]);
  const m = entropyMarks({ kind: "text", k: 3, n: 10, missing: 0, flags: "brand_new_flag" });
  assert.deepEqual(m.words, ["brand new flag"]);
});

test("quantile-binned numeric and time columns sit at log K by construction, and say so", () => {
  const row = { kind: "numeric", k: 16, n: 500, missing: 0, entropy: 4, max_entropy: 4, flags: "" };
  const m = entropyMarks(row, { strategy: "quantile", bins: 16 });
  assert.equal(m.byConstruction, true);
  assert.equal(m.words[0], "equal-count bins");
  assert.match(m.sentences[0], /log K by construction/);
  assert.equal(entropyMarks(row, { strategy: "uniform" }).byConstruction, false);
  assert.equal(entropyMarks({ ...row, kind: "categorical" }).byConstruction, false);
  assert.equal(entropyMarks({ ...row, kind: "datetime" }).byConstruction, true);
  const tied = entropyMarks({ ...row, k: 11 }, { strategy: "quantile", bins: 16 });
  assert.match(tied.sentences[0], /11 of the 16 bins/);
});

test("log N counts the rows the estimate used; missing share is clipped to [0, 1]", () => {
  const row = { kind: "text", k: 8, n: 800, missing: 606, missing_share: 0.7575, flags: "mostly_missing" };
  assert.equal(entropyMarks(row, { missing: "drop" }).present, 194);
  assert.equal(entropyMarks(row, { missing: "category" }).present, 800);
  assert.equal(entropyMarks(row).missing, 0.7575);
  assert.equal(entropyMarks({ ...row, missing_share: 3 }).missing, 1);
});

test("an estimate above log K is marked even without the flag", () => {
  const m = entropyMarks({ kind: "text", k: 8, n: 100, missing: 0, entropy: 3.01, max_entropy: 3, flags: "" });
  assert.equal(m.overLogK, true);
  assert.equal(entropyMarks({ kind: "text", k: 8, n: 100, missing: 0, entropy: 2.5, max_entropy: 3, flags: "" }).overLogK, false);
});

test("a column its rule put into one bin says so", () => {
  const m = entropyMarks({ kind: "numeric", k: 1, n: 500, missing: 0, entropy: 0, max_entropy: 0, flags: "one_bin" }, { strategy: "knuth" });
  assert.deepEqual(m.words, ["one bin"]);
  assert.match(m.sentences[0], /by the binning/);
  assert.equal(m.byConstruction, false);
});
