import { useState } from 'react';
import { useNavigate } from 'react-router';
import type { StudyDetail } from '@shared/studies';
import { isApiError } from '../../../lib/apiClient';
import { Button } from '../../../ui/Button';
import { SelectField } from '../../../ui/Field';
import { StatusLabel } from '../../../ui/StatusLabel';
import { useOpenCellAsRun, useRetryCell } from '../api/studies';

const th = 'border-b border-ink-faint px-2 py-1.5 text-left text-xs font-medium text-ink-soft';
const td = 'border-b border-rule px-2 py-1.5 align-baseline whitespace-nowrap';

/**
 * Every cell of the study, one row each: a failed cell can be queued again, a finished one opened as a
 * vacuum run (its own sprinkling, with the subregion and rule picked above the table), whose page adds
 * the diagnostics, spectrum and points the study does not keep.
 */
export function StudyCells({ study, canCompute }: { study: StudyDetail; canCompute: boolean }) {
  const [subregion, setSubregion] = useState(study.subregions[0]?.key ?? '');
  const [rule, setRule] = useState(study.rules[0] ?? '');
  const [message, setMessage] = useState<string | null>(null);
  const retry = useRetryCell(study.id);
  const open = useOpenCellAsRun(study.id);
  const navigate = useNavigate();
  const setNames = new Map(study.causalSets.map((c) => [c.id, c.name]));
  const cancelled = study.status === 'cancelled';

  const act = async (action: () => Promise<unknown>) => {
    setMessage(null);
    try {
      await action();
    } catch (error) {
      setMessage(isApiError(error) || error instanceof Error ? error.message : 'That did not work; try again.');
    }
  };

  return (
    <div className="flex flex-col gap-4" data-testid="study-cells">
      {canCompute && study.progress.done > 0 && (
        <div className="grid max-w-2xl grid-cols-1 gap-6 sm:grid-cols-2">
          <SelectField label="Open as a run with the subregion" name="cellRunSubregion" value={subregion} onChange={(e) => setSubregion(e.target.value)}>
            {study.subregions.map((s) => (
              <option key={s.key} value={s.key}>
                {s.label}
              </option>
            ))}
          </SelectField>
          <SelectField label="and the cut rule" name="cellRunRule" value={rule} onChange={(e) => setRule(e.target.value)}>
            {study.rules.map((r) => (
              <option key={r} value={r}>
                {study.ruleLabels[r] ?? r}
              </option>
            ))}
          </SelectField>
        </div>
      )}
      {message && (
        <p role="alert" className="text-sm text-danger">
          {message}
        </p>
      )}
      {/* relative: the sr-only header is absolutely placed and would escape an unpositioned scroll box */}
      <div className="relative max-h-[28rem] overflow-auto">
        <table className="w-full min-w-[34rem] border-collapse text-sm">
          <thead>
            <tr>
              <th className={th}>N</th>
              <th className={th}>{study.source === 'imported' ? 'causal set' : 'seed'}</th>
              <th className={th}>status</th>
              <th className={th}>elements</th>
              <th className={th}>time</th>
              {canCompute && <th className={th}><span className="sr-only">actions</span></th>}
            </tr>
          </thead>
          <tbody>
            {study.cells.map((c) => (
              <tr key={c.id} data-testid="study-cell-row">
                <td className={`${td} figures`}>{c.N}</td>
                <td className={`${td} ${setNames.has(c.seed) ? '' : 'font-mono text-xs'}`}>{setNames.get(c.seed) ?? c.seed}</td>
                <td className={td}>
                  <StatusLabel status={c.status} percent={c.percent} />
                  {c.error && <span className="block max-w-md whitespace-normal text-xs text-danger">{c.error}</span>}
                </td>
                <td className={`${td} figures text-xs`}>{c.elements ?? '—'}</td>
                <td className={`${td} figures text-xs text-ink-soft`}>{c.seconds !== null ? `${c.seconds.toFixed(1)} s` : '—'}</td>
                {canCompute && (
                  <td className={`${td} text-right whitespace-nowrap`}>
                    {c.status === 'failed' && !cancelled && (
                      <Button variant="quiet" busy={retry.isPending && retry.variables === c.id} onClick={() => act(() => retry.mutateAsync(c.id))}>
                        Retry
                      </Button>
                    )}
                    {c.status === 'done' && (
                      <Button
                        variant="quiet"
                        busy={open.isPending && open.variables?.cellId === c.id}
                        onClick={() =>
                          act(async () => {
                            const run = await open.mutateAsync({ cellId: c.id, subregion, rule });
                            navigate(`/runs/${run.id}`);
                          })
                        }
                      >
                        Open as run
                      </Button>
                    )}
                  </td>
                )}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
