import { describe, expect, it } from 'vitest';
import { BitRelation } from '../../server/engine/order';
import { findCycle, linearExtension, RelationCycleError, transitiveClosure } from '../../server/engine/orderAlgorithms';

const pairs = (list: [number, number][]) => ({ from: Int32Array.from(list, (p) => p[0]), to: Int32Array.from(list, (p) => p[1]) });

describe('order algorithms on a relation given by its pairs', () => {
  it('finds no cycle in a DAG and closes it (worked example: 0 ≺ 1 ≺ 2 and 3 ≺ 2)', () => {
    const { from, to } = pairs([[1, 2], [0, 1], [3, 2]]);
    expect(findCycle(4, from, to)).toBeNull();
    const closed = transitiveClosure(4, from, to);
    const listed: [number, number][] = [];
    closed.forEach((i, j) => listed.push([i, j]));
    expect(listed).toEqual([[0, 1], [0, 2], [1, 2], [3, 2]]);
  });

  it('names a cycle by its pairs in chain order, and refuses to close it', () => {
    // worked example: pairs 1, 2, 3 are 1 ≺ 2 ≺ 3 ≺ 1; pair 0 (0 ≺ 1) and pair 4 (4 ≺ 2) lead into it
    const { from, to } = pairs([[0, 1], [1, 2], [2, 3], [3, 1], [4, 2]]);
    const cycle = findCycle(5, from, to)!;
    expect(cycle).toBeInstanceOf(RelationCycleError);
    const rotation = Array.from(cycle.pairs);
    // each pair's end is the next one's start, and the chain closes
    rotation.forEach((p, k) => expect(to[p]).toBe(from[rotation[(k + 1) % rotation.length]]));
    expect([...rotation].sort()).toEqual([1, 2, 3]);
    expect(cycle.elements[0]).toBe(cycle.elements[cycle.elements.length - 1]);
    expect(cycle.elements.length).toBe(4);
    expect(() => transitiveClosure(5, from, to)).toThrow(RelationCycleError);
    // a self-pair is the shortest cycle
    const self = findCycle(2, Int32Array.from([1]), Int32Array.from([1]))!;
    expect(Array.from(self.elements)).toEqual([1, 1]);
  });

  it('says which pair names an element that does not exist', () => {
    expect(() => transitiveClosure(3, Int32Array.from([0, 1]), Int32Array.from([1, 3]))).toThrow(/pair 1 \(1 ≺ 3\) names an element outside 0\.\.2/);
    expect(() => findCycle(3, Int32Array.from([0]), Int32Array.from([]))).toThrow(/1 pair starts but 0 pair ends/);
  });

  it('gives a linear extension that puts every element after its past, ties by label', () => {
    // worked example: 2 ≺ 0 ≺ 1 and 3 alone; pasts have sizes 1, 2, 0, 0
    const relation = new BitRelation(4);
    relation.set(2, 0);
    relation.set(2, 1);
    relation.set(0, 1);
    expect(Array.from(linearExtension(relation))).toEqual([2, 3, 0, 1]);
  });
});
