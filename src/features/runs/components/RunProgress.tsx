import { vacuumStages, type VacuumStage } from '@shared/vacuum';
import type { RunDetail } from '@shared/runs';
import { ComputeTimingLine } from '../../../ui/ComputeTimingLine';

export const stageLabels: Record<VacuumStage, string> = {
  sprinkle: 'Sprinkling',
  order: 'Causal order',
  green: 'Green function',
  spectrum: 'Pauli–Jordan spectrum',
  state: 'SJ state',
  entropy: 'Entropy',
};

/** Whether the run has an entropy stage: a subregion or a mutual-information pair. */
function hasSubregion(request: unknown): boolean {
  if (typeof request !== 'object' || request === null) return false;
  const asked = request as { subregion?: unknown; mutualInformation?: unknown };
  return asked.subregion != null || asked.mutualInformation != null;
}

/** A thin accent bar over all stages and the list of stages, the current one marked. */
export function RunProgress({ run }: { run: RunDetail }) {
  const stages = vacuumStages.filter((s) => s !== 'entropy' || hasSubregion(run.request));
  const current = run.stage ? stages.indexOf(run.stage) : -1;
  const percent = Math.max(0, Math.min(100, run.percent));
  const label =
    run.status === 'queued'
      ? 'Waiting for a worker'
      : run.cancelRequested
        ? 'Stopping after this stage'
        : run.stage
          ? stageLabels[run.stage]
          : 'Starting';

  return (
    <div className="flex flex-col gap-3" data-testid="run-progress">
      <div className="flex items-baseline justify-between text-sm">
        <span className="text-ink">{label}</span>
        <span className="figures text-ink-soft">{percent.toFixed(0)}%</span>
      </div>
      <div
        role="progressbar"
        aria-label="Run progress"
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={Math.round(percent)}
        aria-valuetext={`${label}, ${percent.toFixed(0)}%`}
        className="h-1 w-full bg-rule"
      >
        <div className="h-1 bg-accent transition-[width] duration-700" style={{ width: `${percent}%` }} />
      </div>
      <ComputeTimingLine status={run.status} timing={run.timing} className="text-sm text-ink-soft" />
      <ol className="flex flex-wrap gap-x-6 gap-y-1 text-xs">
        {stages.map((stage, index) => {
          const state = run.status === 'queued' || index > current ? 'todo' : index === current ? 'now' : 'done';
          return (
            <li
              key={stage}
              className={state === 'now' ? 'text-accent' : state === 'done' ? 'text-ink-soft' : 'text-ink-faint'}
              aria-current={state === 'now' ? 'step' : undefined}
            >
              <span aria-hidden className="mr-1 font-mono">
                {state === 'done' ? '✓' : state === 'now' ? '›' : '·'}
              </span>
              {stageLabels[stage]}
            </li>
          );
        })}
      </ol>
    </div>
  );
}
