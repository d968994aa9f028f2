"""Names as data in the browser: a frame with a 5,000-character column name and a
name holding a right-to-left override (U+202E), and page checks that neither runs
out of its panel nor reorders the label text around it (Unicode bidi, UAX #9)."""
from __future__ import annotations

import numpy as np
import pandas as pd

LONG = "w" * 5000
RTL = "\u202eroute_code"  # RIGHT-TO-LEFT OVERRIDE: text after it shows reversed unless isolated


def odd_names_frame(n: int = 400, seed: int = 11) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    late = rng.choice([True, False], size=n)
    return pd.DataFrame({
        LONG: rng.normal(size=n) + late,
        RTL: rng.choice(list("ABCD"), size=n),
        "depot": rng.choice(["north", "south", "east"], size=n),
        "late": late,
    })


# every name element stays inside its panel and the page does not scroll sideways
CONTAINED = """() => {
  const bad = [];
  for (const el of document.querySelectorAll('.isc-root .isc-nm, .isc-root .isc-punit, .isc-root .isc-name, .isc-root label')) {
    const panel = el.closest('.isc-panel, .isc-controls');
    if (!panel || el.closest('.isc-tablewrap') || el.closest('.isc-tip')) continue;
    const r = el.getBoundingClientRect(), p = panel.getBoundingClientRect();
    if (r.width > 0 && (r.right > p.right + 1 || r.left < p.left - 1)) bad.push([el.className, Math.round(r.left), Math.round(r.right), Math.round(p.left), Math.round(p.right)]);
  }
  for (const p of document.querySelectorAll('.isc-root .isc-panel')) {
    const r = p.getBoundingClientRect(), root = p.closest('.isc-root').getBoundingClientRect();
    if (r.right > root.right + 1) bad.push(['panel', p.className, Math.round(r.right), Math.round(root.right)]);
  }
  if (document.documentElement.scrollWidth > window.innerWidth + 1) bad.push(['page', document.documentElement.scrollWidth, window.innerWidth]);
  return bad;
}"""

# the characters of `word` inside the element matching `sel` are laid out left to
# right (a leaked override would lay them out right to left)
IN_ORDER = """([sel, word]) => {
  const root = document.querySelector(sel);
  if (!root) return 'no element ' + sel;
  const walker = document.createTreeWalker(root, NodeFilter.SHOW_TEXT);
  for (let node = walker.nextNode(); node; node = walker.nextNode()) {
    const at = node.data.indexOf(word);
    if (at < 0) continue;
    const xs = [];
    for (let i = at; i < at + word.length; i++) {
      const range = document.createRange(); range.setStart(node, i); range.setEnd(node, i + 1);
      xs.push(range.getBoundingClientRect().left);
    }
    for (let i = 1; i < xs.length; i++) if (!(xs[i] > xs[i - 1])) return `"${word}" is laid out out of order: ${xs.map(Math.round)}`;
    return 'ok';
  }
  return `no text "${word}" in ${sel}`;
}"""
