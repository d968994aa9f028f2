// Colour scales, built here by interpolating a few anchor colours in OKLab
// (perceptually even steps). Sequential: paper -> green-teal -> blue -> deep indigo,
// lightness falling monotonically, so it reads in grey and for the common
// colour-vision deficiencies. Diverging: blue (fewer rows than independence
// predicts) - paper - orange (more rows than predicted). Pure functions: no DOM.

export function srgb2lin(c) { c /= 255; return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4; }

export function lin2srgb(c) {
  const v = c <= 0.0031308 ? 12.92 * c : 1.055 * c ** (1 / 2.4) - 0.055;
  return Math.max(0, Math.min(255, Math.round(v * 255)));
}

export function hex2lab(hex) {
  const n = parseInt(hex.slice(1), 16);
  const r = srgb2lin((n >> 16) & 255), g = srgb2lin((n >> 8) & 255), b = srgb2lin(n & 255);
  const l = Math.cbrt(0.4122214708 * r + 0.5363325363 * g + 0.0514459929 * b);
  const m = Math.cbrt(0.2119034982 * r + 0.6806995451 * g + 0.1073969566 * b);
  const s = Math.cbrt(0.0883024619 * r + 0.2817188376 * g + 0.6299787005 * b);
  return [0.2104542553 * l + 0.793617785 * m - 0.0040720468 * s,
    1.9779984951 * l - 2.428592205 * m + 0.4505937099 * s,
    0.0259040371 * l + 0.7827717662 * m - 0.808675766 * s];
}

export function lab2rgb([L, A, B]) {
  const l = (L + 0.3963377774 * A + 0.2158037573 * B) ** 3;
  const m = (L - 0.1055613458 * A - 0.0638541728 * B) ** 3;
  const s = (L - 0.0894841775 * A - 1.291485548 * B) ** 3;
  return [lin2srgb(4.0767416621 * l - 3.3077115913 * m + 0.2309699292 * s),
    lin2srgb(-1.2684380046 * l + 2.6097574011 * m - 0.3413193965 * s),
    lin2srgb(-0.0041960863 * l - 0.7034186147 * m + 1.707614701 * s)];
}

// A lookup table of `size` colours along the anchors; at(t) for t in [0, 1]
// (non-finite t reads as 0), css(t) the same as an rgb() string.
export function makeScale(anchors, size = 256) {
  const labs = anchors.map(hex2lab);
  const lut = new Uint8ClampedArray(size * 3);
  for (let i = 0; i < size; i++) {
    const t = (i / (size - 1)) * (labs.length - 1);
    const k = Math.min(labs.length - 2, Math.floor(t)), f = t - k;
    const c = lab2rgb(labs[k].map((v, d) => v + (labs[k + 1][d] - v) * f));
    lut.set(c, i * 3);
  }
  const at = (t) => {
    const i = Math.max(0, Math.min(size - 1, Math.round((Number.isFinite(t) ? t : 0) * (size - 1))));
    return [lut[i * 3], lut[i * 3 + 1], lut[i * 3 + 2]];
  };
  return { at, css: (t) => { const [r, g, b] = at(t); return `rgb(${r},${g},${b})`; } };
}

export const SEQUENTIAL = makeScale(["#f7f5ec", "#cfe5c4", "#82c3b4", "#3f93aa", "#33609a", "#2b3472", "#1b1640"]);
export const DIVERGING = makeScale(["#1f4f8f", "#6d9fd2", "#f4f2ee", "#eda868", "#a8480c"]);
export const PAPER = [247, 245, 236];

// towards the background: "not significant"
export function mute([r, g, b], k = 0.72) {
  return [r + (236 - r) * k, g + (235 - g) * k, b + (232 - b) * k].map(Math.round);
}

// relative luminance (WCAG 2.x) of an sRGB colour
export function luminance([r, g, b]) {
  return 0.2126 * srgb2lin(r) + 0.7152 * srgb2lin(g) + 0.0722 * srgb2lin(b);
}

// WCAG 2.x contrast ratio of two sRGB colours (1 .. 21)
export function contrast(a, b) {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (hi + 0.05) / (lo + 0.05);
}

// readable text colour on a cell background: black or white, whichever contrasts
// more (with pure black and white one of them always reaches 4.5:1)
export function inkOn(rgb) { return contrast(rgb, [0, 0, 0]) >= contrast(rgb, [255, 255, 255]) ? "#000000" : "#ffffff"; }

// colour position of a grid value: square root of the share of the largest
// off-diagonal value, so that a few near-duplicate pairs do not wash every other pair out
export function gridT(v, max) { return Math.sqrt(Math.max(0, v) / max); }
