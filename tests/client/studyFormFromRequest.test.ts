import { describe, expect, it } from 'vitest';
import { createStudyRequestSchema, nextSeeds, numberedSeedRule, STUDY_MAX_RULES, type CreateStudyRequestInput } from '@shared/studies';
import { studyFormFromRequest, studyRequestFrom, defaultStudyForm, doubleTruncatedRuleForm, formFieldOf, untruncatedRuleForm } from '../../src/features/studies/lib/studyForm';

/** "Duplicate" opens the study form with every setting of a study: request → form → request is the identity. */
const roundTrip = (input: CreateStudyRequestInput) => {
  const request = createStudyRequestSchema.parse(input);
  const form = studyFormFromRequest(request);
  const back = createStudyRequestSchema.parse(studyRequestFrom(form));
  return { request, form, back };
};

describe('studyFormFromRequest', () => {
  it('gives back a sprinkled study with four rules, Rényi orders, Poisson sprinklings and numbered seeds', () => {
    const { request, form, back } = roundTrip({
      source: 'sprinkled',
      title: 'Area law, four cuts',
      region: { kind: 'cylinder2d', properTime: 2, circumference: 3.5 },
      process: 'poisson',
      prng: 'alea',
      counts: [400, 200, 800],
      seeds: ['run-1', 'run-2', 'run-3'],
      subregions: { kind: 'concentric', fractions: [0.3, 0.45, 0.6] },
      rules: [
        { truncation: { rule: 'none' } },
        { truncation: { rule: 'sqrtN' }, doubleTruncation: true },
        { truncation: { rule: 'lambda', cut: 0.35 }, doubleTruncation: true, restrictedCut: { rule: 'lambda', cut: 0.125 } },
        { truncation: { rule: 'modes', count: 40 } },
      ],
      mass: 0.25,
      renyi: [0.5, 2, 'inf'],
    });
    expect(back).toEqual(request);
    expect(form).toMatchObject({ seedMode: 'numbered', seedPrefix: 'run', seedCount: '3', counts: '400, 200, 800', circumference: '3.5', renyi: '0.5, 2, inf' });
    expect(form.rules).toHaveLength(STUDY_MAX_RULES);
  });

  it('keeps seeds that follow no numbering as a list, and tips, pairs and knee tolerances as they were', () => {
    const tips = roundTrip({
      source: 'sprinkled',
      region: { kind: 'slab2d', tMin: -1, tMax: 1, xMin: -2, xMax: 2 },
      counts: [300],
      seeds: ['alpha', 'r-2', 'r-7'],
      subregions: { kind: 'tips', diamonds: [{ label: 'centre: wide', past: { t: -0.5, x: 0.1 }, future: { t: 0.5, x: 0.1 } }, { past: { t: -0.25, x: -1 }, future: { t: 0.25, x: -1 } }] },
      rules: [{ truncation: { rule: 'knee', tolerance: 0.2 } }, { truncation: { rule: 'knee' }, doubleTruncation: true }],
    });
    expect(tips.back).toEqual(tips.request);
    expect(tips.form.seedMode).toBe('listed');
    expect(tips.form.seedList).toBe('alpha, r-2, r-7');
    // a named sub-diamond keeps its name in front of its tips (the name may hold a colon itself)
    expect(tips.form.tips).toBe('centre: wide: -0.5,0.1 0.5,0.1\n-0.25,-1 0.25,-1');

    const pairs = roundTrip({
      source: 'sprinkled',
      region: { kind: 'diamond4d', properTime: 2 },
      counts: [500, 1000],
      seeds: [1, 2],
      subregions: { kind: 'pairs', sizes: [0.2], separations: [0.05, 0.1, 0.2] },
      rules: [{ truncation: { rule: 'knee' }, doubleTruncation: true }],
    });
    // numeric seeds are stored as text; "1", "2" follow no "<prefix>-k" rule
    expect(pairs.back).toEqual(pairs.request);
    expect(pairs.form.regionKind).toBe('diamond4d');
  });

  it('gives back a study over imported causal sets with element lists', () => {
    const { request, form, back } = roundTrip({
      source: 'imported',
      title: 'imported ensemble',
      causalSetIds: ['6f9619ff-8b86-4011-b42d-00c04fc964ff', '7f9619ff-8b86-4011-b42d-00c04fc964ff'],
      subregions: { kind: 'elements', lists: [{ indices: [0, 1, 2, 3] }, { label: 'tail', indices: [5, 8, 13] }] },
      rules: [{ truncation: { rule: 'sqrtN' }, doubleTruncation: true }],
    });
    expect(back).toEqual(request);
    expect(form.source).toBe('imported');
    expect(form.elementLists).toBe('0, 1, 2, 3\ntail: 5, 8, 13');
  });
});

describe('the rules of the study form', () => {
  it('starts with the untruncated rule and double truncation at the dimension’s usual cut', () => {
    expect(defaultStudyForm.rules).toEqual([untruncatedRuleForm, doubleTruncatedRuleForm]);
    expect(studyRequestFrom(defaultStudyForm).rules).toEqual([{ truncation: { rule: 'none' }, doubleTruncation: false }, { truncation: { rule: 'sqrtN' }, doubleTruncation: true }]);
    // √N/(4π) is a 2D rule: a 4D region's double truncation follows the region to the knee (shared/vacuum.ts defaultTruncationFor)
    expect(studyRequestFrom({ ...defaultStudyForm, regionKind: 'diamond4d' }).rules[1]).toEqual({ truncation: { rule: 'knee' }, doubleTruncation: true });
  });

  it('refuses a fifth rule with the schema’s message, placed beside the rules', () => {
    const five = { ...defaultStudyForm, rules: [0.1, 0.2, 0.3, 0.4, 0.5].map((cut) => ({ ...untruncatedRuleForm, truncation: { kind: 'lambda' as const, value: String(cut) } })) };
    const parsed = createStudyRequestSchema.safeParse(studyRequestFrom(five));
    expect(parsed.success).toBe(false);
    const issue = parsed.error!.issues[0]!;
    expect(issue.message).toBe('a study compares at most 4 cut rules; remove one');
    expect(formFieldOf(issue.path.join('.'))).toBe('rules');
    expect(formFieldOf('rules.2.truncation.cut')).toBe('rules.2');
  });
});

describe('seeds for an extension', () => {
  it('continue the numbering the study uses, skipping names it has', () => {
    expect(nextSeeds(['seed-1', 'seed-2', 'seed-3'], 2)).toEqual(['seed-4', 'seed-5']);
    expect(nextSeeds(['a', 's-2', 's-9'], 1)).toEqual(['s-10']);
    expect(nextSeeds(['alpha', 'beta'], 2)).toEqual(['seed-1', 'seed-2']);
    expect(nextSeeds(['x-1', 'seed-1'], 1)).toEqual(['seed-2']);
    expect(numberedSeedRule(['p-1', 'p-2'])).toEqual({ prefix: 'p', count: 2 });
    expect(numberedSeedRule(['p-1', 'p-3'])).toBeNull();
  });
});
