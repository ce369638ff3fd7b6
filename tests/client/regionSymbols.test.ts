import { describe, expect, it } from 'vitest';
import { regionDescriptors, regionFieldTexts, regionKinds, regionLatex, regionSettingsText, regionSpecSchema, regionText, type RegionSpec } from '@shared/regions';

/** Each kind at its form defaults, the region every form starts from. */
function defaultRegion(kind: (typeof regionKinds)[number]): RegionSpec {
  const d = regionDescriptors[kind];
  const fields = Object.fromEntries(Object.entries(d.defaults as Record<string, string>).map(([k, v]) => [k, Number(v)]));
  return regionSpecSchema.parse({ kind, ...fields });
}

describe('one symbol per quantity in the regions’ words', () => {
  const texts = regionKinds.flatMap((kind) => {
    const r = defaultRegion(kind);
    return [regionText(r), regionSettingsText(r), regionLatex(r), regionDescriptors[kind].description, regionDescriptors[kind].cli.usage].filter((t): t is string => typeof t === 'string');
  });
  const fieldTexts = Object.values(regionFieldTexts).flatMap((t) => [t.label, t.hint, t.invalid]).filter((t): t is string => typeof t === 'string');

  it('calls the proper time T, never τ or L', () => {
    for (const text of [...texts, ...fieldTexts]) {
      expect(text, text).not.toContain('τ');
      expect(text, text).not.toMatch(/proper time \$?L\b/);
    }
  });

  it('calls the circumference C, never L', () => {
    for (const text of [...texts, ...fieldTexts]) expect(text, text).not.toMatch(/\bL\s*=|\$L\b|−L\/2|\bL\/2/);
    const cylinder = regionText(defaultRegion('cylinder2d'));
    expect(cylinder).toMatch(/C = 4/);
  });
});
