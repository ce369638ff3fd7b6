import { LRUCache } from 'lru-cache';

/**
 * Rendered exports of finished runs, kept in memory under a byte budget so that a team fetching the
 * same large table (100 000 points are 4 MB of CSV, a quarter of a second to render on one core) does
 * not hold up every other request while it renders again. Only exports that depend on nothing but
 * what the worker stored when the run finished go in: those never change afterwards, so an entry is
 * never stale. Requests that arrive while one is rendering wait for that rendering.
 */
export interface RenderedExportCache {
  /** the cached body for key, else render() once (shared by concurrent callers) and keep it */
  get(key: string, render: () => Promise<string>): Promise<string>;
  readonly stats: { hits: number; renders: number; bytes: number; entries: number };
}

export function createRenderedExportCache(maxBytes: number): RenderedExportCache {
  // UTF-16 strings: two bytes per code unit is what V8 may hold for them
  const sizeOf = (body: string) => Math.max(1, body.length * 2);
  const cache = maxBytes > 0 ? new LRUCache<string, string>({ maxSize: maxBytes, sizeCalculation: sizeOf }) : null;
  const rendering = new Map<string, Promise<string>>();
  const counts = { hits: 0, renders: 0 };

  return {
    async get(key, render) {
      const cached = cache?.get(key);
      if (cached !== undefined) {
        counts.hits += 1;
        return cached;
      }
      const pending = rendering.get(key);
      if (pending) {
        counts.hits += 1;
        return pending;
      }
      counts.renders += 1;
      const promise = render().then(
        (body) => {
          rendering.delete(key);
          // a body larger than the whole budget is served but not kept (LRUCache refuses it itself)
          cache?.set(key, body);
          return body;
        },
        (error: unknown) => {
          rendering.delete(key);
          throw error;
        },
      );
      rendering.set(key, promise);
      return promise;
    },
    get stats() {
      return { ...counts, bytes: cache?.calculatedSize ?? 0, entries: cache?.size ?? 0 };
    },
  };
}
