import { gunzipSync, gzipSync } from 'node:zlib';

/**
 * Compact storage of long numeric arrays in bytea columns: the raw little-endian bytes (Float64 or
 * Int32), gzip-compressed. Written through DataView so the bytes are little-endian on any host.
 */

export function encodeFloat64(values: ArrayLike<number>): Buffer {
  const bytes = new DataView(new ArrayBuffer(values.length * 8));
  for (let k = 0; k < values.length; k++) bytes.setFloat64(k * 8, values[k]!, true);
  return gzipSync(new Uint8Array(bytes.buffer));
}

export function decodeFloat64(stored: Uint8Array): Float64Array {
  const raw = gunzipSync(stored);
  if (raw.length % 8 !== 0) throw new Error(`a stored Float64 array has ${raw.length} bytes, not a multiple of 8`);
  const view = new DataView(raw.buffer, raw.byteOffset, raw.byteLength);
  const values = new Float64Array(raw.length / 8);
  for (let k = 0; k < values.length; k++) values[k] = view.getFloat64(k * 8, true);
  return values;
}

export function encodeInt32(values: ArrayLike<number>): Buffer {
  const bytes = new DataView(new ArrayBuffer(values.length * 4));
  for (let k = 0; k < values.length; k++) bytes.setInt32(k * 4, values[k]!, true);
  return gzipSync(new Uint8Array(bytes.buffer));
}

export function decodeInt32(stored: Uint8Array): Int32Array {
  const raw = gunzipSync(stored);
  if (raw.length % 4 !== 0) throw new Error(`a stored Int32 array has ${raw.length} bytes, not a multiple of 4`);
  const view = new DataView(raw.buffer, raw.byteOffset, raw.byteLength);
  const values = new Int32Array(raw.length / 4);
  for (let k = 0; k < values.length; k++) values[k] = view.getInt32(k * 4, true);
  return values;
}
