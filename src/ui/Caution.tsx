/**
 * Cautions that belong to this result's settings (a 2D cut on a 4D region, for instance): shown beside
 * the result, worded by the server (shared/vacuum.ts ruleCautions) so page, API and exports agree.
 */
export function RuleCautions({ cautions }: { cautions: string[] }) {
  if (cautions.length === 0) return null;
  return (
    <aside className="border-l-2 border-danger py-1 pl-3 text-sm text-ink-soft" data-testid="rule-cautions">
      {cautions.map((c) => (
        <p key={c}>
          <span className="font-medium text-ink">Caution.</span> {c}
        </p>
      ))}
    </aside>
  );
}

/** Said wherever results are shown: the numbers depend on choices as much as on the physics. */
export function Caution() {
  return (
    <aside className="border-l-2 border-reference py-1 pl-3 text-sm text-ink-soft" data-testid="caution">
      <span className="font-medium text-ink">Read with care.</span> Finite-size effects shape these numbers: a single
      sprinkling of a few hundred or thousand elements is far from the continuum, and another seed gives other values. The
      truncation rule is a modelling choice, not a measurement — the kept modes, the entropy and its scaling all move with it.
      Compare rules and sizes before drawing conclusions.
    </aside>
  );
}
