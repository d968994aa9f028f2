// The status line (progress, cancel, errors, notes) and the caution line under every view.
import { h, clear } from "../dom.js";
import { table } from "../decode.js";
import { count, levelText } from "../format.js";

export function statusView(ctx, onCancel) {
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
    // one isolated line per note: a name inside a note cannot reorder the next note
    clear(err);
    const lines = s.state === "error" ? [`Could not recompute: ${s.message}`, "(The view shows the last finished numbers; details are in the kernel log.)"] : notes;
    for (const line of lines) err.append(h("div", { class: "isc-line" }, String(line)));
    err.classList.toggle("isc-notes", s.state !== "error");
  }
  draw();
  return { el, err, draw };
}

export function cautionView(ctx) {
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
    el.append(h("span", null, `Estimates from ${n ? `${count(n)} rows` : "a sample"}, with ${levelText(data.ci)} intervals; they carry sampling error.`));
    if (meta.weights != null) {
      el.append(h("span", { class: "isc-weighted" }, "Rows weighted by ", h("bdi", null, String(meta.weights)),
        `: an effective sample size of ${count(Math.round(meta.n_effective || 0))} rows (Kish), which the bias corrections, intervals and tests use.`));
    }
    el.append(h("span", null, "Mutual information measures dependence, not cause."));
    el.append(h("span", null, "Bias-corrected estimates near 0 can be slightly negative."));
    el.append(h("span", null, "Profiles of personal data can reveal rare values: hide small cells, and follow the law and policy that apply."));
  }
  draw();
  return { el, draw };
}
