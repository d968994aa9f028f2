// Layout arithmetic of the views (js/src/layout.js).
import { test } from "node:test";
import assert from "node:assert/strict";
import { cellAt, fitText, gridLayout, reorderSquare } from "../src/layout.js";

test("grid cells fill the width left after the label margin, within 2 .. 30 px", () => {
  assert.deepEqual(gridLayout({ avail: 520, size: 17, labelWidth: 60 }), { cell: 26, mx: 68, my: 68 });
  assert.equal(gridLayout({ avail: 520, size: 3, labelWidth: 20 }).cell, 30);
  assert.equal(gridLayout({ avail: 200, size: 400 }).cell, 2);
});

test("labels are capped at 110 px, dropped above 80 columns or when cells would be under 9 px", () => {
  assert.equal(gridLayout({ avail: 900, size: 10, labelWidth: 500 }).mx, 110);
  assert.equal(gridLayout({ avail: 2000, size: 81, labelWidth: 40 }).mx, 0);
  const tight = gridLayout({ avail: 400, size: 40, labelWidth: 100 });
  assert.equal(tight.mx, 0);
  assert.equal(tight.cell, 10);
});

test("the cell under a point: row from y, column from x, null outside", () => {
  const L = { cell: 10, mx: 50, my: 50, size: 4 };
  assert.deepEqual(cellAt(55, 75, L), [2, 0]);
  assert.deepEqual(cellAt(89.9, 50, L), [0, 3]);
  assert.equal(cellAt(49, 60, L), null);
  assert.equal(cellAt(95, 60, L), null);
});

test("fitText keeps the longest prefix that fits with an ellipsis", () => {
  const mono = (t) => t.length * 10; // 10 px per character
  assert.equal(fitText(mono, "short", 100), "short");
  assert.equal(fitText(mono, "a much longer name", 60), "a muc\u2026");
  assert.equal(fitText(mono, "x".repeat(5000), 30).length, 3);
  assert.equal(fitText(mono, "abc", 5), "\u2026");
});

test("a square matrix rearranged to another order of the same names", () => {
  const v = Float32Array.from([0, 1, 2, 10, 11, 12, 20, 21, 22]); // rows a, b, c
  const out = reorderSquare(v, ["a", "b", "c"], ["c", "a", "b"]);
  assert.deepEqual([...out], [22, 20, 21, 2, 0, 1, 12, 10, 11]);
  assert.ok(out instanceof Float32Array);
  assert.equal(reorderSquare(v, ["a", "b", "c"], ["a", "b", "d"]), null);
  assert.equal(reorderSquare(v, ["a", "b", "c"], ["a", "b"]), null);
});
