import type { Queue } from 'bullmq';
import type { DataSource, EntityManager } from 'typeorm';
import * as runs from '../db/repositories/runs';
import * as studies from '../db/repositories/studies';
import { jobIdOf, jobNames, readContractJob, type ContractJob, type JobName, type JobPayload } from '../queue/jobs';

/**
 * A run (or study cell) is queued or running in PostgreSQL while its BullMQ job says otherwise when a
 * worker died hard: killed with SIGKILL past BullMQ's stalled-job limit (the job is then failed by
 * Redis itself, with no handler left to record it), Redis lost the job, or the process was killed
 * between storing the row and the job finishing. The sweep finds those rows and ends them as failed
 * with the reason, so nothing stays "running" for ever. Rows whose job is waiting, delayed or active
 * are left alone; BullMQ's stalled-job recovery hands an active job of a dead worker to another one.
 */
const liveJobStates = new Set(['waiting', 'active', 'delayed', 'prioritized', 'waiting-children']);

export interface SweepOptions {
  dataSource: DataSource;
  queue: Queue;
  /** rows younger than this are skipped: the API stores a row just before it adds the job */
  graceMs?: number;
}

export interface SweepReport {
  runs: string[];
  cells: string[];
}

/** Why the job of a row will never finish it, or null when the job is still alive. */
async function lostJobReason(queue: Queue, jobId: string): Promise<string | null> {
  const job = await queue.getJob(jobId);
  if (!job) return 'its job is no longer in the queue (the worker or Redis lost it)';
  const state = await job.getState();
  if (liveJobStates.has(state)) return null;
  if (state === 'failed') return `its job failed: ${job.failedReason || 'no reason given'}`;
  return `its job ended (${state}) without recording a result`;
}

const stoppedMessage = (reason: string) => `The computation stopped: ${reason}. Start it again to retry.`;

/** Per job of the contract: the rows the sweep checks, and how the row of a lost job is ended. */
interface Recovery<N extends JobName> {
  /** where the sweep's report lists the row */
  listedIn: keyof SweepReport;
  rowId(payload: JobPayload<N>): string;
  /** the payloads of rows still queued or running, older than the grace period */
  unfinished(m: EntityManager, graceMs: number): Promise<JobPayload<N>[]>;
  fail(m: EntityManager, payload: JobPayload<N>, message: string): Promise<void>;
}

const recoveries: { [N in JobName]: Recovery<N> } = {
  'vacuum-run': {
    listedIn: 'runs',
    rowId: (p) => p.runId,
    unfinished: async (m, graceMs) => (await runs.findUnfinishedRunIds(m, graceMs)).map((runId) => ({ runId })),
    fail: (m, p, message) => runs.failRun(m, p.runId, message),
  },
  'study-cell': {
    listedIn: 'cells',
    rowId: (p) => p.cellId,
    unfinished: (m, graceMs) => studies.findUnfinishedCells(m, graceMs),
    fail: async (m, p, message) => {
      await studies.failCell(m, p.cellId, message);
      await studies.finishStudyIfComplete(m, p.studyId);
    },
  },
};

/** Fails the rows whose jobs are gone or failed; returns their ids. */
export async function sweepOrphanedWork({ dataSource, queue, graceMs = 60_000 }: SweepOptions): Promise<SweepReport> {
  const m = dataSource.manager;
  const report: SweepReport = { runs: [], cells: [] };
  for (const name of jobNames) await sweepJobsOf(m, queue, name, graceMs, report);
  return report;
}

async function sweepJobsOf<N extends JobName>(m: EntityManager, queue: Queue, name: N, graceMs: number, report: SweepReport): Promise<void> {
  const recovery: Recovery<N> = recoveries[name];
  for (const payload of await recovery.unfinished(m, graceMs)) {
    const reason = await lostJobReason(queue, jobIdOf(name, payload));
    if (!reason) continue;
    await recovery.fail(m, payload, stoppedMessage(reason));
    report[recovery.listedIn].push(recovery.rowId(payload));
  }
}

/**
 * After BullMQ reports a stalled job: if it was failed for stalling too often, record that on its row
 * at once instead of waiting for the next sweep. Other jobs went back to the queue and will run again.
 */
export async function reconcileStalledJob(dataSource: DataSource, queue: Queue, jobId: string): Promise<boolean> {
  const job = await queue.getJob(jobId);
  if (!job || (await job.getState()) !== 'failed') return false;
  let known: ContractJob | null;
  try {
    known = readContractJob(job);
  } catch {
    return false; // a payload no handler would have taken names no row to end
  }
  if (!known) return false;
  const reason = stoppedMessage(
    `its job failed: ${job.failedReason || 'the worker computing it stopped (stalled) more often than the stalled-job limit allows'}`,
  );
  // the contract ties each name to its payload; TypeScript cannot follow that through the lookup
  await (recoveries[known.name] as Recovery<JobName>).fail(dataSource.manager, known.payload, reason);
  return true;
}
