import type { RunStatus } from '@shared/runs';

const styles: Record<RunStatus, string> = {
  queued: 'text-ink-soft',
  running: 'text-accent',
  done: 'text-ink',
  failed: 'text-danger',
  cancelled: 'text-ink-faint',
};

const marks: Record<RunStatus, string> = { queued: '○', running: '◐', done: '●', failed: '×', cancelled: '–' };

export const statusLabels: Record<RunStatus, string> = {
  queued: 'Queued',
  running: 'Running',
  done: 'Done',
  failed: 'Failed',
  cancelled: 'Cancelled',
};

export function StatusLabel({ status, percent }: { status: RunStatus; percent?: number }) {
  return (
    <span className={`inline-flex items-baseline gap-1.5 whitespace-nowrap ${styles[status]}`} data-status={status}>
      <span aria-hidden className="font-mono text-xs">
        {marks[status]}
      </span>
      {statusLabels[status]}
      {status === 'running' && percent !== undefined && <span className="figures text-xs">{Math.round(percent)}%</span>}
    </span>
  );
}
