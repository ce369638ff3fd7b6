import type { StudyDetail } from '@shared/studies';
import { ComputeTimingLine } from '../../../ui/ComputeTimingLine';
import { StatusLabel } from '../../../ui/StatusLabel';

/** Overall progress (k of n sprinklings) and one mark per cell, so a stuck or failed cell is visible. */
export function StudyProgress({ study }: { study: StudyDetail }) {
  const { progress } = study;
  const unit = study.source === 'imported' ? 'causal sets' : 'sprinklings';
  // an imported study's cell seed is its causal set's id
  const setNames = new Map(study.causalSets.map((c) => [c.id, c.name]));
  const percent = Math.max(0, Math.min(100, progress.percent));
  const label =
    study.status === 'queued'
      ? 'Waiting for a worker'
      : study.status === 'running'
        ? `${progress.done} of ${progress.total} ${unit} done`
        : study.status === 'cancelled'
          ? `Cancelled: ${progress.done} of ${progress.total} ${unit} done`
          : `${progress.done} of ${progress.total} ${unit} done${progress.failed ? `, ${progress.failed} failed` : ''}`;
  const counts = [...new Set(study.cells.map((c) => c.N))];
  return (
    <div className="flex flex-col gap-3" data-testid="study-progress">
      <div className="flex items-baseline justify-between text-sm">
        <span className="text-ink">{label}</span>
        <span className="figures text-ink-soft">{percent.toFixed(0)}%</span>
      </div>
      <div role="progressbar" aria-label="Study progress" aria-valuemin={0} aria-valuemax={100} aria-valuenow={Math.round(percent)} aria-valuetext={label} className="h-1 w-full bg-rule">
        <div className="h-1 bg-accent transition-[width] duration-700" style={{ width: `${percent}%` }} />
      </div>
      <ComputeTimingLine status={study.status} timing={study.timing} className="text-sm text-ink-soft" />
      <table className="text-xs">
        <tbody>
          {counts.map((N) => (
            <tr key={N}>
              <th className="figures pr-4 text-left font-normal text-ink-soft">N = {N}</th>
              <td className="flex flex-wrap gap-x-4 gap-y-1 py-0.5">
                {study.cells
                  .filter((c) => c.N === N)
                  .map((c) => (
                    <span key={c.id} title={c.error ?? (c.seconds !== null ? `${c.seconds.toFixed(1)} s` : undefined)} className="inline-flex items-baseline gap-1">
                      <span className={setNames.has(c.seed) ? 'text-ink-faint' : 'font-mono text-ink-faint'}>{setNames.get(c.seed) ?? c.seed}</span>
                      <StatusLabel status={c.status} percent={c.percent} />
                    </span>
                  ))}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {study.error && (
        <p role="alert" className="text-sm text-danger">
          {study.error}
        </p>
      )}
    </div>
  );
}

/** What every study page says before its numbers. */
export function StudyCaution() {
  return (
    <aside className="border-l-2 border-reference py-1 pl-3 text-sm text-ink-soft" data-testid="caution">
      <span className="font-medium text-ink">Read with care.</span> These are ensemble means over a few finite sprinklings:
      finite-size effects bias the fitted coefficients, most at small n, and single seeds scatter by a few tenths. The
      truncation rule is a modelling choice — a different cut gives a different b. The methods paragraph in the downloads says
      this with its citations.
    </aside>
  );
}
