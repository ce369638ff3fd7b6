import type { Job } from 'bullmq';
import type { DataSource } from 'typeorm';
import type { Config } from '../../config';
import type { Mailer } from '../../mail/mailer';
import { studyCellHandler, studyCellJobName } from './studyCell';
import { vacuumRunHandler, vacuumRunJobName } from './vacuumRun';

/** What a handler may use besides the job itself. */
export interface WorkerContext {
  config: Config;
  dataSource: DataSource;
  mailer: Mailer;
}

/**
 * A handler does one kind of job. Report progress with `job.updateProgress(...)`; throw to fail the
 * job (an UnrecoverableError from bullmq fails it without retries).
 */
export type JobHandler = (job: Job, context: WorkerContext) => Promise<unknown>;

/**
 * Job name → handler. Each feature adds its entry here, with the handler in its own file in this
 * folder; the numerics stay in server/engine, the handler only loads input, calls the engine and
 * stores results.
 */
export const jobHandlers: Record<string, JobHandler> = {
  [vacuumRunJobName]: vacuumRunHandler,
  [studyCellJobName]: studyCellHandler,
};
