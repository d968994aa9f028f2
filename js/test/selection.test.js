import { test } from "node:test";
import assert from "node:assert/strict";
import { cellWords, selectionMax, splitSelection } from "../src/selection.js";

test("splitSelection orders the steps and keeps the left-out columns apart", () => {
  const rows = [{ step: 2, column: "b" }, { step: null, column: "leak" }, { step: 1, column: "a" }];
  const { steps, leftOut } = splitSelection(rows);
  assert.deepEqual(steps.map((r) => r.column), ["a", "b"]);
  assert.deepEqual(leftOut.map((r) => r.column), ["leak"]);
});

test("selectionMax takes the largest finite relevance or gain", () => {
  assert.equal(selectionMax([{ relevance: 0.2, gain: 0.3 }, { relevance: null, gain: NaN }]), 0.3);
  assert.equal(selectionMax([]), 0);
});

test("cellWords says the value given the parent, or hides both", () => {
  const cell = { column: "weight_lb", value: "2.4", symbol: "[2, 3)", parent: "weight_kg", parent_value: "5.3" };
  assert.equal(cellWords(cell, false), "weight_lb = 2.4 given weight_kg = 5.3");
  assert.equal(cellWords({ ...cell, value: null, parent_value: null }, true), "weight_lb = (hidden) given weight_kg = (hidden)");
  assert.equal(cellWords({ column: "c", value: null, symbol: null, parent: null }, false), "c = missing");
});
