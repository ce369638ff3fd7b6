import { describe, expect, it } from 'vitest';
import { createRenderedExportCache } from '../../server/api/services/renderedExports';

/** The API's memory of rendered exports of finished runs (server/api/services/renderedExports.ts). */
describe('rendered exports of finished runs', () => {
  it('renders once and serves the kept body afterwards', async () => {
    const cache = createRenderedExportCache(1024);
    let renders = 0;
    const render = async () => `body ${(renders += 1)}`;
    expect(await cache.get('team/run/points.csv', render)).toBe('body 1');
    expect(await cache.get('team/run/points.csv', render)).toBe('body 1');
    expect(await cache.get('team/run/spectrum.csv', render)).toBe('body 2');
    expect(cache.stats).toMatchObject({ hits: 1, renders: 2, entries: 2 });
  });

  it('lets concurrent requests share one rendering', async () => {
    const cache = createRenderedExportCache(1024);
    let renders = 0;
    let finish: (body: string) => void = () => {};
    const render = () => {
      renders += 1;
      return new Promise<string>((resolve) => (finish = resolve));
    };
    const waiting = [cache.get('k', render), cache.get('k', render), cache.get('k', render)];
    finish('shared');
    expect(await Promise.all(waiting)).toEqual(['shared', 'shared', 'shared']);
    expect(renders).toBe(1);
  });

  it('keeps no failure: the next request renders again', async () => {
    const cache = createRenderedExportCache(1024);
    await expect(cache.get('k', async () => Promise.reject(new Error('database went away')))).rejects.toThrow('database went away');
    expect(await cache.get('k', async () => 'second try')).toBe('second try');
    expect(cache.stats.entries).toBe(1);
  });

  it('stays within its byte budget, dropping the least recently used body', async () => {
    // 100 code units are 200 bytes: two fit in 450 bytes, three do not
    const cache = createRenderedExportCache(450);
    const body = (c: string) => async () => c.repeat(100);
    await cache.get('a', body('a'));
    await cache.get('b', body('b'));
    await cache.get('a', body('x')); // a is now the more recent
    await cache.get('c', body('c'));
    expect(cache.stats.entries).toBe(2);
    expect(cache.stats.bytes).toBeLessThanOrEqual(450);
    expect(await cache.get('a', body('x'))).toBe('a'.repeat(100));
    expect(await cache.get('b', body('y'))).toBe('y'.repeat(100));
  });

  it('serves a body larger than the whole budget without keeping it, and keeps nothing at budget 0', async () => {
    const small = createRenderedExportCache(100);
    expect(await small.get('big', async () => 'z'.repeat(1000))).toBe('z'.repeat(1000));
    expect(small.stats).toMatchObject({ entries: 0, bytes: 0 });
    const none = createRenderedExportCache(0);
    let renders = 0;
    await none.get('k', async () => `${(renders += 1)}`);
    await none.get('k', async () => `${(renders += 1)}`);
    expect(renders).toBe(2);
  });
});
