import { describe, expect, it } from 'vitest';
import { createStudyRequestSchema, type SprinkledStudyRequest } from '@shared/studies';
import { resolveSubregions } from '../../server/studies/plan';
import { defaultStudyForm, studyMasslessOnlyReason, studyRequestFrom, tipsForStudyRegion } from '../../src/features/studies/lib/studyForm';

// Issue 16 in the study form: on a de Sitter kind the default tips follow the region, and the field is massless only.
describe('the study form on de Sitter regions', () => {
  for (const kind of ['deSitterDiamond2d', 'deSitterSlab2d', 'deSitterStaticPatch2d'] as const) {
    it(`${kind}: the region's own tips are accepted by the study planner`, () => {
      const values = { ...defaultStudyForm, regionKind: kind, subregionKind: 'tips' as const };
      const tips = tipsForStudyRegion(values)!;
      const request = createStudyRequestSchema.parse(studyRequestFrom({ ...values, tips }));
      // the planner's own placement rule (server/studies/plan.ts resolveSubregions) is the reference
      expect(() => resolveSubregions(request as SprinkledStudyRequest)).not.toThrow();
      expect(studyMasslessOnlyReason(kind)).toMatch(/\w/);
    });
  }

  it('leaves flat kinds massive-capable', () => {
    expect(studyMasslessOnlyReason('diamond2d')).toBeNull();
  });
});
