import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import type { RunResult } from '@shared/runs';
import { formatQuantity } from '@shared/precision';
import { ComplementTable, DiagnosticsTable, restrictedCutRowText } from '../../src/features/runs/components/RunResultTables';
import { spectrumTraces } from '../../src/features/runs/lib/plotData';

const colors = { data: 'ink', dataSoft: 'soft', reference: 'sage', cut: 'accent', accentDeep: 'deep', inkFaint: 'faint' };
const textOf = (html: string) => html.replace(/<[^>]+>/g, '');

describe('one precision rule on the run page and its plots (issue 18 §5)', () => {
  const cutoff = 1.309974;
  it('reads the cut λc the same in the diagnostics table and the spectrum legend', () => {
    const result = { eigenvalues: [10, 5, 2, 1], continuum: null, cutoff, modesKept: 3, links: null, density: null, diagnostics: {} } as unknown as RunResult;
    const legend = spectrumTraces(result, colors).find((trace) => String(trace.name).startsWith('cut λc'))!.name;
    expect(legend).toBe('cut λc = 1.310');
    const page = textOf(renderToStaticMarkup(createElement(DiagnosticsTable, { result })));
    expect(page).toContain(formatQuantity(cutoff, 'cut'));
    expect(page).not.toContain('1.30997');
    expect(restrictedCutRowText({ rule: 'sqrtN' }, cutoff)).toBe('√n/(4π) = 1.310');
  });
  it('shows a pure-state S as the floor text, not digits of noise', () => {
    const html = renderToStaticMarkup(
      createElement(ComplementTable, {
        entropy: { S: 3.4e-10, n: 120 },
        complement: { S: 1.634, n: 40, difference: 1.634 } as unknown as NonNullable<RunResult['complement']>,
      }),
    );
    expect(textOf(html)).toContain('0 (below the numerical floor 1e-6)');
    expect(textOf(html)).not.toContain('3.4');
  });
});
