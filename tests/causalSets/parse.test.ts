import { describe, expect, it } from 'vitest';
import { CausalSetFileError, parseCoordinatesCsv, parseRelationList, type SizeLimit } from '../../server/causalSets/parse';
import { linearExtension, orderSummary, transitiveClosure } from '../../server/engine/orderAlgorithms';
import { packFloat64, packRelation, unpackFloat64, unpackRelation } from '../../server/db/codecs';
import { causalMatrix, linkMatrix } from '../../server/engine/order';
import { sprinkle } from '../../server/engine/sprinkle';
import { runPython } from '../support/python';

const limit: SizeLimit = { maxElements: 3000, reason: 'test limit' };

function fileError(work: () => unknown): CausalSetFileError {
  try {
    work();
  } catch (error) {
    if (error instanceof CausalSetFileError) return error;
    throw error;
  }
  throw new Error('expected a CausalSetFileError');
}

function relationRows(n: number, pairs: [number, number][]): { from: Int32Array; to: Int32Array } {
  return { from: Int32Array.from(pairs.map((p) => p[0])), to: Int32Array.from(pairs.map((p) => p[1])) };
}

describe('coordinates CSV', () => {
  it('reads a 2D and a 4D file with comments, blank lines, CRLF, quotes and a BOM', () => {
    const two = parseCoordinatesCsv('\ufeff# from elsewhere\r\nt,x\r\n0.5,-0.25\r\n\r\n"-0.125",1e-3\r\n', { limit });
    expect(two.dimension).toBe(2);
    expect(Array.from(two.points)).toEqual([0.5, -0.25, -0.125, 0.001]);
    const four = parseCoordinatesCsv('T, X, Y, Z\n0,0,0,0\n1,0.1,0.2,0.3\n', { limit });
    expect(four.dimension).toBe(4);
    expect(four.n).toBe(2);
  });

  it('keeps full double precision (17 significant digits round-trip)', () => {
    const values = [0.1 + 0.2, Math.PI / 7, -Math.E * 1e-9, 1 / 3];
    const text = `t,x\n${values[0].toPrecision(17)},${values[1].toPrecision(17)}\n${values[2].toPrecision(17)},${values[3].toPrecision(17)}\n`;
    expect(Array.from(parseCoordinatesCsv(text, { limit }).points)).toEqual(values);
  });

  it('says the header is missing when the first row holds numbers', () => {
    const e = fileError(() => parseCoordinatesCsv('0.1,0.2\n0.3,0.4\n', { limit }));
    expect(e.code).toBe('invalid_file');
    expect(e.message).toMatch(/^row 1: the header is missing/);
  });

  it('names a wrong header and the expected one', () => {
    const e = fileError(() => parseCoordinatesCsv('x,t\n0,0\n1,0\n', { limit }));
    expect(e.message).toBe('row 1: wrong header "x,t": the columns must be t,x for 2D or t,x,y,z for 4D, in that order');
    expect(fileError(() => parseCoordinatesCsv('t,x,y\n0,0,0\n', { limit })).message).toMatch(/wrong header "t,x,y"/);
  });

  it('gives row and column of non-numbers, NaN and Inf, and lists several problems', () => {
    const e = fileError(() => parseCoordinatesCsv('t,x\n0,0\n0.1,abc\n# note\nNaN,0.2\n0.3,-Inf\n0.4,1e999\n', { limit }));
    expect(e.problems.map((p) => [p.row, p.column])).toEqual([[3, 2], [5, 1], [6, 2], [7, 2]]);
    expect(e.problems[0].message).toBe('row 3, column 2: (x) "abc" is not a number');
    expect(e.problems[1].message).toMatch(/^row 5, column 1: \(t\) "NaN" is not a finite number/);
    expect(e.problems[2].message).toMatch(/^row 6, column 2: \(x\) "-Inf" is not a finite number/);
    expect(e.problems[3].message).toMatch(/overflows/);
    expect(e.message).toMatch(/\(and 3 more problems\)$/);
  });

  it('says which row has the wrong number of columns', () => {
    const e = fileError(() => parseCoordinatesCsv('t,x\n0,0\n0.1,0.2,0.3\n0.4\n', { limit }));
    expect(e.problems.map((p) => p.message)).toEqual([
      'row 3: 3 columns, but the header t,x has 2',
      'row 4: 1 column, but the header t,x has 2',
    ]);
  });

  it('names both rows of a duplicate point', () => {
    const e = fileError(() => parseCoordinatesCsv('t,x\n0,0.5\n1,0\n0.0,5e-1\n', { limit }));
    expect(e.message).toBe('row 4: duplicate point: (t = 0, x = 0.5) already appears in row 2');
  });

  it('rejects points outside the stated region with the exact membership test', () => {
    // 2D diamond of proper time 2: |t| + |x| < 1 (server/engine/README.md §2)
    const region = { kind: 'diamond2d', properTime: 2 } as const;
    expect(parseCoordinatesCsv('t,x\n0,0.99\n0.5,-0.49\n', { region, limit }).n).toBe(2);
    const e = fileError(() => parseCoordinatesCsv('t,x\n0,0.99\n0.5,0.51\n', { region, limit }));
    // and the message names the region that would hold the file: |t| + |x| reaches 1.01, so T > 2.02, 2.1 at two figures (by hand)
    expect(e.message).toBe(
      'row 3: the point (t = 0.5, x = 0.51) lies outside the stated region (diamond2d); every point lies inside 2D causal diamond, T = 2.1 (diamond2d, properTime 2.1), the smallest centred diamond holding them; import with that region, or scale by a density instead',
    );
    const four = fileError(() => parseCoordinatesCsv('t,x\n0,0\n0.1,0\n', { region: { kind: 'diamond4d', properTime: 2 }, limit }));
    expect(four.message).toMatch(/header is 2D but the region diamond4d is 4D/);
  });

  it('rejects an empty file, a header without rows, and a single element', () => {
    expect(fileError(() => parseCoordinatesCsv(new Uint8Array(0), { limit })).code).toBe('empty_file');
    expect(fileError(() => parseCoordinatesCsv(Buffer.from('\n  \n# only a note\n'), { limit })).code).toBe('empty_file');
    expect(fileError(() => parseCoordinatesCsv('t,x\n', { limit })).message).toBe('the file has a header but no elements');
    expect(fileError(() => parseCoordinatesCsv('t,x\n0,0\n', { limit })).message).toMatch(/at least 2 elements/);
  });

  it('rejects more elements than the limit before reading them, saying the limit and why', () => {
    const rows = Array.from({ length: 11 }, (_, i) => `${i},0`).join('\n');
    const e = fileError(() => parseCoordinatesCsv(`t,x\n${rows}\n`, { limit: { maxElements: 10, reason: 'dense matrices' } }));
    expect(e.code).toBe('too_large');
    expect(e.message).toBe('the causal set has 11 elements, more than the engine can hold (10): dense matrices');
  });

  it('rejects binary and non-UTF-8 uploads', () => {
    expect(fileError(() => parseCoordinatesCsv(Uint8Array.from([0x74, 0x2c, 0x78, 0x0a, 0x00, 0x01]), { limit })).message).toMatch(/not text/);
    expect(fileError(() => parseCoordinatesCsv(Uint8Array.from([0x74, 0x2c, 0x78, 0x0a, 0xff, 0xfe, 0x0a]), { limit })).message).toMatch(/UTF-8/);
  });
});

describe('relation lists', () => {
  it('closes the relation transitively, with or without a header', () => {
    const parsed = parseRelationList('i,j\n0,1\n1,2\n# chain continues\n2,3\n', { count: 5, limit });
    const pairs: string[] = [];
    parsed.causal.forEach((i, j) => pairs.push(`${i}${j}`));
    expect(pairs).toEqual(['01', '02', '03', '12', '13', '23']);
    expect(parseRelationList('3,1\n1,0\n', { count: 4, limit }).causal.has(3, 0)).toBe(true);
  });

  it('closes the links of a sprinkling back to its causal matrix (the light-cone order is transitive)', () => {
    // fact of the trade (common practice): a causal order is the transitive closure of its links
    for (const region of [{ kind: 'diamond2d', properTime: 2 }, { kind: 'diamond4d', properTime: 2 }] as const) {
      const s = sprinkle({ region, process: 'fixed', count: 300, seed: `links-${region.kind}`, prng: 'arc4' });
      const causal = causalMatrix(s.points, s.dimension);
      const lines: string[] = [];
      linkMatrix(causal).forEach((i, j) => lines.push(`${i},${j}`));
      lines.reverse(); // any order of rows must do
      const closed = parseRelationList(lines.join('\n'), { count: s.count, limit }).causal;
      expect(Array.from(closed.words)).toEqual(Array.from(causal.words));
    }
  });

  it('agrees with a closure computed by numpy (boolean matrix squaring) on a random DAG', () => {
    const n = 90;
    const pairs: [number, number][] = [];
    let seed = 12345;
    const next = () => ((seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31);
    const label = Array.from({ length: n }, (_, i) => i).sort(() => next() - 0.5);
    for (let a = 0; a < n; a++) for (let b = a + 1; b < n; b++) if (next() < 0.03) pairs.push([label[a], label[b]]);
    const { from, to } = relationRows(n, pairs);
    const closed = transitiveClosure(n, from, to);
    const reference = runPython<number[][]>(
      `import json,sys,numpy as np
d=json.load(sys.stdin); n=d['n']; R=np.zeros((n,n),dtype=bool)
for i,j in d['pairs']: R[i,j]=True
while True:
    S=R|((R.astype(np.int64)@R.astype(np.int64))>0)
    if (S==R).all(): break
    R=S
print(json.dumps(np.argwhere(R).tolist()))`,
      { n, pairs },
    );
    const ours: number[][] = [];
    closed.forEach((i, j) => ours.push([i, j]));
    expect(ours).toEqual(reference);
  });

  it('finds a cycle and names the rows it is made of', () => {
    const e = fileError(() => parseRelationList('i,j\n0,1\n4,2\n1,2\n2,3\n3,1\n', { count: 5, limit }));
    expect(e.code).toBe('invalid_file');
    expect(e.message).toBe('rows 4, 5 and 6 form a cycle 1 ≺ 2 ≺ 3 ≺ 1; a causal order has no cycles');
    expect(e.problems[0].row).toBe(4);
    expect(fileError(() => parseRelationList('0,1\n1,0\n', { count: 2, limit })).message).toBe(
      'rows 1 and 2 form a cycle 0 ≺ 1 ≺ 0; a causal order has no cycles',
    );
  });

  it('rejects a self-relation, indices out of range, non-integers, wrong widths and a wrong header', () => {
    expect(fileError(() => parseRelationList('0,1\n2,2\n', { count: 3, limit })).message).toBe(
      'row 2: element 2 cannot precede itself (a causal order is irreflexive)',
    );
    const e = fileError(() => parseRelationList('i,j\n0,3\n-1,2\n1.5,2\n0,x\n1,2,3\nInf,1\n', { count: 3, limit }));
    expect(e.problems.map((p) => p.message)).toEqual([
      'row 2, column 2: (j) index out of range: element 3 does not exist (labels run from 0 to 2)',
      'row 3, column 1: (i) index out of range: element -1 does not exist (labels run from 0 to 2)',
      'row 4, column 1: (i) "1.5" is not a whole number; element labels are 0, 1, 2, …',
      'row 5, column 2: (j) "x" is not a number',
      'row 6: 3 columns, but a relation row has 2 (i,j: i precedes j)',
      'row 7, column 1: (i) "Inf" is not a finite number; expected an element label',
    ]);
    expect(fileError(() => parseRelationList('from,to\n0,1\n', { count: 2, limit })).message).toBe(
      'row 1: wrong header "from,to": a relation list has the header i,j or none',
    );
  });

  it('rejects an empty file and a count over the limit', () => {
    expect(fileError(() => parseRelationList('', { count: 3, limit })).code).toBe('empty_file');
    const e = fileError(() => parseRelationList('0,1\n', { count: 3001, limit }));
    expect(e.code).toBe('too_large');
    expect(e.message).toMatch(/3001 elements, more than the engine can hold \(3000\)/);
  });
});

describe('order summary and packing', () => {
  it('counts relations, links, height, layers, minimal and maximal elements of a small order', () => {
    // 0 ≺ 1 ≺ 3, 0 ≺ 2 ≺ 3, 4 alone: the closure has 5 relations and 4 links
    const closed = parseRelationList('0,1\n0,2\n1,3\n2,3\n', { count: 5, limit }).causal;
    expect(orderSummary(closed)).toEqual({
      relations: 5,
      links: 4,
      orderingFraction: 5 / 10,
      height: 3,
      minimal: 2,
      maximal: 2,
      layerSizes: [2, 2, 1],
    });
    const order = Array.from(linearExtension(closed));
    closed.forEach((i, j) => expect(order.indexOf(i)).toBeLessThan(order.indexOf(j)));
  });

  it('gives the ordering fraction of a sprinkled diamond near 1/2 in 2D and 1/10 in 4D', () => {
    // Myrheim 1978 / Meyer 1988 (recalled from memory): for a d-dimensional diamond the expected
    // ordering fraction is Γ(d+1)Γ(d/2) / (2Γ(3d/2)): 1/2 for d = 2, 1/10 for d = 4.
    for (const [region, expected] of [
      [{ kind: 'diamond2d', properTime: 2 }, 0.5],
      [{ kind: 'diamond4d', properTime: 2 }, 0.1],
    ] as const) {
      const s = sprinkle({ region, process: 'fixed', count: 800, seed: `fraction-${region.kind}`, prng: 'arc4' });
      const { orderingFraction } = orderSummary(causalMatrix(s.points, s.dimension));
      expect(Math.abs(orderingFraction - expected)).toBeLessThan(0.04);
    }
  });

  it('round-trips points and relations through their byte forms', () => {
    const points = Float64Array.from([0.1, -2.5e-300, Math.PI, -0]);
    expect(Array.from(unpackFloat64(packFloat64(points)))).toEqual(Array.from(points));
    const closed = parseRelationList('0,40\n40,39\n', { count: 41, limit }).causal;
    const bytes = packRelation(closed);
    expect(bytes.length).toBe(41 * 2 * 4);
    expect(Array.from(unpackRelation(bytes, 41).words)).toEqual(Array.from(closed.words));
    expect(() => unpackRelation(bytes.subarray(4), 41)).toThrow(/bytes/);
  });
});
