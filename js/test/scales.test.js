// Colour scales (js/src/scales.js) against the definitions they implement.
import { test } from "node:test";
import assert from "node:assert/strict";
import { DIVERGING, SEQUENTIAL, contrast, gridT, hex2lab, inkOn, lab2rgb, luminance, makeScale } from "../src/scales.js";

const close = (a, b, tol, what) => assert.ok(Math.abs(a - b) <= tol, `${what}: ${a} vs ${b}`);

test("OKLab puts sRGB white at L = 1, a = b = 0 and black at 0 (Ottosson 2020, by construction)", () => {
  const [L, A, B] = hex2lab("#ffffff");
  close(L, 1, 1e-4, "L"); close(A, 0, 1e-4, "a"); close(B, 0, 1e-4, "b");
  assert.deepEqual(hex2lab("#000000").map((v) => Math.round(v * 1e6) / 1e6), [0, 0, 0]);
});

test("sRGB -> OKLab -> sRGB returns every 8-bit colour of a coarse lattice", () => {
  for (let r = 0; r < 256; r += 51) for (let g = 0; g < 256; g += 51) for (let b = 0; b < 256; b += 51) {
    const hex = `#${[r, g, b].map((v) => v.toString(16).padStart(2, "0")).join("")}`;
    assert.deepEqual(lab2rgb(hex2lab(hex)), [r, g, b], hex);
  }
});

test("a scale starts and ends at its anchors; non-finite t reads as the start", () => {
  const s = makeScale(["#102030", "#f0e0d0"]);
  assert.deepEqual(s.at(0), [0x10, 0x20, 0x30]);
  assert.deepEqual(s.at(1), [0xf0, 0xe0, 0xd0]);
  assert.deepEqual(s.at(NaN), s.at(0));
  assert.deepEqual(s.at(-3), s.at(0));
  assert.deepEqual(s.at(7), s.at(1));
  assert.equal(s.css(1), "rgb(240,224,208)");
});

test("the sequential scale darkens monotonically (it must read in grey)", () => {
  let last = Infinity;
  for (let i = 0; i <= 100; i++) {
    const y = luminance(SEQUENTIAL.at(i / 100));
    assert.ok(y <= last + 1e-9, `luminance rises at t = ${i / 100}`);
    last = y;
  }
});

test("the diverging scale is lightest at its middle and darker at both ends", () => {
  const mid = luminance(DIVERGING.at(0.5));
  for (const t of [0, 0.1, 0.25, 0.75, 0.9, 1]) assert.ok(luminance(DIVERGING.at(t)) < mid, `t = ${t}`);
});

test("WCAG 2 contrast: black on white is 21:1, a colour on itself 1:1 (W3C WCAG 2.1, 1.4.3)", () => {
  close(contrast([0, 0, 0], [255, 255, 255]), 21, 1e-9, "black/white");
  close(contrast([120, 40, 200], [120, 40, 200]), 1, 1e-12, "same");
});

test("text on a cell meets 4.5:1 (WCAG 2.1, 1.4.3) on every colour of both scales", () => {
  for (const scale of [SEQUENTIAL, DIVERGING]) for (let i = 0; i <= 50; i++) {
    const bg = scale.at(i / 50);
    const ink = inkOn(bg) === "#ffffff" ? [255, 255, 255] : [0, 0, 0];
    assert.ok(contrast(ink, bg) >= 4.5, `${bg} with ${inkOn(bg)}: ${contrast(ink, bg).toFixed(2)}`);
  }
});

test("grid colour position is the square root of the share of the maximum, clipped below at 0", () => {
  assert.equal(gridT(0.25, 1), 0.5);
  assert.equal(gridT(-1, 1), 0);
  assert.equal(gridT(2, 2), 1);
});
