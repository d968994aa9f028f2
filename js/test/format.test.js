// Number wording and axis ticks (js/src/format.js).
import { test } from "node:test";
import assert from "node:assert/strict";
import { axisPct, count, niceMax, num, pct, pval, tickStep, ticks, val } from "../src/format.js";

test("missing or undefined numbers show a dash", () => {
  for (const f of [num, val, count, pval, pct]) for (const v of [null, undefined, NaN, Infinity]) assert.equal(f(v), "\u2014");
});

test("num keeps three significant digits and drops trailing zeros", () => {
  assert.equal(num(1.23456), "1.23");
  assert.equal(num(2), "2");
  assert.equal(num(0.5), "0.5");
  assert.equal(num(1234.5), "1230");
});

test("val keeps trailing zeros so a column of estimates aligns", () => {
  assert.equal(val(2), "2.00");
  assert.equal(val(0.5), "0.500");
  assert.equal(val(0), "0");
});

test("counts are grouped by thousands; shares are whole percentages", () => {
  assert.equal(count(1234567.4), "1,234,567");
  assert.equal(pct(0.256), "26%");
});

test("ticks run from 0 in steps of 1, 2 or 5 times a power of ten", () => {
  assert.equal(tickStep(4), 1);
  assert.equal(tickStep(0.9), 0.2);
  assert.equal(tickStep(23), 5);
  assert.deepEqual(ticks(4), [0, 1, 2, 3, 4]);
  assert.deepEqual(ticks(1), [0, 0.2, 0.4, 0.6, 0.8, 1]);
});

test("the axis ends at the first tick at or above the largest value", () => {
  assert.equal(niceMax(4), 4);
  assert.equal(niceMax(4.01), 5);
  assert.equal(niceMax(0.37), 0.4);
  assert.equal(niceMax(0), 1);
  assert.equal(niceMax(NaN), 1);
});

test("axis positions are percentages clipped to the axis", () => {
  assert.equal(axisPct(2, 4), "50%");
  assert.equal(axisPct(-1, 4), "0%");
  assert.equal(axisPct(9, 4), "100%");
});
