import { UnrecoverableError, type Job } from 'bullmq';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { CancelledError, EngineInputError } from '../../server/engine/index';
import { AbandonedError } from '../../server/threads/engineThread';
import type { WorkerContext } from '../../server/worker/context';
import { runComputeJob, type ComputeJob, type ThreadHooks } from '../../server/worker/jobRunner';

const author = { id: 'author-1', email: 'ada@example.org', name: 'Ada', notifyOnRunDone: true, notifyOnStudyDone: true };

/** A context whose database answers only the author lookup and whose mailer keeps what it sends. */
function fakeContext(notify = true, notifyStudies = notify) {
  const sent: { to: string; subject: string; text: string; teamId?: string | null }[] = [];
  const context = {
    config: { appUrl: 'http://tacet.test' },
    dataSource: { manager: { findOneBy: async () => ({ ...author, notifyOnRunDone: notify, notifyOnStudyDone: notifyStudies }) } },
    mailer: { send: async (mail: (typeof sent)[number]) => (sent.push(mail), { id: 'm' }) },
  } as unknown as WorkerContext;
  return { context, sent };
}

function fakeJob() {
  const progress: unknown[] = [];
  return { job: { data: {}, updateProgress: async (p: unknown) => void progress.push(p) } as unknown as Job, progress };
}

/** A job spec whose every hook records its call; `compute` is the test's. */
function spec(compute: (thread: ThreadHooks) => Promise<number>, overrides: Partial<ComputeJob<{ row: string }, number>> = {}) {
  const calls: string[] = [];
  const job: ComputeJob<{ row: string }, number> = {
    label: 'thing t1',
    key: { thingId: 't1' },
    claim: async () => ({ row: 't1' }),
    compute: (_claimed, thread) => compute(thread),
    percent: (_c, _stage, fraction) => 100 * fraction,
    saveProgress: async (stage, percent) => void calls.push(`progress ${stage} ${percent}`),
    control: async () => 'continue',
    markCancelled: async () => void calls.push('cancelled'),
    markFailed: async (message, result) => (calls.push(`failed ${message} ${result}`), true),
    complete: async (result) => (calls.push(`complete ${result}`), true),
    ended: async (_claimed, end) => (calls.push(`ended ${end.status}`), {
      authorId: author.id,
      teamId: 'team-1',
      about: 'thing t1',
      subject: `thing ${end.status}`,
      lines: [end.status === 'done' ? `result ${end.result}` : `because ${end.message}`],
      link: 'http://tacet.test/things/t1',
    }),
    summary: (result) => ({ value: result }),
    ...overrides,
  };
  return { job, calls };
}

afterEach(() => {
  vi.restoreAllMocks();
});

describe('the shared job runner', () => {
  it('stores the result, mails the author and returns the key with the summary', async () => {
    const { context, sent } = fakeContext();
    const { job } = fakeJob();
    const { job: s, calls } = spec(async () => 42);
    expect(await runComputeJob(job, context, s)).toEqual({ thingId: 't1', value: 42 });
    expect(calls).toEqual(['complete 42', 'ended done']);
    expect(sent).toEqual([
      {
        to: author.email,
        teamId: 'team-1',
        subject: 'thing done',
        text: [
          'Hello Ada,',
          '',
          'result 42',
          '',
          'Open it: http://tacet.test/things/t1',
          '',
          'You get these messages because run e-mails are switched on in your account settings.',
        ].join('\n'),
      },
    ]);
  });

  it('sends nothing to an author who switched run e-mails off', async () => {
    const { context, sent } = fakeContext(false);
    await runComputeJob(fakeJob().job, context, spec(async () => 1).job);
    expect(sent).toEqual([]);
  });

  it('skips a row it cannot claim, marking it cancelled', async () => {
    const { context } = fakeContext();
    const { job: s, calls } = spec(async () => 1, { claim: async () => null });
    expect(await runComputeJob(fakeJob().job, context, s)).toEqual({ thingId: 't1', skipped: true });
    expect(calls).toEqual(['cancelled']);
  });

  it('writes a new stage at once and the same stage again only after 250 ms, then to the job', async () => {
    let now = 1_000_000;
    vi.spyOn(Date, 'now').mockImplementation(() => now);
    const { context } = fakeContext();
    const { job, progress } = fakeJob();
    const { job: s, calls } = spec(async (thread) => {
      thread.onProgress('sprinkle', 0.5);
      now += 100;
      thread.onProgress('sprinkle', 0.75); // same stage within 250 ms: dropped
      now += 200;
      thread.onProgress('sprinkle', 1);
      thread.onProgress('order', 0.25); // a new stage: always written
      return 7;
    });
    await runComputeJob(job, context, s);
    expect(calls.filter((c) => c.startsWith('progress'))).toEqual(['progress sprinkle 50', 'progress sprinkle 100', 'progress order 25']);
    expect(progress).toEqual([
      { stage: 'sprinkle', percent: 50 },
      { stage: 'sprinkle', percent: 100 },
      { stage: 'order', percent: 25 },
    ]);
  });

  it('hands the engine thread a poll that abandons a deleted row and passes cancel on', async () => {
    const { context } = fakeContext();
    const verdicts: string[] = [];
    const states = ['continue', 'cancel', 'deleted'] as const;
    let k = 0;
    const { job: s } = spec(
      async (thread) => {
        for (let i = 0; i < 3; i++) verdicts.push(await thread.poll());
        return 1;
      },
      { control: async () => states[k++]! },
    );
    await runComputeJob(fakeJob().job, context, s);
    expect(verdicts).toEqual(['continue', 'cancel', 'abandon']);
  });

  it('ends a cancelled computation cancelled, with its stage, and leaves a deleted row alone', async () => {
    const { context, sent } = fakeContext();
    const cancelled = spec(async () => {
      throw new CancelledError('spectrum');
    });
    expect(await runComputeJob(fakeJob().job, context, cancelled.job)).toEqual({ thingId: 't1', cancelled: true, stage: 'spectrum' });
    expect(cancelled.calls).toEqual(['cancelled']);
    const deleted = spec(async () => {
      throw new AbandonedError('gone');
    });
    expect(await runComputeJob(fakeJob().job, context, deleted.job)).toEqual({ thingId: 't1', deleted: true });
    expect(deleted.calls).toEqual([]);
    expect(sent).toEqual([]);
  });

  it('fails the row on input the engine refuses, tells the author, and fails the job without retries', async () => {
    const { context, sent } = fakeContext();
    const { job: s, calls } = spec(async () => {
      throw new EngineInputError('the subregion holds 0 elements');
    });
    const error = await runComputeJob(fakeJob().job, context, s).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(UnrecoverableError);
    expect((error as Error).message).toBe('the subregion holds 0 elements');
    expect(calls).toEqual(['failed the subregion holds 0 elements null', 'ended failed']);
    expect(sent.map((m) => m.subject)).toEqual(['thing failed']);
    expect(sent[0]!.text).toContain('because the subregion holds 0 elements');
  });

  it('rethrows any other error as it is, after failing the row', async () => {
    const { context } = fakeContext();
    const boom = new Error('the engine thread stopped unexpectedly (exit code 1)');
    const { job: s, calls } = spec(async () => {
      throw boom;
    });
    expect(await runComputeJob(fakeJob().job, context, s).catch((e: unknown) => e)).toBe(boom);
    expect(calls[0]).toBe(`failed ${boom.message} null`);
  });

  it('does not mail about a failure the row no longer records (it was cancelled or deleted meanwhile)', async () => {
    const { context, sent } = fakeContext();
    const { job: s, calls } = spec(
      async () => {
        throw new Error('late');
      },
      { markFailed: async () => false },
    );
    await runComputeJob(fakeJob().job, context, s).catch(() => undefined);
    expect(calls).toEqual([]);
    expect(sent).toEqual([]);
  });

  it('fails the row with the storage error and the result when storing fails', async () => {
    const { context } = fakeContext();
    const { job: s, calls } = spec(async () => 5, {
      complete: async () => {
        throw new Error('connection terminated');
      },
    });
    await expect(runComputeJob(fakeJob().job, context, s)).rejects.toThrow('the result could not be stored: connection terminated');
    expect(calls).toEqual(['failed the result could not be stored: connection terminated 5', 'ended failed']);
  });

  it('honours a cancel that arrived while the last stage ran', async () => {
    const { context, sent } = fakeContext();
    const { job: s, calls } = spec(async () => 5, { complete: async () => false });
    expect(await runComputeJob(fakeJob().job, context, s)).toEqual({ thingId: 't1', cancelled: true });
    expect(calls).toEqual(['cancelled']);
    expect(sent).toEqual([]);
  });

describe('the e-mail switches, one per kind', () => {
  const ok = async () => 7;
  const studyMail = (s: ReturnType<typeof spec>) => {
    const ended = s.job.ended;
    s.job.ended = async (claimed, end) => {
      const mail = await ended(claimed, end);
      return mail ? { ...mail, kind: 'study' as const } : null;
    };
    return s;
  };

  it('mails a run only when run e-mails are on, whatever the study switch says', async () => {
    for (const [runs, studies, expected] of [[true, false, 1], [false, true, 0]] as const) {
      const { context, sent } = fakeContext(runs, studies);
      await runComputeJob(fakeJob().job, context, spec(ok).job);
      expect(sent).toHaveLength(expected);
      if (expected) expect(sent[0]!.text).toContain('because run e-mails are switched on');
    }
  });

  it('mails a study only when study e-mails are on, whatever the run switch says', async () => {
    for (const [runs, studies, expected] of [[false, true, 1], [true, false, 0]] as const) {
      const { context, sent } = fakeContext(runs, studies);
      await runComputeJob(fakeJob().job, context, studyMail(spec(ok)).job);
      expect(sent).toHaveLength(expected);
      if (expected) expect(sent[0]!.text).toContain('because study e-mails are switched on');
    }
  });
});
});
