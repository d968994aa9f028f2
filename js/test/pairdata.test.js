// The data of a pair view (js/src/pairdata.js).
import { test } from "node:test";
import assert from "node:assert/strict";
import { choosePair, expectedCounts, maxAbs, pairKey, residuals, transposeView } from "../src/pairdata.js";

const view = {
  a: "colour", b: "size", rows: ["red", "blue"], cols: ["S", "M", "L"],
  counts: [[10, 0, 5], [20, 30, 35]], pmi: [[0.1, null, -0.2], [0.0, 0.3, 0.1]],
  hidden_reasons: null, row_totals: [15, 85], col_totals: [30, 30, 40], n: 100,
};

test("a view turned round swaps rows and columns, cell by cell", () => {
  const t = transposeView(view);
  assert.equal(t.a, "size"); assert.equal(t.b, "colour");
  assert.deepEqual(t.rows, ["S", "M", "L"]); assert.deepEqual(t.cols, ["red", "blue"]);
  assert.deepEqual(t.counts, [[10, 20], [0, 30], [5, 35]]);
  assert.deepEqual(t.pmi[1], [null, 0.3]);
  assert.deepEqual(t.row_totals, [30, 30, 40]); assert.deepEqual(t.col_totals, [15, 85]);
  assert.deepEqual(transposeView(t), view);
});

test("the pair opens in the orientation it was asked for, live or saved", () => {
  assert.equal(choosePair(["colour", "size"], view, {}).view, view);
  const flipped = choosePair(["size", "colour"], view, {});
  assert.equal(flipped.view.a, "size");
  assert.deepEqual(flipped.view.counts[0], [10, 20]);
  const saved = choosePair(["size", "colour"], {}, { [pairKey("colour", "size")]: view });
  assert.equal(saved.view.a, "size"); assert.equal(saved.pending, false);
  const waiting = choosePair(["x", "y"], view, {});
  assert.equal(waiting.pending, true); assert.equal(waiting.view, view);
});

test("expected counts are row total x column total / n; unknown when the margins are hidden", () => {
  const E = expectedCounts(view);
  assert.deepEqual(E[0], [4.5, 4.5, 6]);
  assert.equal(expectedCounts({ ...view, row_totals: null }), null);
});

test("an empty cell where many rows were expected is the most surprising cell", () => {
  // one row of a large table: 0 observed where 2,300 are expected under independence
  const big = { counts: [[0, 4600], [4600, 0]], row_totals: [4600, 4600], col_totals: [4600, 4600] };
  const z = residuals(big);
  assert.ok(Math.abs(z[0][0] + Math.sqrt(2300)) < 1e-9, String(z[0][0]));
  // pointwise MI cannot rank empty cells (minus infinity for all); residuals can:
  // (red, M) holds 0 where 15 x 30 / 100 = 4.5 were expected: -4.5 / sqrt(4.5)
  const z2 = residuals(view);
  assert.ok(Math.abs(z2[0][1] + Math.sqrt(4.5)) < 1e-12);
  assert.ok(Math.abs(z2[0][0] - 5.5 / Math.sqrt(4.5)) < 1e-12);
  assert.equal(maxAbs(z2), Math.abs(z2[0][0]));
  assert.equal(maxAbs([[null]]), 1);
});

test("the kernel's expected counts are used when sent; the test is said in words", async () => {
  const { testWords } = await import("../src/pairdata.js");
  assert.deepEqual(expectedCounts({ ...view, expected: [[1, 2, 3], [4, 5, 6]] })[1], [4, 5, 6]);
  assert.equal(testWords({ p_method: "permutation", n_permutations: 9999, p_error: 0.00312 }),
    "permutation test, 9,999 shuffles, Monte-Carlo error of p \u00b10.0031");
  assert.match(testWords({ p_method: "chi2" }), /Williams/);
  assert.equal(testWords({}), "");
});
