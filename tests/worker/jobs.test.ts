import type { Queue } from 'bullmq';
import { describe, expect, it } from 'vitest';
import {
  enqueueJob,
  enqueueJobs,
  jobIdOf,
  jobNames,
  JobPayloadError,
  parseJobPayload,
  readContractJob,
  studyCellJobId,
  vacuumRunJobId,
} from '../../server/queue/jobs';
import { jobHandlers } from '../../server/worker/handlers/index';

const runId = '3f1c2a9e-5b7d-4c1e-9a2b-0d4e6f8a1b3c';
const studyId = '9b8a7c6d-5e4f-4a3b-8c2d-1e0f9a8b7c6d';
const cellId = '0a1b2c3d-4e5f-4a6b-9c7d-8e9f0a1b2c3d';

/** Records what the contract hands to BullMQ, so the options can be checked without Redis. */
function recordingQueue(refuse = false) {
  const added: { name: string; data: unknown; opts: Record<string, unknown> }[] = [];
  const queue = {
    async add(name: string, data: unknown, opts: Record<string, unknown>) {
      if (refuse) throw new Error('Connection is closed.');
      added.push({ name, data, opts });
    },
    async addBulk(jobs: { name: string; data: unknown; opts: Record<string, unknown> }[]) {
      if (refuse) throw new Error('Connection is closed.');
      added.push(...jobs);
    },
  };
  return { queue: queue as unknown as Queue, added };
}

describe('job contract', () => {
  it('names the two jobs, each with a handler', () => {
    expect(jobNames).toEqual(['vacuum-run', 'study-cell']);
    expect(Object.keys(jobHandlers).sort()).toEqual([...jobNames].sort());
  });

  it('gives the job ids DEVELOPERS.md documents: the run id, and study-cell-<cellId> without ":"', () => {
    expect(vacuumRunJobId(runId)).toBe(runId);
    expect(jobIdOf('vacuum-run', { runId })).toBe(runId);
    expect(studyCellJobId(cellId)).toBe(`study-cell-${cellId}`);
    expect(jobIdOf('study-cell', { studyId, cellId })).toBe(`study-cell-${cellId}`);
    // BullMQ refuses custom job ids with ':' (its key separator)
    expect(jobIdOf('study-cell', { studyId, cellId })).not.toContain(':');
  });

  it('accepts the payloads the API sends', () => {
    expect(parseJobPayload('vacuum-run', { runId })).toEqual({ runId });
    expect(parseJobPayload('study-cell', { studyId, cellId })).toEqual({ studyId, cellId });
    expect(readContractJob({ name: 'study-cell', data: { studyId, cellId } })).toEqual({ name: 'study-cell', payload: { studyId, cellId } });
  });

  it('refuses a bad payload, naming the field', () => {
    const refusals: [Parameters<typeof parseJobPayload>[0], unknown, RegExp][] = [
      ['vacuum-run', {}, /runId/],
      ['vacuum-run', { runId: 'not-a-uuid' }, /runId/],
      ['vacuum-run', { runId, extra: 1 }, /extra/],
      ['vacuum-run', null, /payload/],
      ['study-cell', { cellId }, /studyId/],
      ['study-cell', { studyId, cellId: 42 }, /cellId/],
    ];
    for (const [name, data, field] of refusals) {
      const error = (() => {
        try {
          parseJobPayload(name, data);
        } catch (e) {
          return e;
        }
        return null;
      })();
      expect(error, JSON.stringify(data)).toBeInstanceOf(JobPayloadError);
      expect((error as Error).message).toMatch(new RegExp(`job "${name}" has a payload the job contract refuses`));
      expect((error as Error).message).toMatch(field);
    }
    expect(() => readContractJob({ name: 'vacuum-run', data: { cellId } })).toThrow(JobPayloadError);
    expect(readContractJob({ name: 'sum-squares', data: { n: 4 } })).toBeNull();
  });

  it('enqueues with the job id, one attempt and bounded retention', async () => {
    const { queue, added } = recordingQueue();
    expect(await enqueueJob(queue, 'vacuum-run', { runId })).toBe(runId);
    const cells = [cellId, runId];
    expect(await enqueueJobs(queue, 'study-cell', cells.map((c) => ({ studyId, cellId: c })))).toEqual(cells.map(studyCellJobId));
    expect(added).toEqual([
      { name: 'vacuum-run', data: { runId }, opts: { jobId: runId, attempts: 1, removeOnComplete: 1000, removeOnFail: 1000 } },
      ...cells.map((c) => ({
        name: 'study-cell',
        data: { studyId, cellId: c },
        opts: { jobId: `study-cell-${c}`, attempts: 1, removeOnComplete: 5000, removeOnFail: 5000 },
      })),
    ]);
  });

  it('adds nothing when a payload is bad, and passes on a refusal of the queue', async () => {
    const { queue, added } = recordingQueue();
    await expect(enqueueJob(queue, 'vacuum-run', { runId: 'x' })).rejects.toThrow(JobPayloadError);
    await expect(enqueueJobs(queue, 'study-cell', [{ studyId, cellId }, { studyId, cellId: 'x' }])).rejects.toThrow(/cellId/);
    expect(added).toEqual([]);
    await expect(enqueueJob(recordingQueue(true).queue, 'vacuum-run', { runId })).rejects.toThrow(/Connection is closed/);
  });
});
