/**
 * Large uploads are parsed in a worker_thread (server/causalSets/importFile.ts): the same values and
 * the same file errors as parsing in place, while the event loop keeps running.
 */
import { gunzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { causalSetMetadataSchema } from '@shared/causalSets';
import { importValues, importValuesOffThread } from '../../server/causalSets/importFile';
import { CausalSetFileError } from '../../server/causalSets/parse';
import { causalMatrix } from '../../server/engine/order';
import { sprinkle } from '../../server/engine/sprinkle';

const limit = { maxElements: 6000, reason: 'the dense engine holds N × N matrices' };

/** The relation list "i,j" of a sprinkled 2D diamond, one pair per line (the upload format). */
function relationFile(count: number): Buffer {
  const s = sprinkle({ region: { kind: 'diamond2d', properTime: 2 }, process: 'fixed', count, seed: `import-${count}`, prng: 'arc4' });
  const lines: string[] = [];
  causalMatrix(s.points, 2).forEach((i, j) => lines.push(`${i},${j}`));
  return Buffer.from(lines.join('\n') + '\n');
}

const relations = (count: number) => causalSetMetadataSchema.parse({ name: 'thread test', kind: 'relations', count, dimension: 2 });

describe('uploads parsed in a worker_thread', () => {
  it('give the same row values as parsing in place', async () => {
    const file = relationFile(400);
    const inPlace = importValues(relations(400), file, limit);
    const threaded = await importValuesOffThread(relations(400), file, limit, { threadFromBytes: 0 });
    expect(threaded.n).toBe(400);
    expect(threaded.stats).toEqual(inPlace.stats);
    expect(Buffer.isBuffer(threaded.elements) && Buffer.isBuffer(threaded.original)).toBe(true);
    expect(gunzipSync(threaded.elements).equals(gunzipSync(inPlace.elements))).toBe(true);
    expect(gunzipSync(threaded.original).equals(file)).toBe(true);
  }, 60_000);

  it('bring back the file error with its rows, as parsing in place does', async () => {
    const bad = Buffer.from('0,1\n1,x\n2,1\n');
    const caught = (run: () => unknown) => {
      try {
        run();
      } catch (error) {
        return error;
      }
      throw new Error('expected a file error');
    };
    const inPlace = caught(() => importValues(relations(3), bad, limit)) as CausalSetFileError;
    const threaded = await importValuesOffThread(relations(3), bad, limit, { threadFromBytes: 0 }).catch((error: unknown) => error);
    expect(threaded).toBeInstanceOf(CausalSetFileError);
    expect((threaded as CausalSetFileError).code).toBe(inPlace.code);
    expect((threaded as CausalSetFileError).problems).toEqual(inPlace.problems);
    expect((threaded as CausalSetFileError).message).toBe(inPlace.message);
  }, 60_000);

  it('keep the event loop running while a file of several megabytes is parsed', async () => {
    const file = relationFile(2400);
    expect(file.byteLength).toBeGreaterThan(5e6);
    const started = performance.now();
    importValues(relations(2400), file, limit);
    const inPlaceMs = performance.now() - started;

    let last = performance.now();
    let longestGap = 0;
    const ticker = setInterval(() => {
      const now = performance.now();
      longestGap = Math.max(longestGap, now - last);
      last = now;
    }, 5);
    const threaded = await importValuesOffThread(relations(2400), file, limit);
    clearInterval(ticker);
    expect(threaded.n).toBe(2400);
    // parsing in place holds the loop for the whole parse; the thread leaves it a small fraction of that
    expect(inPlaceMs).toBeGreaterThan(200);
    expect(longestGap).toBeLessThan(inPlaceMs / 2);
  }, 60_000);
});
