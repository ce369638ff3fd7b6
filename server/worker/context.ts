import type { Job } from 'bullmq';
import type { DataSource } from 'typeorm';
import type { Config } from '../config';
import type { Mailer } from '../mail/mailer';

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
// `any` by default so handlers of jobs outside the contract (tests register their own) fit the same registry
export type JobHandler<Data = any> = (job: Job<Data>, context: WorkerContext) => Promise<unknown>;
