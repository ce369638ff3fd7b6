import type { Queue } from 'bullmq';
import type { DataSource } from 'typeorm';
import * as runs from '../db/repositories/runs';
import * as studies from '../db/repositories/studies';
import { studyCellJobId, studyCellJobName } from './handlers/studyCell';
import { vacuumRunJobName } from './handlers/vacuumRun';

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

/** Fails the rows whose jobs are gone or failed; returns their ids. */
export async function sweepOrphanedWork({ dataSource, queue, graceMs = 60_000 }: SweepOptions): Promise<SweepReport> {
  const m = dataSource.manager;
  const report: SweepReport = { runs: [], cells: [] };
  const stuckRuns: { id: string }[] = await m.query(
    `SELECT id FROM runs WHERE status IN ('queued', 'running') AND created_at < now() - ($1 || ' milliseconds')::interval`,
    [String(graceMs)],
  );
  for (const { id } of stuckRuns) {
    const reason = await lostJobReason(queue, id);
    if (!reason) continue;
    await runs.failRun(m, id, stoppedMessage(reason));
    report.runs.push(id);
  }
  const stuckCells: { id: string; study_id: string }[] = await m.query(
    `SELECT c.id, c.study_id FROM study_cells c JOIN studies s ON s.id = c.study_id
      WHERE c.status IN ('queued', 'running') AND s.created_at < now() - ($1 || ' milliseconds')::interval`,
    [String(graceMs)],
  );
  for (const { id, study_id: studyId } of stuckCells) {
    const reason = await lostJobReason(queue, studyCellJobId(id));
    if (!reason) continue;
    await m.query(`UPDATE study_cells SET status = 'failed', error = $2, finished_at = now() WHERE id = $1 AND status IN ('queued', 'running')`, [
      id,
      stoppedMessage(reason),
    ]);
    await studies.finishStudyIfComplete(m, studyId);
    report.cells.push(id);
  }
  return report;
}

/**
 * After BullMQ reports a stalled job: if it was failed for stalling too often, record that on its row
 * at once instead of waiting for the next sweep. Other jobs went back to the queue and will run again.
 */
export async function reconcileStalledJob(dataSource: DataSource, queue: Queue, jobId: string): Promise<boolean> {
  const job = await queue.getJob(jobId);
  if (!job || (await job.getState()) !== 'failed') return false;
  const reason = stoppedMessage(
    `its job failed: ${job.failedReason || 'the worker computing it stopped (stalled) more often than the stalled-job limit allows'}`,
  );
  const m = dataSource.manager;
  if (job.name === vacuumRunJobName) {
    await runs.failRun(m, (job.data as { runId: string }).runId, reason);
    return true;
  }
  if (job.name === studyCellJobName) {
    const { cellId } = job.data as { cellId: string };
    const rows: { study_id: string }[] = await m.query(
      `UPDATE study_cells SET status = 'failed', error = $2, finished_at = now() WHERE id = $1 AND status IN ('queued', 'running') RETURNING study_id`,
      [cellId, reason],
    );
    if (rows[0]) await studies.finishStudyIfComplete(m, rows[0].study_id);
    return true;
  }
  return false;
}
