import { describe, expect, it } from 'vitest';
import { escapeLatex } from '../../server/exports/studies';

describe('LaTeX wording', () => {
  it('writes a square root as \\sqrt{…}, not \\surd', () => {
    expect(escapeLatex('cut at √N/(4π), restricted at √n/4π')).toBe('cut at $\\sqrt{N}$/(4$\\pi$), restricted at $\\sqrt{n}$/4$\\pi$');
    expect(escapeLatex('√N')).not.toContain('surd');
  });

});
