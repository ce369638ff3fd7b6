import type { RunDetail } from '@shared/runs';
import { runNumbersLatex } from '@shared/runNumbers';
import { CopyButton } from '../../../ui/CopyButton';

/** "Copy LaTeX": the run's numbers as the booktabs table `numbers.tex` downloads, rendered here by the same function. */
export function RunLatexCopy({ run }: { run: RunDetail }) {
  return (
    <div className="mt-4 flex flex-col gap-1">
      <CopyButton label="Copy LaTeX" text={() => runNumbersLatex(run)} testId="copy-latex" />
      <p className="text-xs text-ink-faint">N, ρ, the cut, n, S and, when asked, S_α and I(A:B), as a booktabs table by the precision rule.</p>
    </div>
  );
}
