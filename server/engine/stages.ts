import type { VacuumStage } from '@shared/vacuum';
import { CancelledError } from './errors';
import type { VacuumHooks } from './request';

/** One stage of a pipeline, as `stageRunner` makes it. */
export type StageRunner = <T>(name: VacuumStage, work: () => T) => Promise<T>;

/**
 * Runs one stage of a computation: checks `shouldCancel()` before it (throws CancelledError), reports
 * progress 0 and 1, records its seconds in `timings`, and yields to the event loop first so a cancel
 * request or a progress write can get through.
 */
export function stageRunner(hooks: VacuumHooks, timings: Partial<Record<VacuumStage, number>>): StageRunner {
  return async <T>(name: VacuumStage, work: () => T): Promise<T> => {
    if (hooks.shouldCancel?.()) throw new CancelledError(name);
    hooks.onProgress?.(name, 0);
    await new Promise((resolve) => setImmediate(resolve));
    if (hooks.shouldCancel?.()) throw new CancelledError(name);
    const start = performance.now();
    const value = work();
    timings[name] = (performance.now() - start) / 1000;
    hooks.onProgress?.(name, 1);
    return value;
  };
}
