import { MAX_RENYI_ORDERS } from '@shared/vacuum';
import { regionDescriptors, regionKinds } from '@shared/regions';

/** The commands of `tacet`, in the order the overview lists them. */
export const commandNames = ['sprinkle', 'vacuum', 'entropy', 'mutual-information', 'inspect', 'submit', 'fetch', 'reproduce'] as const;
export type CommandName = (typeof commandNames)[number];

const TITLE = 'tacet — quantum-field vacua and entanglement entropy on causal sets';

const USAGE: Record<CommandName, string> = {
  sprinkle: `tacet sprinkle --region ${regionKinds.join('|')} --n N [--poisson] --seed S
                 [region size options] [--prng arc4|alea|xor4096] [--out points.csv]`,
  vacuum: `tacet vacuum   --points points.csv [--mass M] [--density RHO | --region R [size options]]
                 [--truncation none|sqrtN|lambda:X|modes:K|knee[:TOL]] [--engine E] [--backend B] [--json]`,
  entropy: `tacet entropy  --points points.csv --subregion diamond:T0,X0:T1,X1 | elements:I,J,...
                 [--truncation RULE] [--double] [--restricted-cut sqrtN|lambda:X|none]
                 [--renyi A1,A2,...] [--complement]
                 [--mass M] [--density RHO | --region R ...] [--engine E] [--backend B] [--json]`,
  'mutual-information': `tacet mutual-information --points points.csv --a SPEC --b SPEC
                 [--truncation RULE] [--double] [--restricted-cut sqrtN|lambda:X|none]
                 [--mass M] [--density RHO | --region R ...] [--engine E] [--backend B] [--json]`,
  inspect: `tacet inspect  --points points.csv [--region R [size options]] | --relations pairs.csv --count N
                 [--max-gap K] [--json]`,
  submit: `tacet submit   SPEC.json          (with TACET_URL and TACET_TOKEN)`,
  fetch: `tacet fetch    ID [--wait] [--out DIR]   (with TACET_URL and TACET_TOKEN)`,
  reproduce: `tacet reproduce BUNDLE.zip [--json]`,
};

/** One paragraph of option notes; each command's help shows the ones it accepts. */
const NOTES = {
  regionSizes: `region size options (defaults in brackets):
${regionKinds.map((kind) => `  ${kind.padEnd(Math.max(...regionKinds.map((k) => k.length)) + 2)}${regionDescriptors[kind].cli.usage}`).join('\n')}`,
  sprinkling: `--n N: that many points (fixed N); --poisson: N ~ Poisson(ρV) with mean --n (or with --density RHO
  instead of --n). --seed S makes the sprinkling reproducible; --prng picks the seeded generator [arc4].
--out FILE writes the CSV there and the summary as JSON on stdout; without it the CSV goes to stdout
  and the summary to stderr.`,
  points: `points files are CSV with a header t,x (2D) or t,x,y,z (4D). A massive field or a 4D Green function
needs the density: --density, or --region with its size so the volume is known (ρ = N/V).`,
  truncation: `--truncation: the whole-region cut of the SJ state: none, sqrtN (λ > √N/(4π)), lambda:X, modes:K (the K
  largest) or knee[:TOL] (the knee of the spectrum). Truncation is a modelling choice, not a convergence knob.`,
  entropyRule: `--double: double truncation (Sorkin–Yazdi); the whole-region rule defaults to sqrtN.
--restricted-cut: the second cut of double truncation, on |λ| of the restricted iΔ: sqrtN [default]
  is √n/(4π) with n the subregion's elements, lambda:X a fixed cut; sqrtN or lambda:X imply --double,
  none means no second cut. With --truncation none it is the restricted cut only.`,
  subregion: `--subregion: diamond:T0,X0:T1,X1 (past and future tip; T,X,Y,Z per tip in 4D) or elements:I,J,...
  (0-based labels, the rows of the points file).`,
  renyi: `--renyi A1,A2,...: also the Rényi entropies S_α of the subregion from the same generalised eigenvalues
  (α > 0, α ≠ 1; inf is the min-entropy S_∞), at most ${MAX_RENYI_ORDERS} different orders; JSON "renyi": {"α": S_α}.`,
  complement: `--complement: also the entropy of the causal complement O′ (the elements unrelated to every element
  of the subregion) and S_O′ − S_O. For a pure state the two agree in the continuum; on a finite, truncated
  causal set the difference is a check, not zero.`,
  pair: `--a SPEC, --b SPEC: the two subregions, in the form of --subregion (both diamond:... or both elements:...),
  disjoint and spacelike to each other. I(A:B) = S_A + S_B − S_AB on one state; with double truncation
  A, B and A∪B each get their own restricted cut (√n/(4π) with their own n). Finite-size and truncation
  effects are as large in I as in each S.`,
  engine: `--backend auto|native|ml-matrix selects the dense linear algebra.
--engine auto|dense|structured: dense diagonalises N×N matrices (N ≤ 6000 native, 3000 ml-matrix);
  structured (2D, non-periodic, truncation sqrtN, lambda:X or modes:K) computes only the modes above
  the cut and accepts N up to 100000; auto [default] takes structured from N = 1000 when it can.`,
  inspect: `inspect: the order's counts and manifold-likeness — relations, links, longest chain, ordering
  fraction, interval abundances N_k (pairs with k elements between, k ≤ --max-gap [10]), the Myrheim–Meyer
  dimension with its error (from sampled sub-intervals) and the midpoint-scaling dimension. Points in any
  dimension: a header t,x / t,x,y / t,x,y,z (more space columns allowed); --region only for a periodic x
  (cylinder2d) and the expected count ρV. --relations: rows i,j meaning i ≺ j (labels 0 … N−1), closed
  transitively. Both estimators assume the set is a causal diamond of flat spacetime.`,
  remote: `submit and fetch talk to a Tacet service: TACET_URL is its address (http://127.0.0.1:4310 for npm start),
  TACET_TOKEN a personal API token (Account page → API tokens, tct_…), which acts in its own team.
  submit SPEC.json: the JSON body of POST /api/runs (a run) or POST /api/studies (a study: it has counts,
  seeds, rules or subregions), checked with the API's schemas before it is sent; prints {kind, id, url}.
  fetch ID: the run's or study's detail as JSON; --wait polls until it has ended (progress on stderr);
  --out DIR also writes the detail and every export of a done run or study into DIR.`,
  reproduce: `reproduce BUNDLE.zip: a supplementary bundle (Study or Runs page → Supplementary bundle). Every file is
  checked against its SHA-256 in manifest.json (an altered, missing or unlisted file is named and the bundle
  refused), then every entropy of the manifest is computed again from the bundle's own points with this engine
  and compared: agreement within 1e-6 relative plus 1e-6 absolute (the numerical floor of a pure state).
  Prints { checked, maxRelDiff, ok, mismatches } with --json, one line otherwise; progress on stderr.
  Exit code 0 only when every value agrees.`,
  json: `--json prints one JSON document on stdout instead of text.`,
  exit: `exit codes: 0 success, 2 bad input, 1 failure.`,
} as const;
type Note = keyof typeof NOTES;

const computeNotes: Note[] = ['points', 'regionSizes', 'truncation', 'engine', 'json'];
const COMMAND_NOTES: Record<CommandName, Note[]> = {
  sprinkle: ['sprinkling', 'regionSizes'],
  vacuum: computeNotes,
  entropy: ['subregion', ...computeNotes.slice(0, 3), 'entropyRule', 'renyi', 'complement', ...computeNotes.slice(3)],
  'mutual-information': ['pair', ...computeNotes.slice(0, 3), 'entropyRule', ...computeNotes.slice(3)],
  inspect: ['inspect', 'regionSizes', 'json'],
  submit: ['remote'],
  fetch: ['remote'],
  reproduce: ['reproduce', 'json'],
};

/** `tacet --help`: every command's usage and every note. */
export const OVERVIEW_HELP = `${TITLE}

usage:
${commandNames.map((name) => `  ${USAGE[name]}`).join('\n')}

${Object.values(NOTES).join('\n')}
\`tacet COMMAND --help\` shows one command's options.
`;

/** `tacet COMMAND --help`: that command's usage and the notes on its options only. */
export function commandHelp(name: CommandName): string {
  return `${TITLE}

usage:
  ${USAGE[name]}

${[...COMMAND_NOTES[name], 'exit' as const].map((note) => NOTES[note]).join('\n')}
`;
}
