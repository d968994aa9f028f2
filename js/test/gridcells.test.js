// How the grid reads a pair (js/src/gridcells.js).
import { test } from "node:test";
import assert from "node:assert/strict";
import { cellReading } from "../src/gridcells.js";

test("only significant pairs with enough rows per cell are findings", () => {
  assert.equal(cellReading({ value: 0.2, q: 0.001, state: "ok" }).kind, "finding");
  assert.equal(cellReading({ value: 0.2, q: 0.001, state: null }).kind, "finding");
  assert.equal(cellReading({ value: 0.2, q: 0.001, state: "sparse" }).kind, "sparse");
  assert.equal(cellReading({ value: 0.2, q: 0.001, state: "too_few" }).kind, "too_few");
  assert.equal(cellReading({ value: 0.2, q: 0.05, alpha: 0.05 }).kind, "not_significant");
  assert.equal(cellReading({ value: 0.2, q: NaN }).kind, "not_significant");
  assert.equal(cellReading({ value: NaN, q: 0.001 }).kind, "unknown");
});

test("an undefined normalised measure reads as undefined, never as 0 or 1", () => {
  const r = cellReading({ value: NaN, q: NaN });
  assert.equal(r.kind, "unknown");
  assert.match(r.text, /undefined/);
});
