import { belowEntropyFloor, formatCheckPair, formatEntropy, formatQuantity, formatSignificantDigits } from '@shared/precision';
import { regionSettingsText, regionSpecSchema } from '@shared/regions';
import type { EntropyPart, RunDetail, RunResult } from '@shared/runs';
import { effectiveRestrictedCut, entropyRuleLabel, restrictedCutText, type RestrictedCut, type TruncationRule } from '@shared/vacuum';
import { describeTruncation } from '../../../lib/truncationForm';
import { diagnosticNote, engineRowText, probedCheckCount } from '../lib/engineText';
import { regionLabels } from '../lib/runForm';
import { renyiRows } from '../lib/plotData';
import { Figure } from '../../../ui/Figure';
import { stageLabels } from './RunProgress';

function Row({ label, children, note }: { label: string; children: React.ReactNode; note?: string }) {
  return (
    <tr className="border-b border-rule align-baseline">
      <th scope="row" className="py-1.5 pr-6 text-left font-normal text-ink-soft">
        {label}
        {note && <span className="block text-xs text-ink-faint">{note}</span>}
      </th>
      <td className="py-1.5 text-right">{children}</td>
    </tr>
  );
}

/**
 * With only the whole-region cut (k positive modes kept), the restricted W_c and iΔ_c have rank at most
 * 2k; once the subregion holds more elements than that, the restricted state is pure and S vanishes in
 * exact arithmetic (numpy on the diamond300 reference gives 1e-12), so what is shown is rounding.
 */
export function singleCutNote(entropy: { n: number }, wholeRegionModesKept: number, truncated: boolean, doubleTruncation: boolean): string | null {
  if (!truncated || doubleTruncation || entropy.n <= 2 * wholeRegionModesKept) return null;
  return (
    `Only the whole-region cut was applied: the restricted state lives on at most 2k = ${2 * wholeRegionModesKept} modes, ` +
    `fewer than the n = ${entropy.n} elements of the subregion, so it is pure and S is zero up to rounding. ` +
    'Double truncation (a second cut on the restricted state, √n/(4π) by default, Sorkin–Yazdi 2018) gives the area-law entropy.'
  );
}

/**
 * The restricted cut as the run page states it: the rule, and the |λ| it came to on this subregion.
 * Without double truncation only the numerical kernel (below 10⁻⁶ of the largest |λ|) is dropped.
 */
export function restrictedCutRowText(restrictedCut: RestrictedCut | null, cutoff: number | undefined): string {
  if (!restrictedCut) return 'none (only the numerical kernel of iΔ_sub is dropped)';
  const value = cutoff === undefined ? '' : ` = ${formatQuantity(cutoff, 'cut')}`;
  return restrictedCut.rule === 'sqrtN' ? `√n/(4π)${value}` : restrictedCutText(restrictedCut);
}

/** The subregion's entropy: S, its size, the restricted cut and the modes its restricted state kept. */
export function EntropyTable({
  entropy,
  doubleTruncation,
  note,
}: {
  entropy: NonNullable<RunResult['entropy']>;
  doubleTruncation: boolean;
  note?: string | null;
}) {
  const positive = entropy.generalizedEigenvalues.filter((mu) => mu > 1).length;
  // the server fills the restricted cut in for runs stored before it was a setting
  const restrictedCut = entropy.restrictedCut ?? null;
  return (
    <>
      <table className="w-full max-w-md border-collapse text-sm" aria-label="Entropy">
        <tbody>
          <Row label="Entanglement entropy S" note="Sorkin's spacetime entropy of the subregion">
            <span data-testid="entropy-S" data-value={entropy.S}>
              <EntropyFigure value={entropy.S} />
            </span>
          </Row>
          <Row label="Elements in the subregion n">
            <Figure value={entropy.n} />
          </Row>
          <Row label="Restricted cut" note="second cut of double truncation, on |λ| of iΔ_sub">
            <span data-testid="restricted-cut">{restrictedCutRowText(restrictedCut, entropy.cutoff)}</span>
          </Row>
          <Row label="Modes kept in the subregion" note={restrictedCut ? 'after the restricted cut' : undefined}>
            <Figure value={entropy.modesKept} />
          </Row>
          <Row label="Generalised eigenvalues μ > 1" note="of W_sub v = μ iΔ_sub v; each contributes to S">
            <Figure value={positive} />
          </Row>
        </tbody>
      </table>
      {note && (
        <p className="mt-3 max-w-md text-xs text-ink-soft" data-testid="single-cut-note">
          {note}
        </p>
      )}
    </>
  );
}

/** S_α of the subregion by order, ascending, with the von Neumann S at α = 1 among them. */
export function RenyiTable({ entropy }: { entropy: Pick<NonNullable<RunResult['entropy']>, 'S' | 'renyi'> }) {
  return (
    <table className="w-full max-w-md border-collapse text-sm" aria-label="Rényi entropies">
      <thead>
        <tr className="border-b border-rule text-xs text-ink-faint">
          <th scope="col" className="py-1.5 pr-6 text-left font-normal">α</th>
          <th scope="col" className="py-1.5 text-right font-normal">S_α</th>
        </tr>
      </thead>
      <tbody>
        {renyiRows(entropy).map((row) => (
          <tr key={row.key} className="border-b border-rule align-baseline" data-testid={`renyi-${row.key}`} data-value={row.value}>
            <th scope="row" className="figures py-1.5 pr-6 text-left font-normal text-ink-soft">
              {row.order === 'inf' ? '∞' : row.order}
              <span className="ml-2 font-sans text-xs text-ink-faint">{row.order === 1 ? 'von Neumann S' : row.order === 'inf' ? 'min-entropy' : ''}</span>
            </th>
            <td className="py-1.5 text-right">
              <EntropyFigure value={row.value} />
            </td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

/** The restricted cut of one part on two lines, the rule and the |λ| it came to, so three fit a phone's width. */
function PartCut({ part }: { part: EntropyPart }) {
  const rule = part.restrictedCut ? (part.restrictedCut.rule === 'sqrtN' ? '√n/(4π)' : restrictedCutText(part.restrictedCut)) : 'kernel only';
  return (
    <span className="figures inline-flex flex-col items-end text-xs leading-tight">
      <span className="text-ink-soft">{rule}</span>
      <span>{part.restrictedCut?.rule === 'lambda' ? '' : `= ${formatQuantity(part.cutoff, 'cut')}`}</span>
    </span>
  );
}

/**
 * I(A:B) with S, n, cut and modes of A, B and A∪B side by side, and why it must be read with care: on a
 * finite causal set it is a difference of three large, truncation-dependent entropies.
 */
export function MutualInformationPanel({ mutualInformation: mi }: { mutualInformation: NonNullable<RunResult['mutualInformation']> }) {
  const parts = [
    ['A', mi.a],
    ['B', mi.b],
    ['A∪B', mi.union],
  ] as const;
  const rows: [string, (p: EntropyPart) => React.ReactNode][] = [
    // narrow figures so the three columns fit a phone's width
    ['S', (p) => <EntropyFigure value={p.S} whole={5} fraction={5} />],
    ['n', (p) => <Figure value={p.n} whole={5} fraction={5} />],
    ['restricted cut', (p) => <PartCut part={p} />],
    ['modes kept', (p) => <Figure value={p.modesKept} whole={5} fraction={5} />],
  ];
  return (
    <div className="flex flex-col gap-3">
      <div className="overflow-x-auto">
        <table className="w-full max-w-xl border-collapse text-sm" aria-label="Mutual information">
          <thead>
            <tr className="border-b border-rule text-xs text-ink-faint">
              <th scope="col" className="py-1.5 pr-4 text-left font-normal" />
              {parts.map(([label]) => (
                <th key={label} scope="col" className="py-1.5 pl-2 text-right font-normal sm:pl-4">
                  {label}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {rows.map(([label, cell]) => (
              <tr key={label} className="border-b border-rule align-baseline">
                <th scope="row" className="py-1.5 pr-4 text-left font-normal text-ink-soft">
                  {label}
                </th>
                {parts.map(([part, p]) => (
                  <td key={part} className="py-1.5 pl-2 text-right sm:pl-4">
                    {cell(p)}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="flex items-baseline justify-between gap-4 border-b border-ink pb-1.5 text-sm">
        <span className="text-ink">I(A:B) = S_A + S_B − S_A∪B</span>
        <span data-testid="mutual-information-I" data-value={mi.I}>
          <Figure value={mi.I} kind="entropy" />
        </span>
      </p>
      <aside className="max-w-xl border-l-2 border-reference py-1 pl-3 text-xs text-ink-soft" data-testid="mutual-information-caution">
        <span className="font-medium text-ink">Read with care.</span> On a finite causal set I is a small difference of three
        large entropies, each with its own cut: it moves with the truncation rule and with the sprinkling, can come out negative
        where the continuum value is positive, and means something only beside other seeds, sizes and rules.
      </aside>
    </div>
  );
}

/**
 * S_O and the entropy of its causal complement O′ side by side with S_O′ − S_O, read as a purity
 * diagnostic: for a pure state of the whole region the two agree, so the difference measures how far
 * the truncated, finite state is from that — when the complement completes a Cauchy surface with O.
 */
export function ComplementTable({ entropy, complement }: { entropy: Pick<NonNullable<RunResult['entropy']>, 'S' | 'n'>; complement: NonNullable<RunResult['complement']> }) {
  return (
    <div className="flex flex-col gap-3">
      <table className="w-full max-w-md border-collapse text-sm" aria-label="Complement check">
        <thead>
          <tr className="border-b border-rule text-xs text-ink-faint">
            <th scope="col" className="py-1.5 pr-6 text-left font-normal" />
            <th scope="col" className="py-1.5 pl-4 text-right font-normal">subregion O</th>
            <th scope="col" className="py-1.5 pl-4 text-right font-normal">complement O′</th>
          </tr>
        </thead>
        <tbody>
          <tr className="border-b border-rule align-baseline">
            <th scope="row" className="py-1.5 pr-6 text-left font-normal text-ink-soft">S</th>
            <td className="py-1.5 pl-4 text-right"><EntropyFigure value={entropy.S} /></td>
            <td className="py-1.5 pl-4 text-right"><EntropyFigure value={complement.S} /></td>
          </tr>
          <tr className="border-b border-rule align-baseline">
            <th scope="row" className="py-1.5 pr-6 text-left font-normal text-ink-soft">n</th>
            <td className="py-1.5 pl-4 text-right"><Figure value={entropy.n} /></td>
            <td className="py-1.5 pl-4 text-right"><Figure value={complement.n} /></td>
          </tr>
        </tbody>
      </table>
      <p className="flex max-w-md items-baseline justify-between gap-4 border-b border-ink pb-1.5 text-sm">
        <span className="text-ink">Purity diagnostic S_O′ − S_O</span>
        <span data-testid="complement-difference" data-value={complement.difference}>
          <CheckDifference value={complement.difference} />
        </span>
      </p>
      <aside className="max-w-md border-l-2 border-reference py-1 pl-3 text-xs text-ink-soft">
        <span className="font-medium text-ink">What it tests.</span> For a pure state of the whole region the entropies of O and of its
        causal complement agree, so a small difference says the truncated state behaves as pure. Agreement is expected only then, and
        only when O and O′ together complete a Cauchy surface of the region; finite-size effects and the cut leave a difference even
        so. O′ is every element unrelated to all of O.
      </aside>
    </div>
  );
}

const diagnosticLabels: Record<string, { label: string; note: string }> = {
  hermiticity: { label: 'Hermiticity error', note: '‖W − W†‖ / ‖W‖' },
  minEigenvalueW: { label: 'Smallest eigenvalue of W', note: '≥ 0 up to rounding for a state' },
  commutatorResidual: { label: 'Commutator residual', note: '‖W − W̄ − iΔ‖ / ‖Δ‖ on the kept modes' },
  positiveNegativeOverlap: { label: 'Orthogonality error', note: '‖W W̄‖ / ‖W‖²' },
  basisOrthonormalityError: { label: 'Basis orthonormality error', note: '‖VᵀV − 1‖ of the kept modes' },
};

/** The trace of W and the sum of the kept eigenvalues must agree: one row with both and their difference. */
const traceCheckKeys = new Set(['trace', 'positiveEigenvalueSum']);

function traceCheck(trace: number, keptSum: number) {
  return formatCheckPair(trace, keptSum, 'spectral');
}

/** A formatted number whose ×10^k part is set as a superscript, as Figure sets it. */
function WithExponent({ text }: { text: string }) {
  const at = text.indexOf('×10^');
  if (at === -1) return <>{text}</>;
  return (
    <>
      {text.slice(0, at)}×10<sup>{text.slice(at + 4)}</sup>
    </>
  );
}

/** The engine's own names for the checks above, sent alongside; shown once under the labels above. */
const engineAliases = new Set(['hermiticityError', 'smallestEigenvalue', 'commutatorError', 'orthogonalityError', 'probeCount']);


/** The SJ state's checks, then the counts of the causal set. */
export function DiagnosticsTable({ result }: { result: RunResult }) {
  const known = Object.keys(diagnosticLabels).filter((k) => typeof result.diagnostics[k] === 'number');
  const extra = Object.entries(result.diagnostics).filter(
    ([k, v]) => !(k in diagnosticLabels) && !engineAliases.has(k) && !traceCheckKeys.has(k) && typeof v === 'number',
  ) as [string, number][];
  const method = result.diagnostics.smallestEigenvalueMethod;
  const trace = result.diagnostics.trace;
  const keptSum = result.diagnostics.positiveEigenvalueSum;
  const probes = probedCheckCount(result.diagnostics);
  return (
    <table className="w-full max-w-md border-collapse text-sm" aria-label="Diagnostics">
      <tbody>
        <Row label="Elements N">
          <Figure value={result.N} />
        </Row>
        <Row label="Relations">
          <Figure value={result.relations} whole={9} />
        </Row>
        {result.links !== null && (
          <Row label="Links">
            <Figure value={result.links} whole={9} />
          </Row>
        )}
        {result.density !== null && (
          <Row label="Density ρ">
            <Figure value={result.density} kind="measure" />
          </Row>
        )}
        <Row label="Cut λc">
          <span data-testid="cut-lambda" data-value={result.cutoff}>
            <Figure value={result.cutoff} kind="cut" />
          </span>
        </Row>
        <Row label="Modes kept" note={`of ${result.eigenvalues.length} positive eigenvalues`}>
          <Figure value={result.modesKept} />
        </Row>
        {known.map((key) => (
          <Row
            key={key}
            label={diagnosticLabels[key].label}
            note={diagnosticNote(key, diagnosticLabels[key].note, method, probes)}
          >
            <Figure value={result.diagnostics[key] as number} kind="residual" />
          </Row>
        ))}
        {typeof trace === 'number' && typeof keptSum === 'number' && (
          <Row label="Trace of W" note="must equal the sum of the kept eigenvalues; the difference is the check">
            <span className="figures inline-flex flex-col items-end text-xs leading-tight" data-testid="trace-check" data-difference={trace - keptSum}>
              <span className="text-sm">{traceCheck(trace, keptSum).first}</span>
              <span className="text-ink-soft">sum of kept eigenvalues {traceCheck(trace, keptSum).second}</span>
              <span>difference <WithExponent text={traceCheck(trace, keptSum).difference} /></span>
            </span>
          </Row>
        )}
        {extra.map(([key, value]) => (
          <Row key={key} label={key}>
            <Figure value={value} kind="residual" />
          </Row>
        ))}
      </tbody>
    </table>
  );
}

interface StoredRequest {
  title?: string;
  mass?: number;
  truncation?: Parameters<typeof describeTruncation>[0];
  doubleTruncation?: boolean;
  restrictedCut?: RestrictedCut;
  subregion?: { kind: string; past?: Record<string, number>; future?: Record<string, number>; indices?: number[] } | null;
  renyi?: (number | 'inf')[];
  complement?: boolean;
  mutualInformation?: { a: NonNullable<StoredRequest['subregion']>; b: NonNullable<StoredRequest['subregion']> };
  sprinkling?: {
    region: Record<string, unknown> & { kind: string };
    process: string;
    count?: number;
    density?: number;
    seed: string;
    prng: string;
  };
}

function tipText(tip: Record<string, number> | undefined): string {
  if (!tip) return '—';
  return `(${['t', 'x', 'y', 'z'].filter((c) => c in tip).map((c) => tip[c]).join(', ')})`;
}

/** A stored region in words with its sizes; a kind this client does not know is shown by its name. */
function regionText(region: Record<string, unknown> & { kind: string }): string {
  const parsed = regionSpecSchema.safeParse(region);
  return parsed.success ? regionSettingsText(parsed.data) : (regionLabels[region.kind] ?? region.kind);
}

/** The settings the run was made from, so it can be read and reproduced. */
export function SettingsTable({ run }: { run: RunDetail }) {
  const request = (run.request ?? {}) as StoredRequest;
  const s = request.sprinkling;
  const rows: [string, string][] = [];
  if (s) {
    rows.push(['Region', regionText(s.region)]);
    rows.push(['Sprinkling', `${s.process === 'fixed' ? 'fixed N' : 'Poisson'}, ${s.count !== undefined ? `N = ${s.count}` : `ρ = ${s.density}`}`]);
    rows.push(['Seed', `${s.seed} (${s.prng})`]);
  }
  if (run.parentRunId) rows.push(['Points', `reused from run ${run.parentRunId.slice(0, 8)}`]);
  rows.push(['Mass', String(request.mass ?? 0)]);
  if (request.truncation) rows.push(['Truncation', describeTruncation(request.truncation)]);
  if (request.subregion) {
    rows.push([
      'Subregion',
      request.subregion.kind === 'diamond'
        ? `diamond from ${tipText(request.subregion.past)} to ${tipText(request.subregion.future)}`
        : `${request.subregion.indices?.length ?? 0} listed elements`,
    ]);
    rows.push(['Double truncation', request.doubleTruncation ? 'yes' : 'no']);
    const settings = { truncation: (request.truncation ?? { rule: 'none' }) as TruncationRule, doubleTruncation: request.doubleTruncation, restrictedCut: request.restrictedCut };
    const restricted = effectiveRestrictedCut(settings);
    rows.push(['Restricted cut', restricted ? restrictedCutText(restricted) : 'none']);
    if (request.truncation) rows.push(['Entropy rule', entropyRuleLabel(settings)]);
    if (request.renyi?.length) rows.push(['Rényi orders', request.renyi.map((o) => (o === 'inf' ? '∞' : String(o))).join(', ')]);
    if (request.complement) rows.push(['Complement check', 'yes']);
  }
  if (request.mutualInformation) {
    const side = (spec: NonNullable<StoredRequest['subregion']>) =>
      spec.kind === 'diamond' ? `diamond from ${tipText(spec.past)} to ${tipText(spec.future)}` : `${spec.indices?.length ?? 0} listed elements`;
    rows.push(['Pair A', side(request.mutualInformation.a)]);
    rows.push(['Pair B', side(request.mutualInformation.b)]);
    if (!request.subregion) rows.push(['Double truncation', request.doubleTruncation ? 'yes' : 'no']);
  }
  if (run.result) {
    rows.push(['Engine', engineRowText(run.result)]);
    const order = Object.keys(stageLabels);
    const timings = Object.entries(run.result.timings)
      .sort(([a], [b]) => order.indexOf(a) - order.indexOf(b))
      .map(([stage, seconds]) => `${stageLabels[stage as keyof typeof stageLabels] ?? stage} ${seconds.toFixed(2)} s`)
      .join(' · ');
    if (timings) rows.push(['Timings', timings]);
  }
  return (
    <table className="w-full border-collapse text-sm" aria-label="Settings">
      <tbody>
        {rows.map(([label, value]) => (
          <tr key={label} className="border-b border-rule align-baseline">
            <th scope="row" className="w-44 py-1.5 pr-6 text-left font-normal text-ink-soft">
              {label}
            </th>
            <td className="figures py-1.5 text-ink">{value}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

/** An entropy by the precision rule: a pure state's rounding reads as zero below the floor, not as digits of noise. */
function EntropyFigure({ value, whole, fraction }: { value: number; whole?: number; fraction?: number }) {
  if (belowEntropyFloor(value)) return <span className="figures text-xs" data-testid="entropy-floor">{formatEntropy(value)}</span>;
  return <Figure value={value} kind="entropy" whole={whole} fraction={fraction} />;
}

/**
 * A difference of two entropies that should agree: two significant digits (its size is what it says),
 * or the floor text when it is below the numerical floor of S itself.
 */
function CheckDifference({ value }: { value: number }) {
  if (belowEntropyFloor(value)) return <span className="figures text-xs">{formatEntropy(value)}</span>;
  return <span className="figures"><WithExponent text={formatSignificantDigits(value, 2)} /></span>;
}
