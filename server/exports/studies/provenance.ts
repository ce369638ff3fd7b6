import { studyRenyiKeys, studyRuleKey, studyRuleLabel } from '@shared/studies';
import { effectiveRestrictedCut, ruleCautions } from '@shared/vacuum';
import { studyDimension, type StudyExportInput } from './common';
import { referencesUsed } from './references';

/** JSON with the full provenance: request, seeds, rules, engine versions and backends, times, results. */
export function provenanceJson(input: StudyExportInput, exportedAt: Date = new Date()): Record<string, unknown> {
  return {
    format: 'tacet-study/1',
    exportedAt: exportedAt.toISOString(),
    study: {
      id: input.id,
      title: input.title,
      status: input.status,
      author: input.author,
      createdAt: input.createdAt,
      finishedAt: input.finishedAt,
    },
    request: input.request,
    source: input.request.source,
    seeds: input.request.source === 'sprinkled' ? input.request.seeds : null,
    /** the imported sets in cell order: a cell's seed is its set's id */
    causalSets: input.request.source === 'imported' ? input.causalSets : null,
    rules: input.request.rules.map((r) => ({
      key: studyRuleKey(r),
      label: studyRuleLabel(r),
      truncation: r.truncation,
      doubleTruncation: r.doubleTruncation,
      restrictedCut: effectiveRestrictedCut(r),
      cautions: ruleCautions(studyDimension(input), r),
    })),
    subregions: input.subregions,
    /** the Rényi orders of every S_α (and I_α) in entropies and aggregates, by renyiKey; empty without */
    renyiOrders: studyRenyiKeys(input.request),
    engine: {
      versions: [...new Set(input.cells.map((c) => c.engineVersion).filter((v) => v !== null))],
      backends: [...new Set(input.cells.map((c) => c.backend).filter((v) => v !== null))],
      prng: input.request.source === 'sprinkled' ? `seedrandom.${input.request.prng}` : null,
      process: input.request.source === 'sprinkled' ? input.request.process : 'imported',
    },
    cells: input.cells,
    entropies: input.entropies,
    aggregates: input.aggregates,
    fits: input.fits,
    references: referencesUsed(input.request),
  };
}
