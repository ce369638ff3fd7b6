import { describe, expect, it } from 'vitest';
import { properTimeForReach, recordedRegion, regionCommentLine, smallestCentredDiamond } from '@shared/regionProposal';
import { CausalSetFileError, parseCoordinatesCsv } from '../../server/causalSets/parse';

const limit = { maxElements: 1000, reason: 'test limit' };

describe('the region an imported file proposes', () => {
  it('reads the region a tacet sprinkle file records, and nothing from other comments', () => {
    const text = `${regionCommentLine({ kind: 'diamond2d', properTime: 2 })}\nt,x\n0,0\n0.1,0.2\n`;
    expect(recordedRegion(text)).toEqual({ kind: 'diamond2d', properTime: 2 });
    expect(recordedRegion('# made by hand\nt,x\n0,0\n')).toBeNull();
    expect(recordedRegion('# tacet region {"kind":"nowhere"}\nt,x\n')).toBeNull();
  });

  it('else the smallest centred diamond, T rounded up at two significant figures (worked example)', () => {
    // worked by hand: |t| + |x| of (0, 0.5), (0.3, −0.2), (−0.6, 0.1) is 0.5, 0.5, 0.7, so T must exceed 1.4;
    // 1.4 itself puts (−0.6, 0.1) on the boundary, outside the open diamond, so the next step 1.5 is proposed
    expect(smallestCentredDiamond([0, 0.5, 0.3, -0.2, -0.6, 0.1], 2)).toEqual({ kind: 'diamond2d', properTime: 1.5 });
    // reach 0.99 → T > 1.98 → 2
    expect(properTimeForReach(0.99)).toBe(2);
    // 4D: |t| + r of (0.1, 0.3, 0.4, 0) is 0.1 + 0.5 = 0.6 → T > 1.2 → 1.3
    expect(smallestCentredDiamond([0.1, 0.3, 0.4, 0], 4)).toEqual({ kind: 'diamond4d', properTime: 1.3 });
  });

  it('a file outside the stated region is told the region that holds it', () => {
    const text = 't,x\n0,0.5\n0.3,-0.2\n-0.6,0.1\n';
    let error: unknown;
    try {
      parseCoordinatesCsv(text, { region: { kind: 'diamond2d', properTime: 1 }, limit });
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(CausalSetFileError);
    const last = (error as CausalSetFileError).problems.at(-1)!.message;
    expect(last).toContain('properTime 1.5');
    // and the proposal is accepted by the same parser
    expect(parseCoordinatesCsv(text, { region: { kind: 'diamond2d', properTime: 1.5 }, limit }).n).toBe(3);
    const recorded = `${regionCommentLine({ kind: 'diamond2d', properTime: 2 })}\n${text}`;
    try {
      parseCoordinatesCsv(recorded, { region: { kind: 'diamond2d', properTime: 1 }, limit });
    } catch (e) {
      expect((e as CausalSetFileError).problems.at(-1)!.message).toContain('the file records the region it was made in: 2D');
    }
  });
});
