import { describe, expect, it } from 'vitest';
import { causalSetMetadataSchema, describeRegion, metadataFromFormFields, metadataToFormFields } from '@shared/causalSets';
import { defaultImportForm, formWithRegion, metadataFromForm, nameFromFileName, sniffFile } from '../../src/features/causalSets/lib/importForm';

describe('import form', () => {
  it('builds coordinates metadata with a region or a density, and relation metadata with count and dimension', () => {
    const base = { ...defaultImportForm(), name: 'run A' };
    expect(metadataFromForm({ ...base, properTime: '2.5' })).toEqual({
      ok: true,
      metadata: { name: 'run A', kind: 'coordinates', region: { kind: 'diamond2d', properTime: 2.5 } },
    });
    expect(metadataFromForm({ ...base, scale: 'density', density: '120' })).toEqual({ ok: true, metadata: { name: 'run A', kind: 'coordinates', density: 120 } });
    expect(metadataFromForm({ ...base, kind: 'relations', count: '40', dimension: '4', density: '7' })).toEqual({
      ok: true,
      metadata: { name: 'run A', kind: 'relations', count: 40, dimension: 4, density: 7 },
    });
  });

  it('puts schema messages on the form fields', () => {
    const base = defaultImportForm();
    const bad = metadataFromForm({ ...base, name: ' ', properTime: '-1' });
    expect(bad.ok).toBe(false);
    if (bad.ok) return;
    expect(bad.errors.name).toBe('give the causal set a name');
    expect(bad.errors.properTime).toBe('must be positive');
    const noCount = metadataFromForm({ ...base, name: 'x', kind: 'relations', count: '' });
    expect(!noCount.ok && noCount.errors.count).toBe('a relation list needs the element count');
  });

  it('round-trips metadata through multipart text fields like the server reads them', () => {
    const metadata = { name: 'cyl', kind: 'coordinates' as const, region: { kind: 'cylinder2d' as const, properTime: 3, circumference: 2 } };
    expect(causalSetMetadataSchema.parse(metadataFromFormFields(metadataToFormFields(metadata)))).toEqual(metadata);
    expect(metadataFromFormFields({ name: 'r', kind: 'relations', count: '12', dimension: '2', density: '' })).toEqual({ name: 'r', kind: 'relations', count: 12, dimension: 2 });
    expect(metadataFromFormFields({ count: '1e400x' }).count).toBe('1e400x');
  });

  it('guesses kind, dimension and element count from the first rows of a file', () => {
    expect(sniffFile('# gen v2\nt,x,y,z\n0,0,0,0\n')).toMatchObject({ kind: 'coordinates', dimension: 4, rows: 1 });
    expect(sniffFile('i,j\n0,4\n3,9\n')).toMatchObject({ kind: 'relations', countGuess: 10, rows: 2 });
    expect(sniffFile('2,1\n')).toMatchObject({ kind: 'relations', countGuess: 3 });
    expect(sniffFile('a,b\n')).toMatchObject({ kind: null, dimension: null });
    expect(nameFromFileName('C:\\data\\sprinkling-7.csv')).toBe('sprinkling-7');
    expect(describeRegion({ kind: 'diamond2d', properTime: 2 * Math.SQRT2 })).toBe('2D diamond, T = 2.82843');
  });
});

describe('the region the import form proposes', () => {
  it('the recorded region wins over the points (a tacet sprinkle file)', () => {
    const sniff = sniffFile('# tacet region {"kind":"diamond2d","properTime":2}\nt,x\n0,0.1\n0.2,0.3\n');
    expect(sniff.proposal).toEqual({ region: { kind: 'diamond2d', properTime: 2 }, from: 'recorded' });
  });

  it('else the smallest centred diamond of the points; accepting it fills the form (worked example)', () => {
    // worked by hand: |t| + |x| is at most 0.7, at (−0.6, 0.1); 1.4 leaves it on the open diamond's boundary, so T = 1.5
    const sniff = sniffFile('t,x\n0,0.5\n0.3,-0.2\n-0.6,0.1\n');
    expect(sniff.proposal).toEqual({ region: { kind: 'diamond2d', properTime: 1.5 }, from: 'points' });
    const form = formWithRegion({ ...defaultImportForm(), scale: 'density' }, sniff.proposal!.region);
    expect(form).toMatchObject({ regionKind: 'diamond2d', properTime: '1.5', scale: 'region' });
    expect(sniffFile('i,j\n0,1\n').proposal).toBeNull();
  });
});
