import { describe, expect, it } from 'vitest';
import { createRunRequestSchema } from '@shared/runs';
import { createStudyRequestSchema } from '@shared/studies';
import { defaultRunForm, parseElementList, runRequestFromForm, type PickedCausalSet, type RunFormValues } from '../../src/features/runs/lib/runForm';
import { regionDimension } from '../../src/features/runs/lib/runForm';
import { defaultStudyForm, defaultTips, formFieldOf, parseElementLists, studyRequestFrom } from '../../src/features/studies/lib/studyForm';

/** The run and study forms with an imported causal set in place of a sprinkling. */
const setId = '0b6f9a52-3c1d-4e8f-9a7b-1c2d3e4f5a6b';
const coordinates: PickedCausalSet = { id: setId, kind: 'coordinates', dimension: 2, N: 300 };
const relations: PickedCausalSet = { id: setId, kind: 'relations', dimension: 2, N: 40 };
const form = (overrides: Partial<RunFormValues> = {}): RunFormValues => ({ ...defaultRunForm('abc'), source: 'imported', causalSetId: setId, ...overrides });

describe('parseElementList', () => {
  it('reads comma- or space-separated labels and says what is wrong otherwise', () => {
    expect(parseElementList('0, 1,2  5', 10)).toEqual([0, 1, 2, 5]);
    expect(parseElementList('3', 10)).toMatch(/at least two/);
    expect(parseElementList('1, 10', 10)).toMatch(/Element 10 does not exist: the causal set has 10 elements, labelled 0 to 9/);
    expect(parseElementList('1, -2', 10)).toMatch(/“-2” is not an element label/);
    expect(parseElementList('1, 1.5', 10)).toMatch(/“1.5” is not/);
    expect(parseElementList('4, 4', 10)).toMatch(/listed twice/);
  });
});

describe('the new-run form on an imported causal set', () => {
  it('sends causalSetId instead of a sprinkling, with the field settings', () => {
    const checked = runRequestFromForm(form({ mass: '0.5', title: ' on the import ' }), 6000, coordinates);
    expect(checked.ok).toBe(true);
    if (!checked.ok) return;
    expect(checked.request).toEqual(createRunRequestSchema.parse({ causalSetId: setId, mass: 0.5, title: 'on the import', truncation: { rule: 'sqrtN' }, doubleTruncation: false }));
    expect(checked.request.sprinkling).toBeUndefined();
  });

  it('asks for a set when none is picked (or the picked one is gone)', () => {
    const none = runRequestFromForm(form({ causalSetId: '' }), 6000, null);
    expect(none.ok).toBe(false);
    if (!none.ok) expect(none.errors.causalSetId).toMatch(/Pick one/);
  });

  it('takes a diamond by tips on coordinates, and an element list on a relation list even if tips were chosen', () => {
    const tips = runRequestFromForm(form({ withSubregion: true, doubleTruncation: true }), 6000, coordinates);
    expect(tips.ok && tips.request.subregion).toEqual({ kind: 'diamond', past: { t: -0.5, x: 0 }, future: { t: 0.5, x: 0 } });
    expect(tips.ok && tips.request.doubleTruncation).toBe(true);

    const listed = runRequestFromForm(form({ withSubregion: true, subregionBy: 'tips', elementList: '0,1,2,7' }), 6000, relations);
    expect(listed.ok && listed.request.subregion).toEqual({ kind: 'elements', indices: [0, 1, 2, 7] });

    const beyond = runRequestFromForm(form({ withSubregion: true, subregionBy: 'elements', elementList: '0, 40' }), 6000, relations);
    expect(beyond.ok).toBe(false);
    if (!beyond.ok) expect(beyond.errors['subregion.indices']).toMatch(/Element 40 does not exist/);
  });

  it('still checks the tips against the light cone on coordinates', () => {
    const spacelike = runRequestFromForm(form({ withSubregion: true, past: { t: '0', x: '0', y: '0', z: '0' }, future: { t: '0.1', x: '1', y: '0', z: '0' } }), 6000, coordinates);
    expect(spacelike.ok).toBe(false);
    if (!spacelike.ok) expect(spacelike.errors['subregion.future.t']).toMatch(/light cone/);
  });

  it('leaves the sprinkled form as it was', () => {
    const checked = runRequestFromForm({ ...defaultRunForm('abc') }, 6000, coordinates);
    expect(checked.ok && checked.request.sprinkling?.count).toBe(500);
    expect(checked.ok && checked.request.causalSetId).toBeUndefined();
  });
});

describe('the study form on imported causal sets', () => {
  it('sends source "imported" with the picked sets and element lists, which the shared schema accepts', () => {
    const body = studyRequestFrom({ ...defaultStudyForm, source: 'imported', causalSetIds: [setId], subregionKind: 'elements', elementLists: '0, 1, 2\n\n5 6 7 8' });
    expect(body).toEqual({
      source: 'imported',
      causalSetIds: [setId],
      subregions: { kind: 'elements', lists: [{ indices: [0, 1, 2] }, { indices: [5, 6, 7, 8] }] },
      rules: [{ truncation: { rule: 'none' }, doubleTruncation: false }, { truncation: { rule: 'sqrtN' }, doubleTruncation: true }],
      mass: 0,
    });
    expect(createStudyRequestSchema.safeParse(body).success).toBe(true);
    expect(parseElementLists(' 1,2 \n')).toEqual([[1, 2]]);
  });

  it('puts the messages about sets and lists beside their fields', () => {
    expect(formFieldOf('causalSetIds.0')).toBe('causalSetIds');
    expect(formFieldOf('subregions.lists.1.indices')).toBe('elementLists');
    const empty = createStudyRequestSchema.safeParse(studyRequestFrom({ ...defaultStudyForm, source: 'imported' }));
    expect(empty.success).toBe(false);
    if (!empty.success) expect(empty.error.issues[0]!.path.join('.')).toBe('causalSetIds');
  });

  it('sends source "sprinkled" for the sprinkled form', () => {
    expect(studyRequestFrom(defaultStudyForm).source).toBe('sprinkled');
  });
});

describe('the study form on the other sprinkled regions', () => {
  it('sends a 4D diamond with 4D tips, a cylinder with its circumference and a slab by its ranges', () => {
    const fourD = studyRequestFrom({ ...defaultStudyForm, regionKind: 'diamond4d', subregionKind: 'tips', tips: '-0.4,0,0,0 0.4,0.1,0,0' });
    expect(fourD).toMatchObject({ region: { kind: 'diamond4d', properTime: 2 }, subregions: { kind: 'tips', diamonds: [{ past: { t: -0.4, x: 0, y: 0, z: 0 }, future: { t: 0.4, x: 0.1, y: 0, z: 0 } }] } });
    expect(createStudyRequestSchema.safeParse(fourD).success).toBe(true);
    const cylinder = studyRequestFrom({ ...defaultStudyForm, regionKind: 'cylinder2d', circumference: '3' });
    expect(cylinder).toMatchObject({ region: { kind: 'cylinder2d', properTime: 2, circumference: 3 } });
    expect(createStudyRequestSchema.safeParse(cylinder).success).toBe(true);
    const slab = studyRequestFrom({ ...defaultStudyForm, regionKind: 'slab2d', subregionKind: 'tips', tMin: '0', tMax: '1', xMin: '0', xMax: '2', tips: '0,1 1,1' });
    expect(slab).toMatchObject({ region: { kind: 'slab2d', tMin: 0, tMax: 1, xMin: 0, xMax: 2 } });
    expect(createStudyRequestSchema.safeParse(slab).success).toBe(true);
  });

  it('puts region messages beside the region fields', () => {
    const badSlab = createStudyRequestSchema.safeParse(studyRequestFrom({ ...defaultStudyForm, regionKind: 'slab2d', subregionKind: 'tips', tMin: '1', tMax: '0' }));
    expect(badSlab.success).toBe(false);
    const fields = badSlab.error!.issues.map((i) => formFieldOf(i.path.join('.')));
    expect(fields).toContain('properTime');
    expect(formFieldOf('region.circumference')).toBe('circumference');
    // a blank number is named in plain words, not read as 0
    const blank = createStudyRequestSchema.safeParse(studyRequestFrom({ ...defaultStudyForm, regionKind: 'cylinder2d', circumference: '' }));
    expect(blank.success ? [] : blank.error.issues.map((i) => [formFieldOf(i.path.join('.')), i.message])).toEqual([['circumference', 'must be a number']]);
    expect(formFieldOf('region.tMax')).toBe('tMin');
    expect(regionDimension('diamond4d')).toBe(4);
    expect(defaultTips[4].split(' ')[0]!.split(',')).toHaveLength(4);
  });
});
