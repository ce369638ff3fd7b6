import { roles } from '@shared/roles';
import { roleDescriptions, roleLabels } from '../../../lib/format';

export function RoleLegend() {
  return (
    <dl className="grid grid-cols-[7rem_1fr] gap-x-4 gap-y-1 text-sm">
      {roles.map((role) => (
        <div key={role} className="contents">
          <dt className="text-ink">{roleLabels[role]}</dt>
          <dd className="text-ink-soft">{roleDescriptions[role]}</dd>
        </div>
      ))}
    </dl>
  );
}
