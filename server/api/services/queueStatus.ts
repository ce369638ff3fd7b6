import type { Queue } from 'bullmq';
import { MIN_PERCENT_FOR_ESTIMATE, type ComputeTiming } from '@shared/computeTiming';
import { studyCellJobId, vacuumRunJobId } from '../../queue/jobs';

/**
 * The compute queue's waiting jobs at one moment, in the order workers take them (position 1 = next).
 * Read once per answer, so every row of a list sees the same queue.
 */
export interface QueueSnapshot {
  /** 1-based place of the job among the waiting ones, null when it is not waiting (running, finished, gone) */
  positionOf(jobId: string): number | null;
  /** waiting jobs in all; null when Redis could not be read */
  length: number | null;
}

const unreadableQueue: QueueSnapshot = { positionOf: () => null, length: null };

/**
 * BullMQ adds a job at the head of its `wait` list and a worker takes the oldest from the tail, so the
 * list read in ascending order is the order of service. The answer degrades to "unknown" when Redis
 * cannot be read: the page of a run must not fail because of the queue.
 */
export async function readQueueSnapshot(queue: Queue): Promise<QueueSnapshot> {
  let ids: string[];
  try {
    ids = await queue.getRanges(['wait'], 0, -1, true);
  } catch {
    return unreadableQueue;
  }
  const positions = new Map(ids.map((id, index) => [id, index + 1]));
  return { positionOf: (jobId) => positions.get(jobId) ?? null, length: ids.length };
}

const secondsBetween = (from: Date, to: Date) => Math.max(0, (to.getTime() - from.getTime()) / 1000);

interface TimedRow {
  id: string;
  status: 'queued' | 'running' | 'done' | 'failed' | 'cancelled';
  percent: number;
  startedAt: Date | null;
  finishedAt: Date | null;
}

/**
 * A run's timing. The estimate assumes the rest of the work goes at the pace of the part done:
 * elapsed × (100 − p)/p, with p the run's overall percent (its stages weighted by their usual share,
 * server/worker/handlers/vacuumRun.ts); none below MIN_PERCENT_FOR_ESTIMATE.
 */
export function runTiming(row: TimedRow, queue: QueueSnapshot, now: Date = new Date()): ComputeTiming {
  const elapsedSeconds = row.startedAt ? secondsBetween(row.startedAt, row.finishedAt ?? now) : null;
  const percent = Math.min(100, row.percent);
  const estimatedSecondsLeft =
    row.status === 'running' && elapsedSeconds !== null && percent >= MIN_PERCENT_FOR_ESTIMATE && percent < 100
      ? (elapsedSeconds * (100 - percent)) / percent
      : null;
  return {
    elapsedSeconds,
    estimatedSecondsLeft,
    queuePosition: row.status === 'queued' ? queue.positionOf(vacuumRunJobId(row.id)) : null,
    queueLength: queue.length,
  };
}

export interface TimedCell {
  id: string;
  requestedN: number;
  status: TimedRow['status'];
  percent: number;
  startedAt: Date | null;
  finishedAt: Date | null;
}

/**
 * The expected seconds of one cell of size N from the finished ones: their mean at the same N, else the
 * mean at the nearest finished N scaled by (N/N₀)³, the cost of the dense eigendecomposition that
 * dominates a cell (common practice: an N×N symmetric eigenproblem takes O(N³) operations).
 */
function expectedCellSeconds(N: number, meanByN: Map<number, number>): number {
  const same = meanByN.get(N);
  if (same !== undefined) return same;
  let nearest = 0;
  for (const finishedN of meanByN.keys()) if (nearest === 0 || Math.abs(Math.log(finishedN / N)) < Math.abs(Math.log(nearest / N))) nearest = finishedN;
  return meanByN.get(nearest)! * (N / nearest) ** 3;
}

/**
 * A study's timing: elapsed since its first cell started; the time left as the expected seconds of the
 * cells still to do (a running cell's share still to do) over the cells computing at once, from the
 * durations of the finished cells, so none before the first cell has finished; the queue position of
 * its first waiting cell.
 */
export function studyTiming(
  study: { status: TimedRow['status']; startedAt: Date | null; finishedAt: Date | null },
  cells: TimedCell[],
  queue: QueueSnapshot,
  now: Date = new Date(),
): ComputeTiming {
  const elapsedSeconds = study.startedAt ? secondsBetween(study.startedAt, study.finishedAt ?? now) : null;
  let queuePosition: number | null = null;
  for (const cell of cells) {
    if (cell.status !== 'queued') continue;
    const position = queue.positionOf(studyCellJobId(cell.id));
    if (position !== null && (queuePosition === null || position < queuePosition)) queuePosition = position;
  }
  return { elapsedSeconds, estimatedSecondsLeft: study.status === 'running' ? studySecondsLeft(cells) : null, queuePosition, queueLength: queue.length };
}

function studySecondsLeft(cells: TimedCell[]): number | null {
  const durations = new Map<number, number[]>();
  for (const cell of cells) {
    if (cell.status !== 'done' || !cell.startedAt || !cell.finishedAt) continue;
    durations.set(cell.requestedN, [...(durations.get(cell.requestedN) ?? []), secondsBetween(cell.startedAt, cell.finishedAt)]);
  }
  if (durations.size === 0) return null;
  const meanByN = new Map([...durations].map(([N, list]) => [N, list.reduce((a, b) => a + b, 0) / list.length]));
  let work = 0;
  let running = 0;
  for (const cell of cells) {
    if (cell.status === 'queued') work += expectedCellSeconds(cell.requestedN, meanByN);
    if (cell.status === 'running') {
      running += 1;
      work += expectedCellSeconds(cell.requestedN, meanByN) * (1 - Math.min(100, cell.percent) / 100);
    }
  }
  return work / Math.max(1, running);
}
