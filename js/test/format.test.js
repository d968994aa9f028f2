// Number wording and axis ticks (js/src/format.js).
import { test } from "node:test";
import assert from "node:assert/strict";
import { amount, axisPct, count, expectedWords, levelText, niceMax, num, pct, pShort, pWords, signed, tickStep, ticks, val } from "../src/format.js";

test("missing or undefined numbers show a dash", () => {
  for (const f of [num, val, count, pShort, pct, amount, signed]) for (const v of [null, undefined, NaN, Infinity]) assert.equal(f(v), "\u2014");
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
  assert.equal(val(-2.4e-4), "0");
});

test("information amounts at the display's precision: rounding noise reads 0, never an exponent", () => {
  assert.equal(amount(6.4e-16), "0");       // MI of a constant column
  assert.equal(amount(-1.9e-5), "0");       // a bias-corrected NMI a hair below 0
  assert.equal(amount(0.00296), "0.003");   // not finer than 0.001
  assert.equal(amount(-0.00437), "-0.004"); // a real negative estimate stays
  assert.equal(amount(0.0475), "0.0475");
  assert.equal(amount(10.3643), "10.4");
  assert.equal(amount(4, { fixed: true }), "4.00");
});

test("p- and q-values in words: 'below 0.001', never '= < 0.001'", () => {
  assert.equal(pWords("q", 1e-9), "q below 0.001");
  assert.equal(pWords("p", 0.0312), "p = 0.031");
  assert.equal(pWords("q", null), "q not computed");
  assert.equal(pShort(0.0002), "below 0.001");
  assert.equal(pShort(0.5), "0.5");
});

test("interval levels say the level that was used", () => {
  assert.equal(levelText(0.95), "95%");
  assert.equal(levelText(0.9), "90%");
  assert.equal(levelText(0.995), "99.5%");
  assert.equal(levelText(undefined), "95%");
  assert.equal(levelText(undefined, 0.8), "80%");
});

test("signed deviations and expected counts", () => {
  assert.equal(signed(-48.04), "\u221248");
  assert.equal(signed(3.21), "+3.2");
  assert.equal(signed(0), "0");
  assert.equal(expectedWords(2300.4), "2,300 expected");
  assert.equal(expectedWords(0.314), "0.31 expected");
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
