import { UnrecoverableError, type Job } from 'bullmq';
import type { VacuumStage } from '@shared/vacuum';
import * as users from '../db/repositories/users';
import { CancelledError, EngineInputError } from '../engine/index';
import { AbandonedError, type EngineThreadOptions } from '../threads/engineThread';
import type { WorkerContext } from './context';

/** What the runner hands to `compute`: pass it on to runInEngineThread / runInThread. */
export type ThreadHooks = Required<Pick<EngineThreadOptions, 'onProgress' | 'poll'>>;

/** A message to the author of a run or study; sent only when their e-mails of that kind are switched on. */
export interface AuthorMail {
  /** which of the author's switches decides: run e-mails unless said */
  kind?: 'run' | 'study';
  authorId: string;
  teamId: string;
  /** "run <id>", for the log line when sending fails */
  about: string;
  subject: string;
  /** what happened, between the greeting and the link */
  lines: string[];
  link: string;
}

export type JobEnd<Result> = { status: 'done'; result: Result } | { status: 'failed'; message: string };

/**
 * What differs between jobs that compute one row in an engine thread (a run, a study cell): how the
 * row is claimed, computed and stored, and what its author is told. `Claimed` is the claimed row,
 * `Result` what the thread gives back.
 */
export interface ComputeJob<Claimed, Result> {
  /** "run <id>", for log lines */
  label: string;
  /** the ids every outcome the job returns starts with, e.g. { runId } */
  key: Record<string, string>;
  /** queued (or running again, when BullMQ re-delivers a stalled job) → running; null when it may not run */
  claim(): Promise<Claimed | null>;
  /** loads the input and computes it in an engine thread; an EngineInputError is input that can never succeed */
  compute(claimed: Claimed, thread: ThreadHooks): Promise<Result>;
  /** overall percent of the row at a stage's fraction */
  percent(claimed: Claimed, stage: VacuumStage, fraction: number): number;
  saveProgress(stage: VacuumStage, percent: number): Promise<void>;
  /** the row as the running job sees it: gone, asked to stop, or carry on */
  control(): Promise<'deleted' | 'cancel' | 'continue'>;
  markCancelled(): Promise<void>;
  /** running → failed with the message; false when it no longer runs. `result` is set when only storing it failed. */
  markFailed(message: string, result: Result | null): Promise<boolean>;
  /** stores the result in one statement; false when the row was cancelled or deleted meanwhile */
  complete(result: Result): Promise<boolean>;
  /** after the row ended done or failed: whatever else ends with it, and the e-mail to send, if any */
  ended(claimed: Claimed, end: JobEnd<Result>): Promise<AuthorMail | null>;
  /** what the finished job returns besides its key */
  summary(result: Result): Record<string, unknown>;
}

const progressIntervalMs = 250;

/** Writes at most one progress update every 250 ms (a new stage always), one write at a time. */
function throttledProgress<C>(job: Job, spec: ComputeJob<C, unknown>, claimed: C) {
  let chain: Promise<unknown> = Promise.resolve();
  let lastWrite = 0;
  let lastStage: VacuumStage | null = null;
  return {
    report(stage: VacuumStage, fraction: number) {
      const now = Date.now();
      if (stage === lastStage && now - lastWrite < progressIntervalMs) return;
      lastStage = stage;
      lastWrite = now;
      const percent = spec.percent(claimed, stage, fraction);
      chain = chain
        .then(() => spec.saveProgress(stage, percent))
        .then(() => job.updateProgress({ stage, percent }))
        .catch((error: Error) => console.warn(`[worker] progress of ${spec.label} not saved: ${error.message}`));
    },
    flushed: () => chain,
  };
}

async function mailAuthor(context: WorkerContext, mail: AuthorMail | null): Promise<void> {
  if (!mail) return;
  const author = await users.findUserById(context.dataSource.manager, mail.authorId);
  const kind = mail.kind ?? 'run';
  if (!author || !(kind === 'study' ? author.notifyOnStudyDone : author.notifyOnRunDone)) return;
  try {
    await context.mailer.send({
      to: author.email,
      teamId: mail.teamId,
      subject: mail.subject,
      text: [
        `Hello ${author.name},`,
        '',
        ...mail.lines,
        '',
        `Open it: ${mail.link}`,
        '',
        `You get these messages because ${kind} e-mails are switched on in your account settings.`,
      ].join('\n'),
    });
  } catch (error) {
    console.warn(`[worker] could not e-mail ${author.email} about ${mail.about}: ${(error as Error).message}`);
  }
}

/**
 * The one flow of a computing job: claim the row (skip it when it may not run), compute in an engine
 * thread while progress is written (throttled) and the row is polled for cancellation or deletion,
 * then store the result in one statement. A cancelled row ends cancelled, a deleted one is left
 * alone; a failure is recorded on the row with its message, and input the engine refuses fails the
 * job without retries (UnrecoverableError). The row never stays running after this returns or throws.
 */
export async function runComputeJob<C, R>(job: Job, context: WorkerContext, spec: ComputeJob<C, R>): Promise<Record<string, unknown>> {
  const claimed = await spec.claim();
  if (!claimed) {
    // cancelled while queued, deleted, already finished, or asked to stop before a re-delivery
    await spec.markCancelled().catch(() => undefined);
    return { ...spec.key, skipped: true };
  }
  const progress = throttledProgress(job, spec, claimed);
  const failed = async (message: string, result: R | null) => {
    if (await spec.markFailed(message, result)) await mailAuthor(context, await spec.ended(claimed, { status: 'failed', message }));
  };

  let result: R;
  try {
    result = await spec.compute(claimed, {
      onProgress: (stage, fraction) => progress.report(stage, fraction),
      poll: async () => {
        const state = await spec.control();
        return state === 'deleted' ? 'abandon' : state;
      },
    });
    await progress.flushed();
  } catch (error) {
    await progress.flushed();
    if (error instanceof CancelledError) {
      await spec.markCancelled();
      return { ...spec.key, cancelled: true, stage: error.stage };
    }
    if (error instanceof AbandonedError) return { ...spec.key, deleted: true };
    const message = (error as Error).message || String(error);
    await failed(message, null);
    if (error instanceof EngineInputError) throw new UnrecoverableError(message);
    throw error;
  }

  let stored: boolean;
  try {
    stored = await spec.complete(result);
  } catch (error) {
    const message = `the result could not be stored: ${(error as Error).message}`;
    await failed(message, result).catch(() => undefined);
    throw new Error(message);
  }
  if (!stored) {
    // finished, but cancelled (or deleted) while the last stage ran: honour the request
    await spec.markCancelled();
    return { ...spec.key, cancelled: true };
  }
  await mailAuthor(context, await spec.ended(claimed, { status: 'done', result }));
  return { ...spec.key, ...spec.summary(result) };
}
