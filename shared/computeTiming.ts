import { z } from 'zod';

/**
 * Time and queue facts of a run or a study, as its detail and list answers carry them: how long it has
 * computed, an estimate of what is left, and where its next job waits in the compute queue. The rules
 * behind the estimate are in server/api/services/queueStatus.ts.
 */
export const computeTimingSchema = z.object({
  /** seconds since a worker started it (to the end once it has finished); null while nothing has started */
  elapsedSeconds: z.number().nullable(),
  /** an estimate of the seconds left, from the progress so far; null until there is enough progress to say */
  estimatedSecondsLeft: z.number().nullable(),
  /** place of its next waiting job in the compute queue, 1 = the job a free worker takes next; null when none waits */
  queuePosition: z.number().int().nullable(),
  /** jobs waiting in the compute queue in all (every team's), null when the queue could not be read */
  queueLength: z.number().int().nullable(),
});
export type ComputeTiming = z.infer<typeof computeTimingSchema>;

/** Below this share of the work done, an estimate of the time left says little, so none is given. */
export const MIN_PERCENT_FOR_ESTIMATE = 3;
