import { Link, useNavigate } from 'react-router';
import type { RunDetail } from '@shared/runs';
import { Button } from '../../../ui/Button';
import { useReseedRun, useRetryRun } from '../api/runs';

/** What the run page passes on to the run a "Same settings, new seed" started, to say so there. */
export interface ReseededState {
  reseededFrom: string;
  seed: string;
}

export function isReseededState(state: unknown): state is ReseededState {
  return typeof state === 'object' && state !== null && typeof (state as ReseededState).reseededFrom === 'string' && typeof (state as ReseededState).seed === 'string';
}

/**
 * The daily loop from one run: Retry (a failed or cancelled run, as a new run), the same settings on a
 * new seed (a run that sprinkled), and the new-run form filled with this run's settings.
 */
export function RunDailyLoopActions({ run }: { run: RunDetail }) {
  const retry = useRetryRun(run.id);
  const reseed = useReseedRun(run.id);
  const navigate = useNavigate();
  const sprinkled = Boolean((run.request as { sprinkling?: unknown } | null)?.sprinkling);
  const error = retry.error ?? reseed.error;
  return (
    <>
      {(run.status === 'failed' || run.status === 'cancelled') && (
        <Button busy={retry.isPending} onClick={() => retry.mutate(undefined, { onSuccess: ({ id }) => navigate(`/runs/${id}`) })}>
          Retry
        </Button>
      )}
      {sprinkled && (
        <Button
          variant="quiet"
          busy={reseed.isPending}
          title="A new run with every setting of this one and a fresh random seed"
          onClick={() => reseed.mutate(undefined, { onSuccess: ({ id, seed }) => navigate(`/runs/${id}`, { state: { reseededFrom: run.id, seed } satisfies ReseededState }) })}
        >
          Same settings, new seed
        </Button>
      )}
      <Link to={`/runs/new?from=${encodeURIComponent(run.id)}`} className="text-sm text-accent hover:underline">
        Open in the new-run form
      </Link>
      {error && (
        <p role="alert" className="basis-full text-right text-xs text-danger">
          {error.message}
        </p>
      )}
    </>
  );
}
