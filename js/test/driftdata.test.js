import { test } from "node:test";
import assert from "node:assert/strict";
import {
  DRIFT_SORT_KEYS, beyondChance, binDetail, moveCursor, nextSortKey, sortDriftRows, stripLayout, stripTone, topPairDrift,
} from "../src/driftdata.js";
import { shareText } from "../src/format.js";

const rows = [
  { column: "b", psi: 0.30, psi_chance: 0.25, q_value: 0.2 },
  { column: "a", psi: 0.20, psi_chance: 0.01, q_value: 0.001 },
  { column: "c", psi: null, psi_chance: null, q_value: null },
  { column: "d", psi: 0.20, psi_chance: 0.02, q_value: 0.001 },
];

test("sortDriftRows orders by PSI, beyond chance, q and name; missing numbers last, ties by name", () => {
  const names = (key) => sortDriftRows(rows, key).map((r) => r.column);
  assert.deepEqual(names("psi"), ["b", "a", "d", "c"]);
  assert.deepEqual(names("beyond"), ["a", "d", "b", "c"]); // 0.19, 0.18, 0.05
  assert.deepEqual(names("q"), ["a", "d", "b", "c"]);
  assert.deepEqual(names("name"), ["a", "b", "c", "d"]);
  assert.deepEqual(rows.map((r) => r.column), ["b", "a", "c", "d"], "the input is not reordered");
});

test("beyondChance is psi - psi_chance, or null when either is missing", () => {
  assert.ok(Math.abs(beyondChance(rows[0]) - 0.05) < 1e-12);
  assert.equal(beyondChance(rows[2]), null);
});

test("nextSortKey steps through the keys with arrows (wrapping), Home and End; other keys do nothing", () => {
  assert.equal(nextSortKey("psi", "ArrowRight"), "beyond");
  assert.equal(nextSortKey("psi", "ArrowLeft"), "name");
  assert.equal(nextSortKey("name", "ArrowDown"), "psi");
  assert.equal(nextSortKey("q", "Home"), DRIFT_SORT_KEYS[0]);
  assert.equal(nextSortKey("psi", "End"), "name");
  assert.equal(nextSortKey("psi", "a"), null);
});

test("binDetail takes the axis ends from shown numbers only and counts hidden bins", () => {
  const d = binDetail({ bins: [
    { label: "x", reference_share: 0.5, current_share: 0.7, contribution: 0.1 },
    { label: "y", reference_share: null, current_share: null, contribution: null, hidden: "small" },
    { label: "z", reference_share: 0.2, current_share: 0.1, contribution: 0.05 },
  ] });
  assert.equal(d.shareMax, 0.7);
  assert.equal(d.contribMax, 0.1);
  assert.ok(Math.abs(d.contributionShown - 0.15) < 1e-12);
  assert.equal(d.hidden, 1);
  assert.deepEqual(binDetail({ bins: null }).bins, []);
});

test("topPairDrift keeps the record's order, at most k, and counts the pairs that moved", () => {
  const pairs = Array.from({ length: 14 }, (_, i) => ({ a: `a${i}`, b: "b", flag: i === 3 ? "weaker" : "unchanged" }));
  const t = topPairDrift(pairs, 10);
  assert.equal(t.rows.length, 10);
  assert.equal(t.rows[0].a, "a0");
  assert.equal(t.total, 14);
  assert.equal(t.moved, 1);
  assert.deepEqual(topPairDrift(null), { rows: [], total: 0, moved: 0 });
});

test("stripLayout puts the bars' order first and finds each cell; stripTone colours findings only", () => {
  const over = { periods: [{ period: "p0", is_reference: true }, { period: "p1" }], columns: ["x", "y", "z"],
    cells: [{ column: "y", period: "p1", flag: "major" }, { column: "x", period: "p1", flag: "stable" }, { column: "z", period: "p1", flag: "" }] };
  const s = stripLayout(over, ["z", "gone", "y"]);
  assert.deepEqual(s.columns, ["z", "y", "x"]);
  assert.equal(stripTone(s.cell("y", "p1")), "major");
  assert.equal(stripTone(s.cell("x", "p1")), "calm");
  assert.equal(stripTone(s.cell("z", "p1")), "empty");
  assert.equal(stripTone(s.cell("x", "p0")), "reference");
  assert.equal(stripTone({ flag: "within_chance" }), "calm");
  assert.equal(stripTone({ flag: "moderate" }), "moderate");
});

test("moveCursor stays inside the strip", () => {
  assert.deepEqual(moveCursor([0, 0], "ArrowUp", 3, 4), [0, 0]);
  assert.deepEqual(moveCursor([0, 0], "ArrowDown", 3, 4), [1, 0]);
  assert.deepEqual(moveCursor([2, 3], "ArrowRight", 3, 4), [2, 3]);
  assert.deepEqual(moveCursor([1, 2], "Home", 3, 4), [1, 0]);
  assert.deepEqual(moveCursor([1, 2], "End", 3, 4), [1, 3]);
  assert.equal(moveCursor([1, 2], "x", 3, 4), null);
});

test("shareText: one decimal below 10%, whole percents above", () => {
  assert.equal(shareText(0.034), "3.4%");
  assert.equal(shareText(0.5), "50%");
  assert.equal(shareText(null), "\u2014");
});
