import type { JobsOptions, Queue } from 'bullmq';
import { z } from 'zod';

/**
 * The job contract between the API, which adds jobs, and the worker, which runs them: the job names,
 * each one's payload (zod), its BullMQ job id and its queue options. Both sides import this module
 * and nothing of each other. Payloads carry only row ids: the rows in PostgreSQL hold the input and
 * the state, so a job can be re-delivered or swept without losing anything.
 */
export const jobPayloadSchemas = {
  /** one run: the `runs` row holds its request and, for a re-analysis or import, its elements */
  'vacuum-run': z.strictObject({ runId: z.uuid() }),
  /** one (N, seed) cell of a scaling study */
  'study-cell': z.strictObject({ studyId: z.uuid(), cellId: z.uuid() }),
};

export type JobName = keyof typeof jobPayloadSchemas;
export type JobPayload<N extends JobName> = z.infer<(typeof jobPayloadSchemas)[N]>;
/** A job of the contract with its payload checked, narrowed by its name. */
export type ContractJob = { [N in JobName]: { name: N; payload: JobPayload<N> } }[JobName];

export const jobNames = Object.keys(jobPayloadSchemas) as JobName[];
export const vacuumRunJobName = 'vacuum-run' satisfies JobName;
export const studyCellJobName = 'study-cell' satisfies JobName;

/** BullMQ job id of a run: the run's own id, so the API and the sweep find the job from the row. */
export const vacuumRunJobId = (runId: string) => runId;
/** BullMQ job id of a study cell: "study-cell-<cellId>" (BullMQ refuses ':' in custom ids). */
export const studyCellJobId = (cellId: string) => `${studyCellJobName}-${cellId}`;

/** Per job name: its id, and how many finished jobs Redis keeps for a look afterwards. */
const jobKinds: { [N in JobName]: { id(payload: JobPayload<N>): string; keep: number } } = {
  'vacuum-run': { id: (p) => vacuumRunJobId(p.runId), keep: 1000 },
  'study-cell': { id: (p) => studyCellJobId(p.cellId), keep: 5000 },
};

/** A payload the contract refuses: a mistake in the code that enqueued it, or a job from elsewhere. */
export class JobPayloadError extends Error {
  override readonly name = 'JobPayloadError';
}

export function isJobName(name: string): name is JobName {
  return Object.hasOwn(jobPayloadSchemas, name);
}

/** The payload checked against its job's schema; a JobPayloadError names each field at fault. */
export function parseJobPayload<N extends JobName>(name: N, data: unknown): JobPayload<N> {
  const parsed = jobPayloadSchemas[name].safeParse(data);
  if (parsed.success) return parsed.data as JobPayload<N>;
  const problems = parsed.error.issues.map((issue) => `${issue.path.join('.') || 'payload'}: ${issue.message}`);
  throw new JobPayloadError(`job "${name}" has a payload the job contract refuses (${problems.join('; ')})`);
}

/** A queued job read back: null when its name is not in the contract, else its checked payload. */
export function readContractJob(job: { name: string; data: unknown }): ContractJob | null {
  if (!isJobName(job.name)) return null;
  return { name: job.name, payload: parseJobPayload(job.name, job.data) } as ContractJob;
}

export function jobIdOf<N extends JobName>(name: N, payload: JobPayload<N>): string {
  return jobKinds[name].id(payload);
}

/** One attempt: a failure is recorded on the row, and starting it again is the author's choice. */
function jobOptions<N extends JobName>(name: N, payload: JobPayload<N>): JobsOptions {
  const keep = jobKinds[name].keep;
  return { jobId: jobIdOf(name, payload), attempts: 1, removeOnComplete: keep, removeOnFail: keep };
}

/** Adds one job after checking its payload; resolves with its job id. Rejects when Redis refuses. */
export async function enqueueJob<N extends JobName>(queue: Queue, name: N, payload: JobPayload<N>): Promise<string> {
  const checked = parseJobPayload(name, payload);
  await queue.add(name, checked, jobOptions(name, checked));
  return jobIdOf(name, checked);
}

/** Adds jobs of one name in one round trip (BullMQ addBulk: all or none). */
export async function enqueueJobs<N extends JobName>(queue: Queue, name: N, payloads: JobPayload<N>[]): Promise<string[]> {
  const checked = payloads.map((payload) => parseJobPayload(name, payload));
  await queue.addBulk(checked.map((data) => ({ name, data, opts: jobOptions(name, data) })));
  return checked.map((data) => jobIdOf(name, data));
}

/**
 * Removes a job that has not started, to tidy the queue after its row was cancelled or deleted. The
 * row decides (a worker that takes the job anyway skips it), so a job already locked by a worker is
 * left to it.
 */
export async function discardJob(queue: Queue, jobId: string): Promise<void> {
  try {
    await (await queue.getJob(jobId))?.remove();
  } catch {
    /* locked by a worker that is about to see the cancelled row */
  }
}
