import { bytesOf } from "./decode.js";

// A model for a page without a kernel (the self-contained export, the test harness).
// payload: ProfileWidget.payload(). options.onSave(changes, model) may answer changes
// (a fake kernel); without it, pair views come from payload.pair_cache and other
// settings stay as exported.
export function modelFromPayload(payload, options = {}) {
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
