import { formatWithError } from '@shared/precision';
import type { CreateStudyRequest, ResolvedSubregion, StudyAggregate, StudyCausalSet, StudyEntropy, StudyFit, StudyStatus } from '@shared/studies';
import { regionDimension, regionLatex } from '@shared/regions';
import { ruleCautions, type RegionSpec } from '@shared/vacuum';

/** What every export of a study is made from (the service loads it; these functions are pure). */
export interface StudyExportInput {
  id: string;
  title: string | null;
  status: StudyStatus;
  author: string;
  createdAt: string;
  finishedAt: string | null;
  request: CreateStudyRequest;
  /** the imported causal sets of a study over them, in cell order; empty for sprinklings */
  causalSets: StudyCausalSet[];
  subregions: ResolvedSubregion[];
  entropies: StudyEntropy[];
  aggregates: StudyAggregate[];
  fits: StudyFit[];
  cells: {
    id: string;
    N: number;
    seed: string;
    status: string;
    elements: number | null;
    backend: string | null;
    engineVersion: string | null;
    startedAt: string | null;
    finishedAt: string | null;
    timings: Record<string, number> | null;
    states: { rule: string; cutoff: number; modesKept: number }[] | null;
    error: string | null;
  }[];
}

/** The dimension of the study's regions: its region's, or that of its imported sets. */
export function studyDimension(input: Pick<StudyExportInput, 'request' | 'causalSets'>): 2 | 4 {
  if (input.request.source === 'sprinkled') return regionDimension(input.request.region.kind);
  return input.causalSets.some((c) => c.dimension === 4) ? 4 : 2;
}

/** The cautions of every rule of the study (shared/vacuum.ts ruleCautions), without repeats. */
export function studyCautions(input: Pick<StudyExportInput, 'request' | 'causalSets'>): string[] {
  const dimension = studyDimension(input);
  const kind = input.request.source === 'sprinkled' ? input.request.region.kind : undefined;
  return [...new Set(input.request.rules.flatMap((r) => ruleCautions(dimension, r, undefined, kind)))];
}

/** Escapes LaTeX's special characters in running text. */
export function escapeLatex(text: string): string {
  return text.replace(/[\\{}&%$#_~^]/g, (c) => {
    switch (c) {
      case '\\':
        return '\\textbackslash{}';
      case '~':
        return '\\textasciitilde{}';
      case '^':
        return '\\textasciicircum{}';
      default:
        return `\\${c}`;
    }
  })
    .replace(/ℓ/g, '$\\ell$')
    .replace(/√(\w+)/g, '$\\sqrt{$1}$')
    .replace(/√/g, '$\\surd$')
    .replace(/π/g, '$\\pi$')
    .replace(/λ/g, '$\\lambda$')
    .replace(/≤/g, '$\\leq$')
    .replace(/–/g, '--');
}

/** A value with its uncertainty in LaTeX, by the one precision rule of shared/precision.ts (formatWithError). */
export function formatWithUncertainty(value: number, error: number | null): string {
  return formatWithError(value, error, 'latex');
}

export const regionText = (region: RegionSpec): string => regionLatex(region);
