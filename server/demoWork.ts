import type { Queue } from 'bullmq';
import type { DataSource } from 'typeorm';
import type { CreateRunRequestInput } from '@shared/runs';
import type { CreateStudyRequestInput } from '@shared/studies';
import { createRunService } from './api/services/runs';
import { createStudyService } from './api/services/studies';
import { demoTeamName, demoUsers } from './db/demo-team';
import { listMembershipsOfUser } from './db/repositories/teams';
import { findUserByEmail } from './db/repositories/users';

/**
 * The demo team's first work, so a first visit meets results rather than empty tables. An invented
 * scenario of our own: the group checks the area law of the SJ state's entanglement on small 2D
 * diamonds before a larger campaign, with one 4D and one cylinder run beside it. Small sizes, so the
 * worker finishes them within a minute or two of the first start.
 */
export const demoRuns: CreateRunRequestInput[] = [
  {
    title: 'Half diamond, double truncation — the group’s reference case',
    sprinkling: { region: { kind: 'diamond2d', properTime: 2 }, process: 'fixed', count: 800, seed: 'halvorsen-ref-1' },
    truncation: { rule: 'sqrtN' },
    doubleTruncation: true,
    subregion: { kind: 'diamond', past: { t: -0.5, x: 0 }, future: { t: 0.5, x: 0 } },
    renyi: [0.5, 2, 'inf'],
    complement: true,
  },
  {
    title: 'Same points, untruncated (volume law expected)',
    sprinkling: { region: { kind: 'diamond2d', properTime: 2 }, process: 'fixed', count: 800, seed: 'halvorsen-ref-1' },
    truncation: { rule: 'none' },
    subregion: { kind: 'diamond', past: { t: -0.5, x: 0 }, future: { t: 0.5, x: 0 } },
  },
  {
    title: 'Two side diamonds — mutual information at d = 0.2',
    sprinkling: { region: { kind: 'diamond2d', properTime: 2 }, process: 'fixed', count: 800, seed: 'halvorsen-pair-1' },
    truncation: { rule: 'sqrtN' },
    doubleTruncation: true,
    mutualInformation: {
      a: { kind: 'diamond', past: { t: -0.3, x: -0.4 }, future: { t: 0.3, x: -0.4 } },
      b: { kind: 'diamond', past: { t: -0.3, x: 0.4 }, future: { t: 0.3, x: 0.4 } },
    },
  },
  {
    title: '4D diamond, knee cut — how far the 2D rules carry',
    sprinkling: { region: { kind: 'diamond4d', properTime: 2 }, process: 'fixed', count: 500, seed: 'halvorsen-4d-1' },
    truncation: { rule: 'knee' },
  },
  {
    title: 'Diamond on a cylinder of circumference 3',
    sprinkling: { region: { kind: 'cylinder2d', properTime: 2, circumference: 3 }, process: 'fixed', count: 600, seed: 'halvorsen-cyl-1' },
    truncation: { rule: 'sqrtN' },
    doubleTruncation: true,
    subregion: { kind: 'diamond', past: { t: -0.5, x: 0 }, future: { t: 0.5, x: 0 } },
  },
];

export const demoStudy: CreateStudyRequestInput = {
  source: 'sprinkled',
  title: 'Area-law pilot: four sizes, two N, three seeds',
  region: { kind: 'diamond2d', properTime: 2 },
  counts: [300, 600],
  seeds: ['pilot-1', 'pilot-2', 'pilot-3'],
  subregions: { kind: 'concentric', fractions: [0.2, 0.35, 0.5, 0.65] },
  rules: [{ truncation: { rule: 'sqrtN' }, doubleTruncation: true }, { truncation: { rule: 'none' } }],
  renyi: [2],
};

/**
 * Queues the demo work through the same services the API uses, as the demo researcher, when the demo
 * team has no runs and no studies (a first start, or a team emptied by hand). Returns what it queued.
 */
export async function queueDemoWork(dataSource: DataSource, computeQueue: Queue): Promise<string[]> {
  const researcherEmail = demoUsers.find((u) => u.role === 'researcher')!.email;
  const author = await findUserByEmail(dataSource.manager, researcherEmail);
  if (!author) return [];
  const membership = (await listMembershipsOfUser(dataSource.manager, author.id)).find((ms) => ms.teamName === demoTeamName);
  if (!membership) return [];
  const [{ runs, studies }] = await dataSource.query(
    'SELECT (SELECT count(*) FROM runs WHERE team_id = $1)::int AS runs, (SELECT count(*) FROM studies WHERE team_id = $1)::int AS studies',
    [membership.teamId],
  );
  if (runs > 0 || studies > 0) return [];
  const team = { id: membership.teamId, name: demoTeamName, role: membership.role };
  const runService = createRunService({ dataSource, computeQueue });
  const studyService = createStudyService({ dataSource, computeQueue });
  const queued: string[] = [];
  for (const body of demoRuns) {
    await runService.create(team, author, body);
    queued.push(`run "${body.title}"`);
  }
  await studyService.create(team, author, demoStudy);
  queued.push(`study "${demoStudy.title}"`);
  return queued;
}
