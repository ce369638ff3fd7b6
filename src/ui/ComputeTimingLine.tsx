import type { ComputeTiming } from '@shared/computeTiming';
import type { RunStatus } from '@shared/runs';
import { computeTimingText } from '../lib/computeTiming';

/** The time and queue line of a run or a study ("running 1 min 20 s · about 2 min left"); nothing when there is nothing to say. */
export function ComputeTimingLine({ status, timing, className = 'text-xs text-ink-soft' }: { status: RunStatus; timing: ComputeTiming | undefined; className?: string }) {
  const text = timing ? computeTimingText(status, timing) : null;
  if (!text) return null;
  return (
    <span className={`figures ${className}`} data-testid="compute-timing">
      {text}
    </span>
  );
}
