// Decoding what the kernel sends: binary buffers (DataView, ArrayBuffer, typed
// arrays, base64 text from a saved payload), JSON text, {fields, rows} tables.
// Pure functions: no DOM.

function b64bytes(text) {
  const bin = atob(text);
  const out = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
  return out;
}

// DataView | ArrayBuffer | typed array | base64 text | array of bytes -> Uint8Array copy
export function bytesOf(x) {
  if (x == null || x === "") return new Uint8Array(0);
  if (typeof x === "string") return b64bytes(x);
  if (x instanceof ArrayBuffer) return new Uint8Array(x.slice(0));
  if (ArrayBuffer.isView(x)) return new Uint8Array(x.buffer.slice(x.byteOffset, x.byteOffset + x.byteLength));
  if (Array.isArray(x)) return Uint8Array.from(x);
  return new Uint8Array(0);
}

export function asFloat32(x) { const b = bytesOf(x); return new Float32Array(b.buffer, 0, Math.floor(b.byteLength / 4)); }
export function asInt32(x) { const b = bytesOf(x); return new Int32Array(b.buffer, 0, Math.floor(b.byteLength / 4)); }

export function asUint8(x) { return bytesOf(x); }

export function parseJSON(text) {
  if (text == null || text === "") return null;
  if (typeof text === "object") return text;
  try { return JSON.parse(text); } catch (e) { return null; }
}

// {fields, rows} -> array of objects
export function table(obj) {
  if (!obj || !Array.isArray(obj.rows)) return [];
  return obj.rows.map((r) => Object.fromEntries(obj.fields.map((f, i) => [f, r[i]])));
}
