import { Platform1764633600000 } from './1764633600000-platform';
import { Runs1764720000000 } from './1764720000000-runs';
import { CausalSets1764806400000 } from './1764806400000-causal-sets';
import { Studies1764892800000 } from './1764892800000-studies';
import { RunRelations1764979200000 } from './1764979200000-run-relations';
import { NotifyDefaultOn1765065600000 } from './1765065600000-notify-default-on';
import { ApiTokens1765152000000 } from './1765152000000-api-tokens';
import { StudyCausalSets1765238400000 } from './1765238400000-study-causal-sets';
import { NotifyStudyDone1765324800000 } from './1765324800000-notify-study-done';
import { StudyCellQueuedAt1765418400000 } from './1765418400000-study-cell-queued-at';

/**
 * Every migration, oldest first. Add new ones at the end; never edit one that has shipped.
 * The class name ends in the timestamp TypeORM orders by.
 */
export const migrations = [
  Platform1764633600000,
  Runs1764720000000,
  CausalSets1764806400000,
  Studies1764892800000,
  RunRelations1764979200000,
  NotifyDefaultOn1765065600000,
  ApiTokens1765152000000,
  StudyCausalSets1765238400000,
  NotifyStudyDone1765324800000,
  StudyCellQueuedAt1765418400000,
];
