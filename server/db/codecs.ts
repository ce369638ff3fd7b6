import { gunzipSync, gzipSync } from 'node:zlib';
import { BitRelation } from '../engine/order';

/**
 * Every byte form the database keeps, in one place. Long numeric arrays go into bytea columns as
 * their raw little-endian bytes (Float64, Int32, or the uint32 words of a bit-packed relation),
 * gzip-compressed; an uploaded file is kept gzip-compressed as it came. Written through DataView /
 * Buffer's LE writers so the bytes are little-endian on any host.
 */

// ---- raw layouts (what gzip is applied to) ----

/** Float64 values → their IEEE 754 bytes, little-endian, one after the other (points: element after element). */
export function packFloat64(values: ArrayLike<number>): Buffer {
  const out = Buffer.alloc(values.length * 8);
  for (let k = 0; k < values.length; k++) out.writeDoubleLE(values[k]!, k * 8);
  return out;
}

export function unpackFloat64(bytes: Uint8Array): Float64Array {
  if (bytes.length % 8 !== 0) throw new RangeError(`a stored Float64 array has ${bytes.length} bytes, not a multiple of 8`);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const values = new Float64Array(bytes.length / 8);
  for (let k = 0; k < values.length; k++) values[k] = view.getFloat64(k * 8, true);
  return values;
}

function packInt32(values: ArrayLike<number>): Buffer {
  const out = Buffer.alloc(values.length * 4);
  const view = new DataView(out.buffer, out.byteOffset, out.byteLength);
  for (let k = 0; k < values.length; k++) view.setInt32(k * 4, values[k]!, true);
  return out;
}

function unpackInt32(bytes: Uint8Array): Int32Array {
  if (bytes.length % 4 !== 0) throw new RangeError(`a stored Int32 array has ${bytes.length} bytes, not a multiple of 4`);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const values = new Int32Array(bytes.length / 4);
  for (let k = 0; k < values.length; k++) values[k] = view.getInt32(k * 4, true);
  return values;
}

/** Closed relation → bytes: the BitRelation words (rows of ⌈N/32⌉ words), each uint32 little-endian. */
export function packRelation(causal: BitRelation): Buffer {
  const out = Buffer.alloc(causal.words.length * 4);
  for (let k = 0; k < causal.words.length; k++) out.writeUInt32LE(causal.words[k]!, k * 4);
  return out;
}

export function unpackRelation(bytes: Uint8Array, n: number): BitRelation {
  const rel = new BitRelation(n);
  if (bytes.length !== rel.words.length * 4) {
    throw new RangeError(`a packed relation on ${n} elements has ${rel.words.length * 4} bytes, got ${bytes.length}`);
  }
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  for (let k = 0; k < rel.words.length; k++) rel.words[k] = view.getUint32(k * 4, true);
  return rel;
}

// ---- stored forms (gzip of the raw layouts) ----

/** Points, eigenvalues, the coordinates of an imported causal set. */
export function encodeFloat64(values: ArrayLike<number>): Buffer {
  return gzipSync(packFloat64(values));
}

export function decodeFloat64(stored: Uint8Array): Float64Array {
  return unpackFloat64(gunzipSync(stored));
}

/** Element labels (a run's subregion elements). */
export function encodeInt32(values: ArrayLike<number>): Buffer {
  return gzipSync(packInt32(values));
}

export function decodeInt32(stored: Uint8Array): Int32Array {
  return unpackInt32(gunzipSync(stored));
}

/** The closed relation of an imported relation list (in causal_sets, runs and study cells alike). */
export function encodeRelation(causal: BitRelation): Buffer {
  return gzipSync(packRelation(causal));
}

/** Stored relation → its words, as the engine's order source takes them. */
export function decodeRelationWords(stored: Uint8Array, n: number): Uint32Array {
  return unpackRelation(gunzipSync(stored), n).words;
}

/** An uploaded file, kept so it can be downloaded exactly as it came. */
export function compressBytes(bytes: Uint8Array): Buffer {
  return gzipSync(bytes);
}

export function decompressBytes(stored: Uint8Array): Buffer {
  return gunzipSync(stored);
}
