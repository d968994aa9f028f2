// infoscope live profile: the front end of infoscope.widgets (plain ESM, no framework,
// nothing fetched at run time). render({model, el}) draws the view named by the
// model's `_view` trait; modelFromPayload(payload) builds the small model an offline
// export needs. Every column name and value is data: it reaches the page only through
// textContent, attribute values or canvas fillText, never through innerHTML.

const VERSION = "0.1.0";

// ------------------------------------------------------------------ styles
const CSS = `
.isc-root{--isc-ink:var(--jp-ui-font-color1,#1f2328);--isc-ink2:var(--jp-ui-font-color2,#57606a);
 --isc-ink3:#8c959f;--isc-bg:var(--jp-layout-color0,#ffffff);--isc-panel:var(--jp-layout-color1,#fbfaf7);
 --isc-line:var(--jp-border-color2,#e4e1d8);--isc-accent:#2a5d8f;--isc-warm:#b4520f;
 --isc-bar:#4f7fae;--isc-bar-faint:#d9e3ee;--isc-sel:#fff3d6;
 font-family:var(--jp-ui-font-family,system-ui,-apple-system,"Segoe UI",Roboto,"Helvetica Neue",Arial,sans-serif);
 font-size:13px;line-height:1.4;color:var(--isc-ink);background:var(--isc-bg);
 box-sizing:border-box;max-width:1400px;position:relative;padding:4px 2px 8px}
.isc-root *,.isc-root *::before,.isc-root *::after{box-sizing:border-box}
.isc-head{display:flex;align-items:baseline;gap:12px;flex-wrap:wrap;margin:0 0 8px}
.isc-title{font-size:15px;font-weight:650;letter-spacing:.01em}
.isc-sub{color:var(--isc-ink2);font-size:12px}
.isc-status{margin-left:auto;display:flex;align-items:center;gap:8px;font-size:12px;color:var(--isc-ink2);min-height:22px}
.isc-status progress{width:110px;height:6px}
.isc-status button,.isc-btn{font:inherit;font-size:12px;border:1px solid var(--isc-line);background:var(--isc-bg);
 color:var(--isc-ink);border-radius:4px;padding:1px 8px;cursor:pointer}
.isc-btn:focus-visible,.isc-root select:focus-visible,.isc-root input:focus-visible,.isc-root canvas:focus-visible,
.isc-erow:focus-visible{outline:2px solid var(--isc-accent);outline-offset:1px}
.isc-error{border:1px solid #d8a39a;background:#fdf1ee;color:#7a2419;border-radius:4px;padding:6px 10px;margin:0 0 8px;
 white-space:pre-wrap;font-size:12px}
.isc-controls{display:flex;flex-wrap:wrap;gap:6px 16px;align-items:flex-end;padding:8px 10px;margin:0 0 10px;
 background:var(--isc-panel);border:1px solid var(--isc-line);border-radius:6px}
.isc-ctl{display:flex;flex-direction:column;gap:2px;min-width:0}
.isc-ctl>label,.isc-ctl>.isc-lab{font-size:11px;color:var(--isc-ink2);font-weight:550;white-space:nowrap}
.isc-ctl select,.isc-ctl input[type=number]{font:inherit;font-size:12px;padding:2px 4px;border:1px solid var(--isc-line);
 border-radius:4px;background:var(--isc-bg);color:var(--isc-ink);max-width:190px}
.isc-ctl input[type=number]{width:64px}
.isc-range{display:flex;align-items:center;gap:6px}
.isc-range input{width:120px;accent-color:var(--isc-accent)}
.isc-range output{font-variant-numeric:tabular-nums;font-size:12px;min-width:2.6em;color:var(--isc-ink)}
.isc-ctl.isc-off{opacity:.45}
.isc-row{display:flex;flex-wrap:wrap;gap:12px;margin:0 0 12px;align-items:flex-start}
.isc-panel{flex:1 1 420px;min-width:320px;border:1px solid var(--isc-line);border-radius:6px;padding:8px 10px 10px;background:var(--isc-bg)}
.isc-phead{display:flex;align-items:baseline;gap:8px;flex-wrap:wrap;margin:0 0 6px}
.isc-ptitle{font-weight:650;font-size:13px}
.isc-punit{color:var(--isc-ink2);font-size:12px}
.isc-phead .isc-ctl{margin-left:auto;flex-direction:row;align-items:center;gap:6px}
.isc-empty{color:var(--isc-ink2);font-size:12px;padding:18px 4px}
.isc-bars{max-height:440px;overflow:auto;position:relative}
.isc-erow,.isc-axis{display:grid;grid-template-columns:minmax(6em,10em) minmax(120px,1fr) 4.6em 8.6em;
 align-items:center;column-gap:8px;width:100%}
.isc-erow{border:0;background:none;font:inherit;color:inherit;text-align:left;padding:2px 2px;border-radius:3px;cursor:pointer;min-height:21px}
.isc-erow:hover{background:#f3f1ea}
.isc-erow[aria-pressed=true]{background:var(--isc-sel)}
.isc-axis{position:sticky;top:0;background:var(--isc-bg);z-index:1;height:22px;padding:0 2px;border-bottom:1px solid var(--isc-line);margin-bottom:2px}
.isc-name{overflow:hidden;text-overflow:ellipsis;white-space:nowrap;font-size:12px}
.isc-val{font-variant-numeric:tabular-nums;text-align:right;font-size:12px}
.isc-track{position:relative;height:14px}
.isc-ticks{position:relative;height:100%}
.isc-tick{position:absolute;bottom:2px;transform:translateX(-50%);font-size:10px;color:var(--isc-ink3);font-variant-numeric:tabular-nums}
.isc-gridline{position:absolute;top:0;bottom:0;width:0;border-left:1px dotted #e3e0d7}
.isc-max{position:absolute;top:1px;bottom:1px;left:0;border:1px solid #c5cfda;border-radius:2px;background:#f5f7fa}
.isc-fill{position:absolute;top:3px;bottom:3px;left:0;background:var(--isc-bar);border-radius:1px}
.isc-whisk{position:absolute;top:6px;height:2px;background:#1d2f44}
.isc-whisk::before,.isc-whisk::after{content:"";position:absolute;top:-3px;height:8px;width:0;border-left:1.5px solid #1d2f44}
.isc-whisk::before{left:0}.isc-whisk::after{right:0}
.isc-flags{display:flex;flex-wrap:wrap;gap:2px;overflow:hidden}
.isc-flag{font-size:10px;line-height:14px;padding:0 4px;border-radius:7px;background:#f1ece2;color:#6b4b16;border:1px solid #e2d6bf;white-space:nowrap}
.isc-flag.isc-leak{background:#fbe6d6;color:#8a3b08;border-color:#efc09c}
.isc-gridwrap{position:relative;width:100%;overflow:auto;max-height:620px}
.isc-gridwrap canvas{display:block}
.isc-legend{display:flex;align-items:center;gap:10px;flex-wrap:wrap;font-size:11px;color:var(--isc-ink2);margin-top:6px}
.isc-legend canvas{border-radius:2px;vertical-align:middle}
.isc-swatch{display:inline-block;width:12px;height:12px;border-radius:2px;vertical-align:-2px;margin-right:4px;border:1px solid var(--isc-line)}
.isc-stats{display:flex;flex-wrap:wrap;gap:4px 14px;font-size:12px;margin:0 0 6px;color:var(--isc-ink2)}
.isc-stats b{color:var(--isc-ink);font-weight:600;font-variant-numeric:tabular-nums}
.isc-tablewrap{overflow:auto;max-height:420px}
.isc-tablebox{position:relative}
.isc-tablebox.isc-overflow::after{content:"";position:absolute;top:0;right:0;bottom:0;width:28px;pointer-events:none;
 background:linear-gradient(to right,rgba(255,255,255,0),var(--isc-bg,#fff))}
.isc-ptable{border-collapse:separate;border-spacing:1px;font-size:11px;font-variant-numeric:tabular-nums}
.isc-ptable th{font-weight:500;color:var(--isc-ink2);padding:1px 5px;white-space:nowrap;max-width:11em;overflow:hidden;text-overflow:ellipsis}
.isc-ptable thead th{vertical-align:bottom;text-align:center}
.isc-ptable tbody th{text-align:right}
.isc-ptable td{min-width:2.3em;text-align:center;padding:2px 3px;border-radius:2px}
.isc-ptable td.isc-hid{background:repeating-linear-gradient(45deg,#eeece6 0 3px,#f8f7f3 3px 6px);color:var(--isc-ink3)}
.isc-ptable td.isc-hid2{background:repeating-linear-gradient(-45deg,#f1efe9 0 3px,#fbfaf7 3px 6px)}
.isc-ptable .isc-tot{color:var(--isc-ink2);background:none;font-weight:600}
.isc-corner{font-size:10px;text-align:left!important;color:var(--isc-ink3)}
.isc-note{font-size:11px;color:var(--isc-ink2);margin-top:6px}
.isc-dim{opacity:.45;transition:opacity .15s}
.isc-caution{font-size:11px;color:var(--isc-ink2);border-top:1px solid var(--isc-line);padding-top:6px;margin-top:2px}
.isc-caution span+span::before{content:" · "}
.isc-sampled{color:#8a3b08;font-weight:600}
.isc-tip{position:fixed;z-index:1000;pointer-events:none;background:#1f2328;color:#f6f8fa;border-radius:4px;
 padding:5px 8px;font-size:11.5px;line-height:1.45;max-width:320px;box-shadow:0 2px 8px rgba(0,0,0,.18);display:none}
.isc-tip div:first-child{font-weight:600}
.isc-sr{position:absolute;width:1px;height:1px;overflow:hidden;clip:rect(0 0 0 0);white-space:nowrap}
`;

// ------------------------------------------------------------------ colour scales
// Built here by interpolating a few anchor colours in OKLab (perceptually even steps).
// Sequential: paper -> green-teal -> blue -> deep indigo, lightness falling monotonically,
// so it reads in grey and for the common colour-vision deficiencies. Diverging: blue
// (fewer rows than independence predicts) - paper - orange (more rows than predicted).
function srgb2lin(c) { c /= 255; return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4; }
function lin2srgb(c) {
  const v = c <= 0.0031308 ? 12.92 * c : 1.055 * c ** (1 / 2.4) - 0.055;
  return Math.max(0, Math.min(255, Math.round(v * 255)));
}
function hex2lab(hex) {
  const n = parseInt(hex.slice(1), 16);
  const r = srgb2lin((n >> 16) & 255), g = srgb2lin((n >> 8) & 255), b = srgb2lin(n & 255);
  const l = Math.cbrt(0.4122214708 * r + 0.5363325363 * g + 0.0514459929 * b);
  const m = Math.cbrt(0.2119034982 * r + 0.6806995451 * g + 0.1073969566 * b);
  const s = Math.cbrt(0.0883024619 * r + 0.2817188376 * g + 0.6299787005 * b);
  return [0.2104542553 * l + 0.793617785 * m - 0.0040720468 * s,
    1.9779984951 * l - 2.428592205 * m + 0.4505937099 * s,
    0.0259040371 * l + 0.7827717662 * m - 0.808675766 * s];
}
function lab2rgb([L, A, B]) {
  const l = (L + 0.3963377774 * A + 0.2158037573 * B) ** 3;
  const m = (L - 0.1055613458 * A - 0.0638541728 * B) ** 3;
  const s = (L - 0.0894841775 * A - 1.291485548 * B) ** 3;
  return [lin2srgb(4.0767416621 * l - 3.3077115913 * m + 0.2309699292 * s),
    lin2srgb(-1.2684380046 * l + 2.6097574011 * m - 0.3413193965 * s),
    lin2srgb(-0.0041960863 * l - 0.7034186147 * m + 1.707614701 * s)];
}
function makeScale(anchors, size = 256) {
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
const SEQUENTIAL = makeScale(["#f7f5ec", "#cfe5c4", "#82c3b4", "#3f93aa", "#33609a", "#2b3472", "#1b1640"]);
const DIVERGING = makeScale(["#1f4f8f", "#6d9fd2", "#f4f2ee", "#eda868", "#a8480c"]);
const PAPER = [247, 245, 236];
function mute([r, g, b], k = 0.72) { // towards the background: "not significant"
  return [r + (236 - r) * k, g + (235 - g) * k, b + (232 - b) * k].map(Math.round);
}
function inkOn([r, g, b]) { // readable text colour on a cell background
  return 0.2126 * srgb2lin(r) + 0.7152 * srgb2lin(g) + 0.0722 * srgb2lin(b) > 0.33 ? "#1f2328" : "#ffffff";
}

// ------------------------------------------------------------------ data decoding
function b64bytes(text) {
  const bin = atob(text);
  const out = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
  return out;
}
function bytesOf(x) { // DataView | ArrayBuffer | typed array | base64 text | array of bytes -> Uint8Array copy
  if (x == null || x === "") return new Uint8Array(0);
  if (typeof x === "string") return b64bytes(x);
  if (x instanceof ArrayBuffer) return new Uint8Array(x.slice(0));
  if (ArrayBuffer.isView(x)) return new Uint8Array(x.buffer.slice(x.byteOffset, x.byteOffset + x.byteLength));
  if (Array.isArray(x)) return Uint8Array.from(x);
  return new Uint8Array(0);
}
function asFloat32(x) { const b = bytesOf(x); return new Float32Array(b.buffer, 0, Math.floor(b.byteLength / 4)); }
function asInt32(x) { const b = bytesOf(x); return new Int32Array(b.buffer, 0, Math.floor(b.byteLength / 4)); }
function parseJSON(text) {
  if (text == null || text === "") return null;
  if (typeof text === "object") return text;
  try { return JSON.parse(text); } catch (e) { return null; }
}
function table(obj) { // {fields, rows} -> array of objects
  if (!obj || !Array.isArray(obj.rows)) return [];
  return obj.rows.map((r) => Object.fromEntries(obj.fields.map((f, i) => [f, r[i]])));
}

// ------------------------------------------------------------------ formatting
function num(v, digits = 3) {
  if (v == null || !Number.isFinite(v)) return "\u2014";
  const a = Math.abs(v);
  if (a !== 0 && (a < 0.001 || a >= 1e6)) return v.toExponential(1);
  return String(Number(v.toPrecision(digits)));
}
function val(v) { // a shown estimate: three significant digits, trailing zeros kept for alignment
  if (v == null || !Number.isFinite(v)) return "\u2014";
  const a = Math.abs(v);
  if (a !== 0 && (a < 0.001 || a >= 1e6)) return v.toExponential(1);
  return a === 0 ? "0" : v.toPrecision(3);
}
function count(v) { return v == null || !Number.isFinite(v) ? "\u2014" : Math.round(v).toLocaleString("en-US"); }
function pval(p) { return p == null || !Number.isFinite(p) ? "\u2014" : p < 0.001 ? "< 0.001" : num(p, 2); }
function pct(v) { return v == null || !Number.isFinite(v) ? "\u2014" : `${Math.round(v * 100)}%`; }
function tickStep(max, n = 5) {
  const raw = max / n, p = 10 ** Math.floor(Math.log10(raw)), m = raw / p;
  return (m <= 1 ? 1 : m <= 2 ? 2 : m <= 5 ? 5 : 10) * p;
}
function niceMax(v) { // the axis end: the first tick at or above v
  if (!(v > 0) || !Number.isFinite(v)) return 1;
  const step = tickStep(v);
  return Number((Math.ceil(v / step - 1e-9) * step).toPrecision(6));
}
function ticks(max, n = 5) {
  const step = tickStep(max, n);
  const out = [];
  for (let v = 0; v <= max + step * 1e-9; v += step) out.push(Number(v.toPrecision(6)));
  return out;
}
const ESTIMATOR_LABELS = {
  plugin: "plug-in", miller_madow: "Miller\u2013Madow", chao_shen: "Chao\u2013Shen",
  james_stein: "James\u2013Stein shrinkage", dirichlet: "Dirichlet pseudocount",
  grassberger: "Grassberger", nsb: "NSB",
};
const MEASURE_LABELS = { mi: "mutual information", nmi: "normalised MI", adjusted_mi: "MI adjusted for chance", vi: "variation of information" };
const MEASURE_SHORT = { mi: "MI", nmi: "NMI", adjusted_mi: "AMI", vi: "VI" };
const HAS_UNIT = { mi: true, vi: true };
const STRATEGY_LABELS = {
  quantile: "quantile bins", uniform: "equal-width bins", fd: "Freedman\u2013Diaconis rule", scott: "Scott rule",
  sturges: "Sturges rule", doane: "Doane rule", rice: "Rice rule", sqrt: "square-root rule",
  stone: "Stone rule", auto: "auto rule", knuth: "Knuth rule",
};
const MISSING_LABELS = { drop: "leave out missing", category: "missing as a value" };
const ORDER_LABELS = { cluster: "by similarity", name: "by name" };
const SORT_LABELS = { entropy: "entropy", name: "name", efficiency: "efficiency", missing_share: "missing share" };
const FLAG_LABELS = {
  constant: "constant", id_like: "ID-like", mostly_missing: "mostly missing", sparse_cells: "sparse cells",
  heavy_tail: "heavy tail", levels_folded: "levels folded", mixed_types: "mixed types",
  infinite_values: "infinite values", rare_levels: "rare levels", exceeds_log_k: "above log K",
};
const FLAG_HELP = {
  constant: "one value only: carries no information",
  id_like: "nearly every row distinct: entropy near log n says little",
  mostly_missing: "most rows missing",
  sparse_cells: "fewer than 5 rows per cell on average: estimates unreliable",
  heavy_tail: "heavy tail: equal-width bins would crowd",
  levels_folded: "rare levels folded into one: the grid and pair views use the folded levels, the entropy bar counts every level",
  mixed_types: "values of mixed types",
  infinite_values: "infinite values treated as missing",
  exceeds_log_k: "estimate above log K of the observed levels: the bias correction credits unseen levels; K is a lower bound of the true alphabet",
  rare_levels: "many thin levels (fewer than 5 rows or under 1% each) hold at least 5% of rows",
};

// ------------------------------------------------------------------ DOM helpers
// h(tag, props, ...children): strings become text nodes. Props are set as properties
// or attributes; no HTML string is ever parsed.
function h(tag, props, ...kids) {
  const e = document.createElement(tag);
  for (const [k, v] of Object.entries(props || {})) {
    if (v == null || v === false) continue;
    if (k === "class") e.className = v;
    else if (k === "text") e.textContent = String(v);
    else if (k === "style") Object.assign(e.style, v);
    else if (k.startsWith("on") && typeof v === "function") e.addEventListener(k.slice(2), v);
    else if (k === "value" || k === "checked" || k === "disabled" || k === "selected") e[k] = v;
    else e.setAttribute(k, v === true ? "" : String(v));
  }
  for (const c of kids.flat(Infinity)) {
    if (c == null || c === false) continue;
    e.append(c instanceof Node ? c : document.createTextNode(String(c)));
  }
  return e;
}
let UID = 0;
const uid = (p) => `isc-${p}-${++UID}`;
function clear(el) { while (el.firstChild) el.removeChild(el.firstChild); }

function makeTip(root) {
  const el = h("div", { class: "isc-tip", role: "tooltip" });
  root.append(el);
  return {
    show(lines, x, y) {
      clear(el);
      for (const line of lines) el.append(h("div", null, line));
      el.style.display = "block";
      const w = el.offsetWidth, ht = el.offsetHeight;
      const left = x + 14 + w > window.innerWidth ? x - w - 10 : x + 14;
      const top = y + 14 + ht > window.innerHeight ? y - ht - 10 : y + 14;
      el.style.left = `${Math.max(4, left)}px`;
      el.style.top = `${Math.max(4, top)}px`;
    },
    hide() { el.style.display = "none"; },
  };
}

// ------------------------------------------------------------------ shared state access
function makeCtx(model, root) {
  const offline = !!model.get("_offline");
  return {
    model, root, offline, tip: makeTip(root),
    get: (k) => model.get(k),
    set(k, v) { model.set(k, v); model.save_changes(); },
    unit() { return model.get("unit") || "bits"; },
    entropy() { return parseJSON(model.get("_entropy")); },
  };
}

function select(ctx, name, label, choices, labels, opts = {}) {
  const id = uid(name);
  const sel = h("select", { id, "aria-label": opts.aria || label, onchange: () => {
    const v = sel.value;
    ctx.set(name, opts.parse ? opts.parse(v) : v);
  } });
  const fill = (values) => {
    clear(sel);
    for (const [v, text] of values) sel.append(h("option", { value: v }, text));
  };
  fill(choices.map((c) => [c, (labels && labels[c]) || c]));
  const wrap = h("div", { class: "isc-ctl" }, h("label", { for: id }, label), sel);
  return {
    el: wrap, input: sel, fill,
    sync() { const v = ctx.get(name); sel.value = opts.format ? opts.format(v) : (v == null ? "" : String(v)); },
  };
}

function range(ctx, name, label, { min, max, step, format = (v) => String(v), parse = Number, read, write }) {
  const id = uid(name);
  const out = h("output", { for: id });
  const input = h("input", { id, type: "range", min, max, step, "aria-label": label });
  input.addEventListener("input", () => {
    const v = parse(input.value);
    out.textContent = format(v);
    if (write) write(v); else ctx.set(name, v);
  });
  const wrap = h("div", { class: "isc-ctl" }, h("label", { for: id }, label),
    h("div", { class: "isc-range" }, input, out));
  return {
    el: wrap, input, out,
    sync() {
      const v = read ? read() : ctx.get(name);
      if (document.activeElement !== input && v != null) input.value = String(v);
      out.textContent = v == null ? "" : format(v);
    },
  };
}

// ------------------------------------------------------------------ controls
function controlsView(ctx) {
  const meta = ctx.get("_meta") || {};
  const ch = meta.choices || {};
  const rules = new Set(meta.bin_rules || []);
  const el = h("div", { class: "isc-controls", role: "group", "aria-label": "profile controls" });
  const bins = range(ctx, "bins", "Bins per numeric column", { min: 2, max: 64, step: 1, format: (v) => `${v}` });
  const strategy = select(ctx, "strategy", "Binning", ch.strategy || ["quantile", "uniform"], STRATEGY_LABELS);
  const estimator = select(ctx, "estimator", "Estimator", ch.estimator || ["miller_madow"], ESTIMATOR_LABELS);
  const alpha = range(ctx, "alpha", "Pseudocount per cell", { min: 0.05, max: 2, step: 0.05, format: (v) => Number(v).toFixed(2) });
  const measure = select(ctx, "measure", "Grid measure", ch.measure || ["mi"], MEASURE_LABELS);
  const unit = select(ctx, "unit", "Unit", ch.unit || ["bits", "nats"], null);
  const target = select(ctx, "target", "Relevance target", [], null, {
    parse: (v) => (v === "" ? null : v), format: (v) => (v == null ? "" : v),
  });
  target.fill([["", "(none)"], ...(meta.names || []).map((n) => [n, n])]);
  const missing = select(ctx, "missing", "Missing values", ch.missing || ["drop"], MISSING_LABELS);
  const mcId = uid("min_count");
  const minCount = h("input", { id: mcId, type: "number", min: 0, max: 1000, step: 1, "aria-label": "hide pair-view cells with fewer rows than" });
  minCount.addEventListener("change", () => {
    const v = Math.max(0, Math.round(Number(minCount.value) || 0));
    minCount.value = String(v);
    ctx.set("min_count", v);
  });
  const minWrap = h("div", { class: "isc-ctl" }, h("label", { for: mcId }, "Hide cells below (rows)"), minCount);
  // per-column bins for the selected column
  const colBins = range(ctx, "column_bins", "Bins for the selected column", {
    min: 2, max: 64, step: 1,
    read: () => { const c = ctx.get("selected_column"); const o = ctx.get("column_bins") || {}; return c != null && o[c] != null ? o[c] : ctx.get("bins"); },
    write: (v) => { // the override is one entry of a dict, not a number
      const c = ctx.get("selected_column");
      if (c != null) ctx.set("column_bins", { ...(ctx.get("column_bins") || {}), [c]: v });
    },
  });
  const colReset = h("button", { class: "isc-btn", type: "button", onclick: () => {
    const c = ctx.get("selected_column");
    if (c == null) return;
    const next = { ...(ctx.get("column_bins") || {}) };
    delete next[c];
    ctx.set("column_bins", next);
  } }, "use default");
  const colLabel = colBins.el.querySelector("label");
  colBins.el.querySelector(".isc-range").append(colReset);

  el.append(strategy.el, bins.el, estimator.el, alpha.el, measure.el, unit.el, target.el, missing.el, minWrap, colBins.el);
  const all = [bins, strategy, estimator, alpha, measure, unit, target, missing, colBins];

  function sync() {
    for (const c of all) c.sync();
    minCount.value = String(ctx.get("min_count") || 0);
    const rule = rules.has(ctx.get("strategy"));
    bins.input.disabled = rule || ctx.offline;
    bins.el.classList.toggle("isc-off", rule);
    if (rule) bins.out.textContent = "by rule";
    const dirichlet = ctx.get("estimator") === "dirichlet";
    alpha.input.disabled = !dirichlet || ctx.offline;
    alpha.el.classList.toggle("isc-off", !dirichlet);
    const col = ctx.get("selected_column");
    const rows = table(ctx.entropy());
    const row = rows.find((r) => r.column === col);
    const numeric = row && row.kind === "numeric";
    colBins.input.disabled = !numeric || rule || ctx.offline;
    colReset.disabled = !numeric || ctx.offline || !((ctx.get("column_bins") || {})[col] != null);
    colBins.el.classList.toggle("isc-off", !numeric);
    colLabel.textContent = col == null ? "Bins for a column (pick one)" : `Bins for \u201c${col}\u201d`;
    if (!numeric) colBins.out.textContent = col == null ? "" : "not binned";
    for (const c of [strategy, estimator, measure, unit, target, missing]) {
      c.input.disabled = ctx.offline;
      c.el.classList.toggle("isc-off", ctx.offline); // look off, like the pseudocount slider
      if (ctx.offline) c.el.title = "saved copy: needs the live notebook"; else c.el.removeAttribute("title");
    }
    if (ctx.offline) { bins.el.classList.add("isc-off"); colBins.el.classList.add("isc-off"); }
    minCount.disabled = ctx.offline;
    minWrap.classList.toggle("isc-off", ctx.offline);
  }
  sync();
  return { el, sync, parts: { bins, strategy, estimator, alpha, measure, unit, target, missing, minCount, colBins } };
}

// ------------------------------------------------------------------ entropy bars
function entropyView(ctx) {
  const el = h("section", { class: "isc-panel isc-entropy", "aria-label": "entropy bars" });
  const sortSel = select(ctx, "sort_by", "Sort", ["entropy", "name", "efficiency", "missing_share"], SORT_LABELS);
  sortSel.input.onchange = null;
  sortSel.input.addEventListener("change", () => { ctx.model.set("sort_by", sortSel.input.value); ctx.model.save_changes(); draw(); });
  const unitEl = h("span", { class: "isc-punit" });
  const head = h("div", { class: "isc-phead" }, h("span", { class: "isc-ptitle" }, "Entropy bars"), unitEl, sortSel.el);
  const body = h("div", { class: "isc-bars" });
  const legend = h("div", { class: "isc-legend" },
    h("span", null, h("span", { class: "isc-swatch", style: { background: "var(--isc-bar)" } }), "estimate"),
    h("span", null, h("span", { class: "isc-swatch", style: { background: "#f5f7fa", borderColor: "#c5cfda" } }), "maximum, log K"),
    h("span", null, "\u251c\u2500\u2524 95% interval"));
  el.append(head, body, legend);

  function draw() {
    sortSel.sync();
    const data = ctx.entropy();
    const unit = (data && data.unit) || ctx.unit();
    unitEl.textContent = data ? `${unit} per column \u00b7 ${ESTIMATOR_LABELS[data.estimator] || data.estimator || ""}` : "";
    clear(body);
    const rows = table(data);
    if (!rows.length) { body.append(h("div", { class: "isc-empty" }, data ? "No columns." : "Computing\u2026")); return; }
    const key = ctx.get("sort_by") || "entropy";
    const sortKey = (r) => (r[key] == null ? -Infinity : r[key]);
    rows.sort(key === "name" ? (a, b) => String(a.column).localeCompare(String(b.column))
      : (a, b) => sortKey(b) - sortKey(a) || String(a.column).localeCompare(String(b.column)));
    let top = 0;
    for (const r of rows) for (const f of ["max_entropy", "ci_high", "entropy"]) if (Number.isFinite(r[f])) top = Math.max(top, r[f]);
    const max = niceMax(top);
    const x = (v) => `${Math.max(0, Math.min(100, (v / max) * 100))}%`;
    const tickBox = h("div", { class: "isc-ticks" });
    for (const t of ticks(max)) tickBox.append(h("span", { class: "isc-tick", style: { left: x(t) } }, num(t)));
    body.append(h("div", { class: "isc-axis", "aria-hidden": "true" },
      h("span", { class: "isc-name", style: { color: "var(--isc-ink3)", fontSize: "11px" } }, "column"),
      tickBox, h("span", { class: "isc-val", style: { color: "var(--isc-ink3)", fontSize: "11px" } }, unit),
      h("span", { style: { color: "var(--isc-ink3)", fontSize: "11px" } }, "flags")));
    const selected = ctx.get("selected_column");
    const gridTicks = ticks(max);
    for (const r of rows) {
      const track = h("span", { class: "isc-track" });
      for (const t of gridTicks.slice(1)) track.append(h("span", { class: "isc-gridline", style: { left: x(t) } }));
      if (Number.isFinite(r.max_entropy)) track.append(h("span", { class: "isc-max", style: { width: x(r.max_entropy) } }));
      if (Number.isFinite(r.entropy)) track.append(h("span", { class: "isc-fill", style: { width: x(r.entropy) } }));
      if (Number.isFinite(r.ci_low) && Number.isFinite(r.ci_high)) {
        track.append(h("span", { class: "isc-whisk", style: { left: x(r.ci_low), width: `calc(${x(r.ci_high)} - ${x(r.ci_low)})` } }));
      }
      const flags = String(r.flags || "").split(",").map((s) => s.trim()).filter(Boolean);
      const flagBox = h("span", { class: "isc-flags" }, flags.map((f) => h("span", { class: "isc-flag", title: FLAG_HELP[f] || f }, FLAG_LABELS[f] || f)));
      const label = `${r.column}: entropy ${num(r.entropy)} ${unit}, 95% interval ${num(r.ci_low)} to ${num(r.ci_high)}, maximum ${num(r.max_entropy)}`;
      const btn = h("button", {
        class: "isc-erow", type: "button", "aria-pressed": String(selected === r.column), "aria-label": label,
        "data-column": r.column,
        onclick: () => ctx.set("selected_column", ctx.get("selected_column") === r.column ? null : r.column),
        onfocus: () => { const b = btn.getBoundingClientRect(); btn.dispatchEvent(new MouseEvent("mousemove", { clientX: b.left + 140, clientY: b.bottom - 10 })); },
        onblur: () => ctx.tip.hide(),
        onmousemove: (ev) => ctx.tip.show([
          String(r.column),
          `${r.kind}, K = ${count(r.k)} symbols`,
          `H = ${num(r.entropy)} ${unit}  (95%: ${num(r.ci_low)} \u2013 ${num(r.ci_high)})`,
          `maximum log K = ${num(r.max_entropy)} ${unit}`,
          `efficiency ${pct(r.efficiency)} \u00b7 effective categories ${num(r.effective_categories)}`,
          `n = ${count(r.n)} \u00b7 missing ${count(r.missing)} (${pct(r.missing_share)})`,
          ...flags.map((f) => `\u25b8 ${FLAG_HELP[f] || f}`),
        ], ev.clientX, ev.clientY),
        onmouseleave: () => ctx.tip.hide(),
        onkeydown: (ev) => {
          if (ev.key !== "ArrowDown" && ev.key !== "ArrowUp") return;
          ev.preventDefault();
          const sib = ev.key === "ArrowDown" ? btn.nextElementSibling : btn.previousElementSibling;
          if (sib && sib.classList.contains("isc-erow")) sib.focus();
        },
      }, h("span", { class: "isc-name" }, String(r.column)), track, h("span", { class: "isc-val" }, val(r.entropy)), flagBox);
      body.append(btn);
    }
  }
  draw();
  return { el, draw };
}

// ------------------------------------------------------------------ information grid
function gridView(ctx) {
  const el = h("section", { class: "isc-panel isc-grid", "aria-label": "information grid" });
  const order = select(ctx, "order", "Order", ["cluster", "name"], ORDER_LABELS);
  const unitEl = h("span", { class: "isc-punit" });
  const canvas = h("canvas", { tabindex: 0, role: "img", "aria-label": "information grid: arrow keys move, Enter opens the pair" });
  const wrap = h("div", { class: "isc-gridwrap" }, canvas);
  const live = h("div", { class: "isc-sr", "aria-live": "polite" });
  const legendBar = h("canvas", { width: 140, height: 10, "aria-hidden": "true" });
  const legendMin = h("span"), legendMax = h("span");
  const mutedSw = h("span", { class: "isc-swatch" });
  const mutedText = h("span");
  const legend = h("div", { class: "isc-legend" }, h("span", null, legendMin, " ", legendBar, " ", legendMax),
    h("span", null, mutedSw, mutedText), h("span", null, h("span", { class: "isc-swatch", style: { background: "linear-gradient(135deg,#fff 45%,#c9c4b8 45% 55%,#fff 55%)" } }), "a column with itself"),
    h("span", null, "colour ∝ √ value"));
  el.append(h("div", { class: "isc-phead" }, h("span", { class: "isc-ptitle" }, "Information grid"), unitEl, order.el), wrap, legend, live);
  const st = { names: [], size: 0, values: null, n: null, q: null, cell: 10, mx: 0, my: 0, max: 1, cursor: [0, 1], alpha: 0.05 };

  function load() {
    const meta = ctx.get("_grid_meta") || {};
    st.names = meta.names || [];
    st.size = st.names.length;
    st.values = asFloat32(ctx.get("_grid_values"));
    st.n = asInt32(ctx.get("_grid_n"));
    st.q = asFloat32(ctx.get("_grid_q"));
    st.alpha = ctx.get("alpha_fdr") ?? meta.alpha ?? 0.05;
    st.measure = meta.measure || ctx.get("measure") || "mi";
    st.unit = meta.unit || ctx.unit();
    if (st.values.length !== st.size * st.size) st.size = 0; // incomplete update: draw nothing stale
    let top = 0;
    for (let i = 0; i < st.size; i++) for (let j = 0; j < st.size; j++) {
      const v = st.values[i * st.size + j];
      if (i !== j && Number.isFinite(v)) top = Math.max(top, v);
    }
    st.max = Math.max(top, 1e-12);
  }

  function layout() {
    const avail = Math.max(200, (wrap.clientWidth || el.clientWidth || 520) - 4);
    const g = canvas.getContext("2d");
    g.font = "11px system-ui, sans-serif";
    let label = 0;
    if (st.size && st.size <= 80) {
      for (const n of st.names) label = Math.max(label, g.measureText(n).width);
      label = Math.min(110, Math.ceil(label) + 8);
    }
    let cell = Math.floor((avail - label) / Math.max(1, st.size));
    if (cell < 9) { label = 0; cell = Math.floor(avail / Math.max(1, st.size)); }
    st.cell = Math.max(2, Math.min(30, cell));
    st.mx = label; st.my = label;
  }

  function colourAt(i, j) {
    const k = i * st.size + j, v = st.values[k];
    if (i === j) return [255, 255, 255];
    if (!Number.isFinite(v)) return [240, 239, 235];
    const c = SEQUENTIAL.at(gridT(v, st.max));
    return st.q[k] < st.alpha ? c : mute(c);
  }

  function draw() {
    load();
    unitEl.textContent = st.size ? `${MEASURE_LABELS[st.measure] || st.measure}${HAS_UNIT[st.measure] ? `, ${st.unit}` : ", unit-free"}${st.measure === "vi" ? " (a distance: 0 = same information)" : ""}` : "";
    mutedText.textContent = `not significant (BH q \u2265 ${num(st.alpha)})`;
    const mc = mute(SEQUENTIAL.at(0.6));
    mutedSw.style.background = `rgb(${mc.join(",")})`;
    order.sync();
    if (!st.size) {
      canvas.width = 1; canvas.height = 1; canvas.style.width = "1px"; canvas.style.height = "1px";
      return;
    }
    layout();
    const dpr = window.devicePixelRatio || 1;
    const W = st.mx + st.size * st.cell + 2, H = st.my + st.size * st.cell + 2;
    canvas.width = Math.round(W * dpr); canvas.height = Math.round(H * dpr);
    canvas.style.width = `${W}px`; canvas.style.height = `${H}px`;
    canvas.dataset.cell = String(st.cell); canvas.dataset.offset = String(st.mx); // for tests and tools
    const g = canvas.getContext("2d");
    g.setTransform(dpr, 0, 0, dpr, 0, 0);
    g.clearRect(0, 0, W, H);
    const gap = st.cell >= 8 ? 1 : 0;
    for (let i = 0; i < st.size; i++) for (let j = 0; j < st.size; j++) {
      const [r, gg, b] = colourAt(i, j);
      g.fillStyle = `rgb(${r},${gg},${b})`;
      g.fillRect(st.mx + j * st.cell, st.my + i * st.cell, st.cell - gap, st.cell - gap);
    }
    if (st.cell >= 6) { // the diagonal: a column with itself, struck through
      g.strokeStyle = "#c9c4b8"; g.lineWidth = 1;
      for (let i = 0; i < st.size; i++) {
        const x0 = st.mx + i * st.cell, y0 = st.my + i * st.cell;
        g.strokeRect(x0 + 0.5, y0 + 0.5, st.cell - gap - 1, st.cell - gap - 1);
        g.beginPath(); g.moveTo(x0 + 2, y0 + 2); g.lineTo(x0 + st.cell - gap - 2, y0 + st.cell - gap - 2); g.stroke();
      }
    }
    if (st.mx) { // labels: left (right-aligned) and top (rotated), truncated to the margin
      g.fillStyle = getComputedStyle(ctx.root).getPropertyValue("--isc-ink2").trim() || "#57606a"; g.font = `${Math.min(11, st.cell)}px system-ui, sans-serif`; g.textBaseline = "middle";
      for (let i = 0; i < st.size; i++) {
        const text = fitText(g, st.names[i], st.mx - 6);
        g.textAlign = "right";
        g.fillText(text, st.mx - 4, st.my + i * st.cell + st.cell / 2);
        g.save();
        g.translate(st.mx + i * st.cell + st.cell / 2, st.my - 4);
        g.rotate(-Math.PI / 2);
        g.textAlign = "left";
        g.fillText(text, 0, 0);
        g.restore();
      }
    }
    const sel = ctx.get("selected_pair");
    if (Array.isArray(sel)) {
      const a = st.names.indexOf(sel[0]), b = st.names.indexOf(sel[1]);
      if (a >= 0 && b >= 0) for (const [i, j] of [[a, b], [b, a]]) box(g, i, j, "#d9822b", 2);
    }
    if (document.activeElement === canvas) box(g, st.cursor[0], st.cursor[1], "#1f2328", 1.5, [3, 2]);
    drawLegend();
  }

  function box(g, i, j, colour, width, dash) {
    g.save(); g.strokeStyle = colour; g.lineWidth = width; if (dash) g.setLineDash(dash);
    g.strokeRect(st.mx + j * st.cell - 0.5, st.my + i * st.cell - 0.5, st.cell, st.cell);
    g.restore();
  }

  function drawLegend() {
    const g = legendBar.getContext("2d");
    // the bar runs linearly in value; the colour follows the grid's square-root scale
    for (let x = 0; x < legendBar.width; x++) { g.fillStyle = SEQUENTIAL.css(gridT(x / (legendBar.width - 1), 1)); g.fillRect(x, 0, 1, legendBar.height); }
    legendMin.textContent = "0";
    legendMax.textContent = `${num(st.max)}${HAS_UNIT[st.measure] ? ` ${st.unit}` : ""}`;
  }

  function cellAt(ev) {
    const r = canvas.getBoundingClientRect();
    const j = Math.floor((ev.clientX - r.left - st.mx) / st.cell), i = Math.floor((ev.clientY - r.top - st.my) / st.cell);
    return i >= 0 && j >= 0 && i < st.size && j < st.size ? [i, j] : null;
  }

  function describe(i, j) {
    const k = i * st.size + j, a = st.names[i], b = st.names[j];
    if (i === j) return [String(a), "a column with itself (its own entropy)"];
    const q = st.q[k];
    return [`${a} \u00d7 ${b}`,
      `${MEASURE_SHORT[st.measure] || st.measure} = ${num(st.values[k])}${HAS_UNIT[st.measure] ? ` ${st.unit}` : ""}`,
      `n = ${count(st.n[k])} rows with both present`,
      `q = ${pval(q)} ${q < st.alpha ? "(significant after BH)" : "(not significant after BH)"}`];
  }

  function open(i, j) {
    if (i === j || !st.size) return;
    ctx.set("selected_pair", [st.names[i], st.names[j]]);
  }

  function labelAt(ev) { // a name in the left or top margin (drawn truncated to fit)
    if (!st.mx) return null;
    const r = canvas.getBoundingClientRect();
    const x = ev.clientX - r.left, y = ev.clientY - r.top;
    const i = Math.floor((y - st.my) / st.cell), j = Math.floor((x - st.mx) / st.cell);
    if (x < st.mx && y >= st.my && i >= 0 && i < st.size) return st.names[i];
    if (y < st.my && x >= st.mx && j >= 0 && j < st.size) return st.names[j];
    return null;
  }

  canvas.addEventListener("mousemove", (ev) => {
    const c = cellAt(ev);
    const name = c ? null : labelAt(ev);
    // the full name of a margin label, as text (a title and the view's own tooltip)
    if (name != null) { canvas.title = String(name); canvas.dataset.label = String(name); ctx.tip.show([String(name)], ev.clientX, ev.clientY); return; }
    if (canvas.title) { canvas.removeAttribute("title"); delete canvas.dataset.label; }
    if (!c) { ctx.tip.hide(); canvas.style.cursor = "default"; return; }
    canvas.style.cursor = c[0] === c[1] ? "default" : "pointer";
    ctx.tip.show(describe(c[0], c[1]), ev.clientX, ev.clientY);
  });
  canvas.addEventListener("mouseleave", () => ctx.tip.hide());
  canvas.addEventListener("click", (ev) => { const c = cellAt(ev); if (c) { st.cursor = c; open(c[0], c[1]); } });
  canvas.addEventListener("focus", () => draw());
  canvas.addEventListener("blur", () => draw());
  canvas.addEventListener("keydown", (ev) => {
    if (!st.size) return;
    const moves = { ArrowUp: [-1, 0], ArrowDown: [1, 0], ArrowLeft: [0, -1], ArrowRight: [0, 1] };
    if (moves[ev.key]) {
      ev.preventDefault();
      const [di, dj] = moves[ev.key];
      st.cursor = [Math.max(0, Math.min(st.size - 1, st.cursor[0] + di)), Math.max(0, Math.min(st.size - 1, st.cursor[1] + dj))];
      live.textContent = describe(...st.cursor).join(", ");
      draw();
    } else if (ev.key === "Enter" || ev.key === " ") {
      ev.preventDefault();
      open(...st.cursor);
    }
  });
  let ro = null;
  if (typeof ResizeObserver !== "undefined") {
    let last = 0;
    ro = new ResizeObserver(() => { const w = wrap.clientWidth; if (Math.abs(w - last) > 4) { last = w; draw(); } });
    ro.observe(wrap);
  }
  requestAnimationFrame(draw);
  return { el, draw, destroy: () => ro && ro.disconnect(), state: st, canvas };
}

// colour position of a grid value: square root of the share of the largest off-diagonal
// value, so that a few near-duplicate pairs do not wash every other pair out
function gridT(v, max) { return Math.sqrt(Math.max(0, v) / max); }

function fitText(g, text, width) {
  text = String(text);
  if (g.measureText(text).width <= width) return text;
  let lo = 0, hi = text.length;
  while (lo < hi) { const mid = (lo + hi + 1) >> 1; if (g.measureText(text.slice(0, mid) + "\u2026").width <= width) lo = mid; else hi = mid - 1; }
  return text.slice(0, lo) + "\u2026";
}

// ------------------------------------------------------------------ pair view
function pairKey(a, b) { return `${a}\u0000${b}`; }
function pairFor(ctx) { // the view to show for selected_pair: the kernel's answer, else a precomputed one
  const sel = ctx.get("selected_pair");
  const live = ctx.get("_pair") || {};
  if (!Array.isArray(sel)) return { view: live.a != null ? live : null, pending: false };
  const [a, b] = sel;
  if (live.a === a && live.b === b) return { view: live, pending: false, flipped: false };
  if (live.a === b && live.b === a) return { view: live, pending: false, flipped: true };
  const cache = ctx.get("_pair_cache") || {};
  if (cache[pairKey(a, b)]) return { view: cache[pairKey(a, b)], pending: false };
  if (cache[pairKey(b, a)]) return { view: cache[pairKey(b, a)], pending: false, flipped: true };
  return { view: live.a != null ? live : null, pending: true, wanted: sel };
}

const COMPLEMENT_MARK = "\u00b7"; // a cell hidden to protect a small one (not itself small)

function hiddenNote(view) {
  let small = 0, other = 0;
  for (const row of view.hidden_reasons || []) for (const r of row || []) { if (r === "complement") other++; else if (r) small++; }
  if (!view.hidden_reasons) small = view.hidden_cells;
  const parts = [`${small} cell${small === 1 ? "" : "s"} with fewer than ${view.min_count} rows hidden (\u201c<${view.min_count}\u201d)`];
  if (other) parts.push(`${other} more hidden to protect them (\u201c${COMPLEMENT_MARK}\u201d, any size)`);
  return `${parts.join("; ")}; totals are hidden too.`;
}

function pairView(ctx) {
  const el = h("section", { class: "isc-panel isc-pair", "aria-label": "pair view" });
  const titleEl = h("span", { class: "isc-punit" });
  const body = h("div");
  el.append(h("div", { class: "isc-phead" }, h("span", { class: "isc-ptitle" }, "Pair view"), titleEl), body);

  function draw() {
    clear(body);
    const { view, pending, wanted } = pairFor(ctx);
    if (!view) {
      titleEl.textContent = "";
      body.append(h("div", { class: "isc-empty" }, pending
        ? (ctx.offline ? "This pair was not saved with the export; open it in a live notebook." : "Computing the joint table\u2026")
        : "Click a cell of the information grid to open that pair's joint table."));
      return;
    }
    const unit = view.unit || ctx.unit();
    titleEl.textContent = `${view.a} (rows) \u00d7 ${view.b} (columns)`;
    titleEl.title = titleEl.textContent;
    const holder = h("div", { class: pending ? "isc-dim" : "" });
    if (pending) body.append(h("div", { class: "isc-note" }, ctx.offline
      ? `\u201c${wanted[0]} \u00d7 ${wanted[1]}\u201d was not saved with this export; showing the last pair.`
      : `Computing \u201c${wanted[0]} \u00d7 ${wanted[1]}\u201d\u2026`));
    const stat = (k, v) => h("span", null, `${k} `, h("b", null, v));
    holder.append(h("div", { class: "isc-stats" },
      stat("MI", `${num(view.mi)} ${unit}`), stat("NMI", num(view.nmi)),
      stat("G", view.g == null ? "\u2014" : `${num(view.g, 4)} (dof ${count(view.dof)})`), stat("p", pval(view.p_value)),
      stat("n", count(view.n))));
    let top = 0;
    for (const row of view.pmi || []) for (const v of row) if (v != null && Number.isFinite(v)) top = Math.max(top, Math.abs(v));
    top = top || 1;
    const hiddenLabel = view.min_count ? `<${view.min_count}` : "";
    const thead = h("thead", null, h("tr", null,
      h("th", { class: "isc-corner", scope: "col", title: `rows: ${view.a}; columns: ${view.b}` }, `${view.a} \u2193  ${view.b} \u2192`),
      (view.cols || []).map((c) => h("th", { scope: "col", title: c }, c)),
      view.row_totals ? h("th", { scope: "col", class: "isc-tot" }, "total") : null));
    const tbody = h("tbody");
    (view.rows || []).forEach((rowLabel, i) => {
      const tr = h("tr", null, h("th", { scope: "row", title: rowLabel }, rowLabel));
      (view.cols || []).forEach((colLabel, j) => {
        const n = view.counts[i][j], p = view.pmi[i][j];
        if (n == null) {
          // a complementary cell (hidden only so a small one cannot be worked out from
          // the totals) may hold many rows: it must not say "fewer than"
          const why = (view.hidden_reasons && view.hidden_reasons[i]) ? view.hidden_reasons[i][j] : "small";
          const small = why !== "complement";
          tr.append(h("td", {
            class: small ? "isc-hid" : "isc-hid isc-hid2", "data-hidden": small ? "small" : "complement",
            title: small ? `hidden: fewer than ${view.min_count} rows` : "hidden to protect a small cell",
            "aria-label": small ? `${rowLabel}, ${colLabel}: hidden, fewer than ${view.min_count} rows`
              : `${rowLabel}, ${colLabel}: hidden to protect a small cell`,
          }, small ? hiddenLabel : COMPLEMENT_MARK));
          return;
        }
        const rgb = p == null || !Number.isFinite(p) ? PAPER : DIVERGING.at(0.5 + p / (2 * top));
        const td = h("td", {
          style: { background: `rgb(${rgb.join(",")})`, color: inkOn(rgb) },
          onmousemove: (ev) => ctx.tip.show([`${rowLabel} \u00d7 ${colLabel}`, `${count(n)} rows`,
            p == null || !Number.isFinite(p) ? "no rows: pointwise MI undefined" : `pointwise MI ${num(p)} ${unit} (${p > 0 ? "more" : "fewer"} rows than if independent)`], ev.clientX, ev.clientY),
          onmouseleave: () => ctx.tip.hide(),
        }, count(n));
        tr.append(td);
      });
      if (view.row_totals) tr.append(h("td", { class: "isc-tot" }, count(view.row_totals[i])));
      tbody.append(tr);
    });
    const tfoot = view.col_totals ? h("tfoot", null, h("tr", null, h("th", { scope: "row", class: "isc-tot" }, "total"),
      view.col_totals.map((v) => h("td", { class: "isc-tot" }, count(v))), h("td", { class: "isc-tot" }, count(view.n)))) : null;
    const tableWrap = h("div", { class: "isc-tablewrap" }, h("table", { class: "isc-ptable" }, thead, tbody, tfoot));
    const more = h("div", { class: "isc-note isc-more", "aria-hidden": "true", style: { display: "none" } }, "scroll sideways for more columns \u2192");
    const box = h("div", { class: "isc-tablebox" }, tableWrap);
    holder.append(box, more);
    // a visible cue when the joint table is wider than its panel: a fade at the
    // right edge and a note, both gone once scrolled to the end
    const cue = () => {
      const over = tableWrap.scrollWidth - tableWrap.clientWidth > 2;
      const atEnd = tableWrap.scrollLeft + tableWrap.clientWidth >= tableWrap.scrollWidth - 2;
      box.classList.toggle("isc-overflow", over && !atEnd);
      more.style.display = over ? "" : "none";
    };
    tableWrap.addEventListener("scroll", cue);
    requestAnimationFrame(cue);
    if (typeof ResizeObserver !== "undefined") new ResizeObserver(cue).observe(tableWrap);
    const bar = h("canvas", { width: 140, height: 10, "aria-hidden": "true" });
    const g = bar.getContext("2d");
    for (let x = 0; x < bar.width; x++) { g.fillStyle = DIVERGING.css(x / (bar.width - 1)); g.fillRect(x, 0, 1, bar.height); }
    holder.append(h("div", { class: "isc-legend" }, h("span", null, `\u2212${num(top)} fewer `, bar, ` more +${num(top)} ${unit}`),
      h("span", null, "colour: pointwise MI, log of observed over independent share")));
    if (view.min_count) {
      holder.append(h("div", { class: "isc-note" }, view.hidden_cells
        ? hiddenNote(view)
        : `Cells with fewer than ${view.min_count} rows would be hidden; none are.`));
    }
    body.append(holder);
  }
  draw();
  return { el, draw };
}

// ------------------------------------------------------------------ relevance
function relevanceView(ctx) {
  const el = h("section", { class: "isc-panel isc-relevance", "aria-label": "relevance" });
  const sub = h("span", { class: "isc-punit" });
  const body = h("div", { class: "isc-bars" });
  const legend = h("div", { class: "isc-legend" });
  el.append(h("div", { class: "isc-phead" }, h("span", { class: "isc-ptitle" }, "Relevance"), sub), body, legend);
  function draw() {
    clear(body);
    const data = parseJSON(ctx.get("_relevance"));
    if (!data || data.target == null) {
      sub.textContent = "";
      clear(legend);
      body.append(h("div", { class: "isc-empty" }, ctx.get("target") != null ? "Computing\u2026"
        : "Pick a relevance target in the controls to see how much each column tells about it."));
      return;
    }
    const unit = data.unit || ctx.unit();
    sub.textContent = `mutual information with \u201c${data.target}\u201d, ${unit}`;
    clear(legend);
    legend.append(h("span", null, h("span", { class: "isc-swatch", style: { background: "#b9c7d6" } }),
      `n.s.: not significant after Benjamini\u2013Hochberg (q \u2265 ${num(ctx.get("alpha_fdr") ?? 0.05)})`),
    h("span", null, h("span", { class: "isc-flag isc-leak" }, "possible leak"), " carries \u2265 95% of the target's entropy"),
    h("span", null, "\u251c\u2500\u2524 95% interval"));
    const rows = table(data).sort((a, b) => (b.mi ?? -1) - (a.mi ?? -1));
    let top = 0;
    for (const r of rows) for (const f of ["mi", "ci_high"]) if (Number.isFinite(r[f])) top = Math.max(top, r[f]);
    const max = niceMax(top);
    const x = (v) => `${Math.max(0, Math.min(100, (v / max) * 100))}%`;
    const tickBox = h("div", { class: "isc-ticks" });
    for (const t of ticks(max)) tickBox.append(h("span", { class: "isc-tick", style: { left: x(t) } }, num(t)));
    body.append(h("div", { class: "isc-axis", "aria-hidden": "true" },
      h("span", { class: "isc-name", style: { color: "var(--isc-ink3)", fontSize: "11px" } }, "column"), tickBox,
      h("span", { class: "isc-val", style: { color: "var(--isc-ink3)", fontSize: "11px" } }, unit), h("span")));
    const alpha = ctx.get("alpha_fdr") || 0.05;
    for (const r of rows) {
      const sig = r.q_value != null && r.q_value < alpha;
      const track = h("span", { class: "isc-track" });
      if (Number.isFinite(r.mi)) track.append(h("span", { class: "isc-fill", style: { width: x(r.mi), background: sig ? "var(--isc-bar)" : "#b9c7d6" } }));
      if (Number.isFinite(r.ci_low) && Number.isFinite(r.ci_high)) {
        track.append(h("span", { class: "isc-whisk", style: { left: x(r.ci_low), width: `calc(${x(r.ci_high)} - ${x(r.ci_low)})` } }));
      }
      const marks = h("span", { class: "isc-flags" },
        r.leakage ? h("span", { class: "isc-flag isc-leak", title: "carries at least 95% of the target's entropy: check it is not derived from the target" }, "possible leak") : null,
        r.sparse ? h("span", { class: "isc-flag", title: FLAG_HELP.sparse_cells }, "sparse cells") : null,
        !sig ? h("span", { class: "isc-flag", title: "not significant after Benjamini\u2013Hochberg" }, "n.s.") : null);
      const rowEl = h("div", {
        class: "isc-erow", style: { cursor: "default" }, tabindex: 0,
        onfocus: () => { const bb = rowEl.getBoundingClientRect(); rowEl.dispatchEvent(new MouseEvent("mousemove", { clientX: bb.left + 140, clientY: bb.bottom - 10 })); },
        onblur: () => ctx.tip.hide(),
        "aria-label": `${r.column}: ${num(r.mi)} ${unit} about ${data.target}${r.leakage ? ", possible leak" : ""}`,
        onmousemove: (ev) => ctx.tip.show([String(r.column),
          `I(${r.column}; ${data.target}) = ${num(r.mi)} ${unit}  (95%: ${num(r.ci_low)} \u2013 ${num(r.ci_high)})`,
          `share of the target's entropy ${pct(r.share_of_target)} \u00b7 NMI ${num(r.nmi)}`,
          `p = ${pval(r.p_value)}, q = ${pval(r.q_value)} \u00b7 n = ${count(r.n)}`,
          r.leakage ? "\u25b8 possible leak: nearly determines the target" : null].filter(Boolean), ev.clientX, ev.clientY),
        onmouseleave: () => ctx.tip.hide(),
      }, h("span", { class: "isc-name" }, String(r.column)), track, h("span", { class: "isc-val" }, val(r.mi)), marks);
      body.append(rowEl);
    }
  }
  draw();
  return { el, draw };
}

// ------------------------------------------------------------------ status and cautions
function statusView(ctx, onCancel) {
  const el = h("div", { class: "isc-status", role: "status", "aria-live": "polite" });
  const msg = h("span");
  const prog = h("progress", { max: 1, "aria-label": "recompute progress" });
  const cancel = h("button", { type: "button", class: "isc-btn", onclick: onCancel }, "Cancel");
  el.append(prog, msg, cancel);
  const err = h("div", { class: "isc-error", role: "alert" });
  function draw() {
    const s = ctx.get("_status") || {};
    const busy = s.state === "computing";
    prog.style.display = busy ? "" : "none";
    cancel.style.display = busy && !ctx.offline ? "" : "none";
    if (busy && Number.isFinite(s.progress)) prog.value = s.progress; else prog.removeAttribute("value");
    msg.textContent = ctx.offline ? "saved copy: numbers as exported" : busy ? (s.message || "Recomputing\u2026")
      : s.state === "error" ? "error" : s.message || "";
    const all = Array.isArray(s.notes) ? s.notes : [];
    const notes = all.length > 4 ? [...all.slice(0, 3), `… and ${all.length - 3} more notes (see the kernel log)`] : all;
    err.style.display = s.state === "error" || notes.length ? "" : "none";
    err.textContent = s.state === "error" ? `Could not recompute: ${s.message}\n(The view shows the last finished numbers; details are in the kernel log.)`
      : notes.join("\n");
    if (s.state !== "error") { err.style.background = "#fbf6e9"; err.style.borderColor = "#e7d6a8"; err.style.color = "#5c4a12"; }
    else { err.style.background = ""; err.style.borderColor = ""; err.style.color = ""; }
  }
  draw();
  return { el, err, draw };
}

function cautionView(ctx) {
  const el = h("div", { class: "isc-caution", role: "note" });
  function draw() {
    clear(el);
    const data = ctx.entropy() || {};
    const meta = ctx.get("_meta") || {};
    const rows = table(data);
    const n = rows.reduce((m, r) => Math.max(m, r.n || 0), 0) || meta.n_rows;
    const sampled = data.sampled || meta.sampled;
    const busy = (ctx.get("_status") || {}).state === "computing";
    if (sampled) el.append(h("span", { class: "isc-sampled" }, `Sampled: these numbers come from a seeded sample of ${count(sampled)} rows${meta.n_rows ? ` of ${count(meta.n_rows)}` : ""}${busy && !ctx.offline ? "; the full data follow" : ""}.`));
    el.append(h("span", null, `Estimates from ${n ? `${count(n)} rows` : "a sample"}, with 95% intervals; they carry sampling error.`));
    el.append(h("span", null, "Mutual information measures dependence, not cause."));
    el.append(h("span", null, "Bias-corrected estimates near 0 can be slightly negative."));
    el.append(h("span", null, "Profiles of personal data can reveal rare values: hide small cells, and follow the law and policy that apply."));
  }
  draw();
  return { el, draw };
}

// ------------------------------------------------------------------ render
function render({ model, el }) {
  const root = h("div", { class: "isc-root" });
  const style = h("style", null, CSS);
  el.append(style, root);
  const ctx = makeCtx(model, root);
  const view = model.get("_view") || "profile";
  const status = statusView(ctx, () => model.send({ type: "cancel" }));
  const parts = {};
  const header = h("div", { class: "isc-head" },
    h("span", { class: "isc-title" }, view === "profile" ? "Information profile" : ""),
    h("span", { class: "isc-sub" }), status.el);
  root.append(header, status.err);
  if (view === "profile") {
    parts.controls = controlsView(ctx);
    parts.entropy = entropyView(ctx);
    parts.grid = gridView(ctx);
    parts.pair = pairView(ctx);
    parts.relevance = relevanceView(ctx);
    root.append(parts.controls.el, h("div", { class: "isc-row" }, parts.entropy.el, parts.grid.el),
      h("div", { class: "isc-row" }, parts.pair.el, parts.relevance.el));
  } else {
    const make = { entropy: entropyView, grid: gridView, pair: pairView, relevance: relevanceView }[view] || entropyView;
    parts[view] = make(ctx);
    if (view === "pair") { parts.grid = null; }
    root.append(h("div", { class: "isc-row" }, parts[view].el));
  }
  parts.caution = cautionView(ctx);
  root.append(parts.caution.el);
  const sub = header.querySelector(".isc-sub");
  const drawSub = () => {
    const meta = model.get("_meta") || {};
    sub.textContent = `${(meta.names || []).length} columns \u00b7 ${ESTIMATOR_LABELS[model.get("estimator")] || model.get("estimator")} \u00b7 ${model.get("unit")}`;
  };
  drawSub();

  // batch redraws of one frame: a hold_sync update arrives as several change events
  const dirty = new Set();
  let frame = 0;
  const schedule = (...names) => {
    for (const n of names) dirty.add(n);
    if (frame) return;
    frame = requestAnimationFrame(() => {
      frame = 0;
      const todo = [...dirty];
      dirty.clear();
      for (const n of todo) if (n === "sub") drawSub(); else if (parts[n]) parts[n].draw ? parts[n].draw() : parts[n].sync();
    });
  };
  const wiring = {
    _entropy: ["entropy", "caution", "controls"], sort_by: ["entropy"], selected_column: ["entropy", "controls"],
    _grid_meta: ["grid"], _grid_values: ["grid"], _grid_n: ["grid"], _grid_q: ["grid"], order: ["grid", "controls"],
    selected_pair: ["grid", "pair"], _pair: ["pair"], _relevance: ["relevance"], _status: ["status", "caution"],
    _meta: ["caution", "sub"], alpha_fdr: ["grid", "relevance"],
  };
  for (const k of ["bins", "strategy", "estimator", "alpha", "measure", "unit", "target", "missing", "column_bins", "min_count"]) {
    wiring[k] = ["controls", "sub", ...(k === "target" ? ["relevance"] : [])];
  }
  parts.status = status;
  const handlers = [];
  for (const [name, targets] of Object.entries(wiring)) {
    const cb = () => schedule(...targets);
    model.on(`change:${name}`, cb);
    handlers.push([`change:${name}`, cb]);
  }
  // controls sync is a method named sync, not draw
  if (parts.controls) parts.controls.draw = parts.controls.sync;
  return () => {
    for (const [evt, cb] of handlers) model.off(evt, cb);
    if (parts.grid && parts.grid.destroy) parts.grid.destroy();
    if (frame) cancelAnimationFrame(frame);
    root.remove(); style.remove();
  };
}

// ------------------------------------------------------------------ offline model
// A model for a page without a kernel (the self-contained export, the test harness).
// payload: ProfileWidget.payload(). options.onSave(changes, model) may answer changes
// (a fake kernel); without it, pair views come from payload.pair_cache and other
// settings stay as exported.
function modelFromPayload(payload, options = {}) {
  const state = { ...(payload.state || {}) };
  for (const k of payload.binary || []) state[k] = new DataView(bytesOf(state[k]).buffer);
  state._pair_cache = payload.pair_cache || {};
  if (!options.onSave) state._offline = true;
  const listeners = new Map();
  const changed = new Set();
  const sent = [];
  const emit = (evt) => { for (const cb of [...(listeners.get(evt) || [])]) cb(); };
  const model = {
    get: (k) => state[k],
    set(k, v) { const old = state[k]; state[k] = v; changed.add(k); if (old !== v) emit(`change:${k}`); },
    on(evt, cb) { if (!listeners.has(evt)) listeners.set(evt, new Set()); listeners.get(evt).add(cb); },
    off(evt, cb) { if (!evt) { listeners.clear(); return; } if (cb) listeners.get(evt)?.delete(cb); else listeners.delete(evt); },
    save_changes() {
      const keys = [...changed]; changed.clear();
      sent.push(Object.fromEntries(keys.map((k) => [k, state[k]])));
      if (options.onSave) options.onSave(keys, model);
    },
    send(msg) { sent.push({ $msg: msg }); if (options.onSend) options.onSend(msg, model); },
    sent,
  };
  return model;
}

export { render, modelFromPayload, SEQUENTIAL, DIVERGING, VERSION };
export default { render };
