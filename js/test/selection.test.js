import { test } from "node:test";
import assert from "node:assert/strict";
import { cellWords, selectionMax, selectionState, splitSelection } from "../src/selection.js";

// U+2068 / U+2069 around each name and value (UAX #9 first-strong isolate)
const I = (t) => `\u2068${t}\u2069`;

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
  assert.equal(cellWords(cell, false), `${I("weight_lb")} = ${I("2.4")} given ${I("weight_kg")} = ${I("5.3")}`);
  assert.equal(cellWords({ ...cell, value: null, parent_value: null }, true),
    `${I("weight_lb")} = (hidden) given ${I("weight_kg")} = (hidden)`);
  assert.equal(cellWords({ column: "c", value: null, symbol: null, parent: null }, false), `${I("c")} = missing`);
});

test("cellWords keeps a right-to-left override inside its isolate", () => {
  const words = cellWords({ column: "\u202eevil", value: "x", parent: null }, false);
  assert.ok(words.startsWith("\u2068\u202eevil\u2069 = "));
});

test("selectionState tells no target, computing, stale and ready apart", () => {
  const data = { target: "late", method: "mrmr", k: null, rows: [] };
  assert.equal(selectionState(null, { target: null, method: "mrmr", k: null }), "no_target");
  assert.equal(selectionState({ target: null }, { target: null, method: "mrmr", k: null }), "no_target");
  assert.equal(selectionState(data, { target: null, method: "mrmr", k: null }), "no_target"); // target cleared
  assert.equal(selectionState({ target: null }, { target: "late", method: "mrmr", k: null }), "computing");
  assert.equal(selectionState(data, { target: "other", method: "mrmr", k: null }), "computing");
  assert.equal(selectionState(data, { target: "late", method: "jmi", k: null }), "stale");
  assert.equal(selectionState(data, { target: "late", method: "mrmr", k: 3 }), "stale");
  assert.equal(selectionState(data, { target: "late", method: "mrmr", k: null }), "ready");
  assert.equal(selectionState({ ...data, k: 3 }, { target: "late", method: "mrmr", k: 3 }), "ready");
});
