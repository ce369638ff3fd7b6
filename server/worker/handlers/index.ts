import type { JobName, JobPayload } from '../../queue/jobs';
import type { JobHandler } from '../context';
import { studyCellHandler } from './studyCell';
import { vacuumRunHandler } from './vacuumRun';

export type { JobHandler, WorkerContext } from '../context';

/**
 * Job name → handler, one for every job of the contract in server/queue/jobs.ts (a job without a
 * handler does not compile). The handler lives in its own file in this folder; the numerics stay in
 * server/engine, the handler only loads input, calls the engine and stores results, through the
 * shared flow of ../jobRunner.ts when it computes a row in an engine thread.
 */
export const jobHandlers: { [N in JobName]: JobHandler<JobPayload<N>> } = {
  'vacuum-run': vacuumRunHandler,
  'study-cell': studyCellHandler,
};
