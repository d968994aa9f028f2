// The surprising-rows view: the rows least likely under the Chow-Liu tree of the
// columns (bits), each with the cells that contribute most; the tree is listed small
// beside it. Values are hidden when the export suppresses small cells.
import { h, clear, nameEl } from "../dom.js";
import { parseJSON, table } from "../decode.js";
import { amount, count, num, signed } from "../format.js";
import { cellWords } from "../selection.js";

export function surprisingView(ctx) {
  const el = h("section", { class: "isc-panel isc-surprising", "aria-label": "surprising rows" });
  const sub = h("span", { class: "isc-punit" });
  const body = h("div", { class: "isc-tablewrap" });
  const treeBox = h("div", { class: "isc-tree" });
  const legend = h("div", { class: "isc-legend" });
  el.append(h("div", { class: "isc-phead" }, h("span", { class: "isc-ptitle" }, "Surprising rows"), sub), body, treeBox, legend);

  function draw() {
    clear(body); clear(treeBox); clear(legend); clear(sub);
    const data = parseJSON(ctx.get("_surprising"));
    if (!data || !Array.isArray(data.rows)) {
      body.append(h("div", { class: "isc-empty" }, "Computing\u2026"));
      return;
    }
    const hidden = !!data.hidden_values;
    sub.append(`surprisal in bits under the ${data.model === "independent" ? "product of the margins" : "tree of the columns"}; mean row ${amount(data.mean_surprisal)} bits`);
    const rows = table(data);
    const tbl = h("table", { class: "isc-surtable" });
    tbl.append(h("thead", null, h("tr", null, h("th", null, "#"), h("th", null, "row"), h("th", null, "bits"),
      h("th", null, "above mean"), h("th", null, "cells that make it surprising"))));
    const tb = h("tbody");
    rows.forEach((r, i) => {
      const cells = (data.cells && data.cells[i]) || [];
      const list = h("span", { class: "isc-surcells" });
      cells.forEach((c, j) => {
        if (j) list.append(" \u00b7 ");
        // a value is data too: its own <bdi>, so right-to-left text cannot reorder the words around it
        const value = hidden ? "(hidden)" : c.value != null ? c.value : c.symbol != null ? c.symbol : null;
        list.append(h("span", { class: "isc-surcell", title: cellWords(c, hidden), "data-bits": String(c.bits) },
          nameEl(c.column), " = ", value == null ? "missing" : hidden ? value : h("bdi", null, String(value)),
          c.parent != null ? [" given ", nameEl(c.parent)] : null,
          h("b", null, ` ${num(c.bits, 3)} bits`)));
      });
      tb.append(h("tr", { "data-rank": String(r.rank) }, h("td", null, count(r.rank)), h("td", null, h("bdi", null, String(r.row))),
        h("td", null, amount(r.surprisal)), h("td", null, signed(r.excess, 3)), h("td", null, list)));
    });
    tbl.append(tb);
    body.append(tbl);
    const tree = data.tree || {};
    if (Array.isArray(tree.edges) && tree.edges.length) {
      const ul = h("ul", { class: "isc-treelist", "aria-label": "tree of the columns" });
      for (const [parent, child, mi, depth] of tree.edges) {
        ul.append(h("li", { style: { paddingLeft: `${Math.min(depth || 0, 8) * 10}px` } }, nameEl(parent), " \u2192 ", nameEl(child), ` ${amount(mi)} ${tree.unit || "bits"}`));
      }
      treeBox.append(h("div", { class: "isc-ptitle" }, "tree (strongest links, from ", nameEl(tree.root), ")"), ul);
    }
    legend.append(h("span", null, "bits: \u2212log\u2082 of the row's probability under the model (Dirichlet-smoothed)"),
      h("span", null, "a surprising row is an error or a rare real case: look before removing it"),
      hidden ? h("span", null, `values hidden (small-cell suppression, min_count = ${count(data.min_count)}); the scores are kept`) : null);
  }
  draw();
  return { el, draw };
}
