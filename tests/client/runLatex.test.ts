import { describe, expect, it } from 'vitest';
import type { RunDetail, RunResult } from '@shared/runs';
import { restrictedCutLatex, runNumbersLatex, runSettingsOf, truncationRuleLatex } from '@shared/runNumbers';

/**
 * The copy-ready LaTeX of a run's numbers (shared/runNumbers.ts runNumbersLatex). No TeX is installed
 * here, so the checks are on structure — balanced environments and braces, one `&` per row, math
 * balanced per cell — and on every number following shared/precision.ts.
 */
function run(result: Partial<RunResult>, request: Record<string, unknown> = {}, title: string | null = 'Centre & edge_1'): Pick<RunDetail, 'id' | 'title' | 'request' | 'result' | 'dimension'> {
  return {
    id: '2a2f7d25-1111-4000-8000-000000000000',
    title,
    dimension: 2,
    request: { mass: 0, truncation: { rule: 'sqrtN' }, doubleTruncation: true, sprinkling: { region: { kind: 'diamond2d', properTime: 2 }, process: 'fixed', count: 300, seed: 'seed_1', prng: 'arc4' }, ...request },
    result: {
      N: 300, density: 75, volume: 4, relations: 100, links: 50, eigenvalues: [], continuum: null, cutoff: 1.3783222, modesKept: 24, knee: null,
      diagnostics: { hermiticity: 0, minEigenvalueW: 0, commutatorResidual: 0, positiveNegativeOverlap: 0, trace: 1 },
      entropy: { S: 0.612345678, n: 75, modesKept: 12, cutoff: 0.68917, restrictedCut: { rule: 'sqrtN' }, generalizedEigenvalues: [], renyi: { '2': 0.41234, inf: 0.2, '0.5': 0.9 } },
      mutualInformation: { I: 0.0512345, a: { S: 0.3, n: 20, modesKept: 4, cutoff: 0.3 }, b: { S: 0.31, n: 21, modesKept: 4, cutoff: 0.3 }, union: { S: 0.5587655, n: 41, modesKept: 8, cutoff: 0.5 } },
      complement: { S: 0.6123457, n: 80, modesKept: 12, cutoff: 0.7, difference: 1e-8 },
      backend: 'ml-matrix', engineVersion: 'tacet-engine 0.1.0', timings: {},
      ...result,
    } as RunResult,
  };
}

function rowsOf(latex: string): Map<string, string> {
  const rows = new Map<string, string>();
  for (const line of latex.split('\n')) {
    const m = /^\s{4}(.+?) & (.+) \\\\$/.exec(line);
    if (m && m[1] !== 'quantity') rows.set(m[1]!, m[2]!);
  }
  return rows;
}

describe('the LaTeX of a run’s numbers', () => {
  const latex = runNumbersLatex(run({}));

  it('is one booktabs table with balanced environments, braces and math', () => {
    const count = (s: string) => latex.split(s).length - 1;
    for (const env of ['table', 'tabular']) expect(count(`\\begin{${env}`)).toBe(count(`\\end{${env}}`));
    expect(count('{')).toBe(count('}'));
    for (const rule of ['\\toprule', '\\midrule', '\\bottomrule']) expect(count(rule)).toBe(1);
    const body = latex.split('\\midrule')[1]!.split('\\bottomrule')[0]!.trim().split('\n');
    for (const line of body) {
      expect(line.replace(/\\&/g, '').split('&'), line).toHaveLength(2);
      expect(line.replace(/\\\$/g, '').split('$').length % 2, line).toBe(1);
    }
    expect(latex).toContain('\\label{tab:tacet-run-2a2f7d25}');
    // the title's & and _ are escaped, and the seed too
    expect(latex).toContain('Centre \\& edge\\_1');
    expect(latex).toContain('\\texttt{seed\\_1}');
  });

  it('prints every number by the precision rule', () => {
    const rows = rowsOf(latex);
    expect(rows.get('$N$')).toBe('$300$');
    expect(rows.get('$\\rho$')).toBe('$75.00$');
    expect(rows.get('$\\lambda_c$')).toBe('$1.378$');
    expect(rows.get('$\\lambda_c^{O}$')).toBe('$0.6892$');
    expect(rows.get('modes kept')).toBe('$24$');
    expect(rows.get('$n$')).toBe('$75$');
    expect(rows.get('$S$')).toBe('$0.6123$');
    expect(rows.get('$S_{1/2}$')).toBe('$0.9000$');
    expect(rows.get('$S_{2}$')).toBe('$0.4123$');
    expect(rows.get('$S_{\\infty}$')).toBe('$0.2000$');
    expect(rows.get('$I(A{:}B)$')).toBe('$0.05123$');
    expect(rows.get("$S_{O'}$")).toBe('$0.6123$');
    expect(rows.get('cut rule')).toBe('$\\sqrt{N}/(4\\pi)$');
    expect(rows.get('restricted cut')).toBe('$\\sqrt{n}/(4\\pi)$');
    // the Rényi rows ascend in α with ∞ last
    const keys = [...rows.keys()];
    expect(keys.indexOf('$S_{1/2}$')).toBeLessThan(keys.indexOf('$S_{2}$'));
    expect(keys.indexOf('$S_{2}$')).toBeLessThan(keys.indexOf('$S_{\\infty}$'));
    // a single run has no error bar, so no ± anywhere
    expect(latex).not.toContain('\\pm');
  });

  it('gives a pure state the floor text, and leaves out what the run did not ask for', () => {
    const pure = runNumbersLatex(run({ entropy: { S: 3e-11, n: 10, modesKept: 0, generalizedEigenvalues: [], renyi: null }, mutualInformation: null, complement: null }, { doubleTruncation: false }));
    const rows = rowsOf(pure);
    expect(rows.get('$S$')).toBe('$0\\ (\\text{below the numerical floor } 10^{-6})$');
    expect(rows.has('restricted cut')).toBe(false);
    expect(rows.has('$I(A{:}B)$')).toBe(false);
    expect([...rows.keys()].some((k) => k.startsWith('$S_{'))).toBe(false);
    const bare = rowsOf(runNumbersLatex(run({ entropy: null, mutualInformation: null, complement: null }, {}, null)));
    expect(bare.has('$S$')).toBe(false);
    expect(bare.get('$N$')).toBe('$300$');
  });

  it('names every rule in LaTeX, and refuses a run without a result', () => {
    expect(truncationRuleLatex({ rule: 'none' })).toBe('untruncated');
    expect(truncationRuleLatex({ rule: 'lambda', cut: 0.5 })).toBe('$\\lambda_c = 0.5$');
    expect(truncationRuleLatex({ rule: 'modes', count: 48 })).toBe('$48$ top modes');
    expect(truncationRuleLatex({ rule: 'knee', tolerance: 0.2 })).toBe('knee (tolerance $0.2$)');
    expect(restrictedCutLatex({ rule: 'lambda', cut: 0.2 })).toBe('$\\lambda = 0.2$');
    expect(() => runNumbersLatex({ ...run({}), result: null })).toThrow(/once it is done/);
  });

  it('reads the settings of a stored request leniently', () => {
    expect(runSettingsOf({ truncation: { rule: 'sqrtN' }, doubleTruncation: true, sprinkling: { seed: 7 } })).toMatchObject({ seed: '7', restrictedCut: { rule: 'sqrtN' }, mass: 0, engineRequest: 'auto' });
    expect(runSettingsOf(null)).toMatchObject({ truncation: { rule: 'none' }, seed: null, region: null });
  });
});
