import { gunzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { BitRelation } from '../../server/engine/order';
import {
  compressBytes,
  decodeFloat64,
  decodeInt32,
  decodeRelationWords,
  decompressBytes,
  encodeFloat64,
  encodeInt32,
  encodeRelation,
  packFloat64,
} from '../../server/db/codecs';

describe('byte codecs of stored arrays', () => {
  it('round-trips every float64 bit pattern exactly, including subnormals, −0 and extremes', () => {
    const values = Float64Array.from([0, -0, 1, -1, Math.PI, 1 / 3, 5e-324, -Number.MIN_VALUE, Number.MAX_VALUE, 1e-300, 123456789.123456789]);
    const random = Float64Array.from({ length: 5000 }, (_, k) => Math.sin(k * 12.9898) * 43758.5453);
    for (const sample of [values, random, new Float64Array(0)]) {
      const back = decodeFloat64(encodeFloat64(sample));
      expect(back.length).toBe(sample.length);
      for (let k = 0; k < sample.length; k++) expect(Object.is(back[k], sample[k])).toBe(true);
    }
  });

  it('stores little-endian IEEE 754 bytes under gzip (1.0 is 00 00 00 00 00 00 f0 3f, common practice)', () => {
    const raw = gunzipSync(encodeFloat64([1]));
    expect([...raw]).toEqual([0, 0, 0, 0, 0, 0, 0xf0, 0x3f]);
    expect([...gunzipSync(encodeInt32([1, -2]))]).toEqual([1, 0, 0, 0, 0xfe, 0xff, 0xff, 0xff]);
  });

  it('round-trips int32 element labels and compresses repetitive data', () => {
    const labels = Int32Array.from({ length: 3000 }, (_, k) => k * 7 - 5);
    expect(Array.from(decodeInt32(encodeInt32(labels)))).toEqual(Array.from(labels));
    expect(encodeInt32(labels).length).toBeLessThan(labels.length * 4);
  });

  it('rejects a stored blob whose length is not whole numbers', () => {
    expect(() => decodeFloat64(encodeInt32([1]))).toThrow(/not a multiple of 8/);
  });

  it('stores points as gzip of their raw layout, relations as gzip of their words, files as they came', () => {
    const points = Float64Array.from([0.25, -1.5, 2, 0]);
    expect([...gunzipSync(encodeFloat64(points))]).toEqual([...packFloat64(points)]);
    // 0 ≺ 2 and 1 ≺ 2 on 40 elements: two words per row, bits 2 of rows 0 and 1
    const causal = new BitRelation(40);
    causal.set(0, 2);
    causal.set(1, 2);
    const words = decodeRelationWords(encodeRelation(causal), 40);
    expect(words.length).toBe(80);
    expect(Array.from(words)).toEqual(Array.from(causal.words));
    expect(() => decodeRelationWords(encodeRelation(causal), 41)).toThrow(/bytes/);
    const file = Buffer.from('t,x\n0,0\n', 'utf8');
    expect(decompressBytes(compressBytes(file)).equals(file)).toBe(true);
  });
});
