import { pairDecaySentence, studyRenyiKeys, studyRuleKey } from '@shared/studies';
import { effectiveRestrictedCut, restrictedCutText, type RegionSpec } from '@shared/vacuum';
import { regionText, studyCautions, type StudyExportInput } from './common';
import { references } from './references';

const cite = (...keys: string[]) => `(${keys.map((k) => `${references[k]!.short} [${k}]`).join('; ')})`;

function regionPlain(region: RegionSpec): string {
  return regionText(region).replace(/\$/g, '').replace(/\\in/g, '∈').replace(/\\/g, '');
}

/**
 * A methods paragraph for a paper: what was computed, how, with which parameters, citing the
 * published methods (keys as in bibtex()), with the cautions a reader needs.
 */
export function methodsParagraph(input: StudyExportInput): string {
  const { request } = input;
  const subregions = request.subregions;
  const sizes =
    subregions.kind === 'concentric'
      ? `concentric sub-diamonds with ℓ/T ∈ {${subregions.fractions.join(', ')}}`
      : subregions.kind === 'pairs'
        ? `pairs A, B of equal sub-diamonds of proper time ℓ, ℓ/T ∈ {${subregions.sizes.join(', ')}}, on the central slice of the region, symmetric about its centre with a gap d between their facing corners, d/T ∈ {${subregions.separations.join(', ')}}, and their union A∪B`
      : subregions.kind === 'tips'
        ? `${input.subregions.length} sub-diamond(s) given by their tips`
        : `${input.subregions.length} subregion(s) given as lists of elements`;
  const ensemble = request.source === 'sprinkled' ? request.seeds.length : input.causalSets.length;
  const unit = request.source === 'sprinkled' ? 'sprinkling' : 'causal set';
  const ruleTexts = request.rules.map((r) => {
    if (r.truncation.rule === 'none' && !r.doubleTruncation) return 'without truncation (only the numerical kernel of the restricted Pauli–Jordan operator, below 10⁻⁶ of its largest eigenvalue, is dropped)';
    const restricted = effectiveRestrictedCut(r);
    const second = restricted
      ? `the restricted operator again at ${restricted.rule === 'sqrtN' ? 'λ = √n/(4π), n the number of elements in the subregion' : `the fixed ${restrictedCutText(restricted)}`} (double truncation, ${references.sorkin2018!.short})`
      : '';
    if (r.truncation.rule === 'none') return `without truncating the SJ state of the whole region but cutting ${second} (restricted cut only)`;
    const whole = r.truncation.rule === 'sqrtN' ? `truncating the SJ state of the whole region at λ_c = √N/(4π) ${cite('sorkin2018')}` : `truncating the SJ state of the whole region with the rule ${studyRuleKey({ truncation: r.truncation })}`;
    return restricted ? `${whole} and ${second}` : whole;
  });
  const versions = [...new Set(input.cells.map((c) => c.engineVersion).filter((v): v is string => v !== null))];
  const backends = [...new Set(input.cells.map((c) => c.backend).filter((v): v is string => v !== null))];
  const mass = request.mass > 0 ? `a free scalar field of mass m = ${request.mass}, with the massive retarded Green function K_m = K(I + (m²/ρ)K)⁻¹` : 'a massless free scalar field';
  const sets = input.causalSets;
  const setCounts = [...new Set(sets.map((c) => c.N))].sort((a, b) => a - b);
  const origin =
    request.source === 'sprinkled'
      ? `We sprinkled ${request.process === 'fixed' ? 'exactly N points (the fixed-N variant of the Poisson process)' : 'points by a Poisson process of expected number N'} ${cite('bombelli1987')} into ${regionPlain(request.region)}, for N ∈ {${[...request.counts].sort((a, b) => a - b).join(', ')}} and ${request.seeds.length} independent seed${request.seeds.length === 1 ? '' : 's'} per N (pseudo-random generator seedrandom ${request.prng}; every seed is listed in the JSON export, so each sprinkling can be reproduced exactly).`
      : `We used ${sets.length} causal set${sets.length === 1 ? '' : 's'} generated outside Tacet and imported as ${[...new Set(sets.map((c) => (c.kind === 'coordinates' ? 'coordinate files' : 'relation lists')))].join(' and ')}, with N ∈ {${setCounts.join(', ')}} (${sets
          .map((c) => `${c.name}: ${c.fileName}, N = ${c.N}${c.region ? `, in ${regionPlain(c.region)}` : c.density !== null ? `, ρ = ${c.density}` : ''}`)
          .join('; ')}); the JSON export lists the SHA-256 checksum of every file, so each input can be checked.`;
  const text = [
    origin,
    `On each causal set we built the retarded Green function of ${mass} ${cite('johnston2008', 'johnston2009')}, the Pauli–Jordan operator iΔ = i(K − Kᵀ), and the Sorkin–Johnston state as the positive spectral part of iΔ ${cite('sorkin2011', 'afshordi2012')}, from one real symmetric eigendecomposition of ΔᵀΔ.`,
    `For ${sizes} we computed Sorkin's spacetime entanglement entropy S = Σ μ ln|μ| from the generalised eigenvalue problem W_O v = μ iΔ_O v restricted to the subregion ${cite('sorkin2012', 'saravani2014')}, ${ruleTexts.join('; and ')}.`,
    `For each N, subregion and rule we report the mean over ${request.source === 'sprinkled' ? 'seeds' : 'the causal sets of that N'} of S and of the number n of elements in the subregion, with the standard error of the mean, and fit by weighted least squares (weights 1/σ² from the standard errors) S = b ln √n + c and S = a n + c′. In the continuum a free boson gives b = 1/3 ${cite('calabrese2004')}; on causal sets this is recovered only after double truncation, while the untruncated entropy follows a spacetime volume law ${cite('saravani2014', 'sorkin2018')}.`,
    ...renyiSentences(input),
    ...pairSentences(input),
    ...studyCautions(input).map((c) => `Caution: ${c}`),
    `Cautions: these are finite causal sets, so finite-size and finite-density effects bias the fitted coefficients, most at small n; the truncation rule is a modelling choice that changes the numbers, and a different cut gives a different b; and the quoted values are ensemble means over ${ensemble} ${unit}${ensemble === 1 ? '' : 's'} in all, whose single realisations scatter by a few tenths.`,
    `Computed with ${versions.join(', ') || 'the Tacet engine'} (linear algebra: ${backends.join(', ') || 'not recorded'}); study ${input.id}.`,
  ];
  return text.join(' ') + '\n';
}

/** What the Rényi entropies are and which orders were computed (none without orders). */
function renyiSentences(input: StudyExportInput): string[] {
  const keys = studyRenyiKeys(input.request);
  if (keys.length === 0) return [];
  const orders = keys.map((k) => (k === 'inf' ? '∞' : k)).join(', ');
  return [
    `From the same generalised eigenvalues, taken in pairs μ, 1 − μ with μ ≥ 1, we computed the Rényi entropies S_α = Σ_{μ>1} ln(μ^α − (μ−1)^α)/(α − 1) of the bosonic Gaussian state for α ∈ {${orders}} (S_∞ = Σ_{μ>1} ln μ, the min-entropy; α → 1 gives S), reported with mean and standard error like S and fitted against ln √n the same way${input.subregions.some((s) => s.pair) ? ', and the Rényi mutual information I_α = S_α(A) + S_α(B) − S_α(A∪B)' : ''}.`,
  ];
}

/** The mutual-information definition, its truncation rule and the measured decay beside the continuum trend. */
function pairSentences(input: StudyExportInput): string[] {
  if (!input.subregions.some((s) => s.pair)) return [];
  const fits = input.fits.filter((f) => f.model === 'loglog');
  const measured = fits.length
    ? `Fitting ln⟨I⟩ = p ln(d/T) + q by weighted least squares (σ = SE/⟨I⟩) over the separations with ⟨I⟩ > 0, per rule, ℓ/T and N, we measured: ${fits.map((f) => `${f.rule} at N = ${f.N}, ℓ/T = ${f.size}: ${pairDecaySentence(f)}`).join('; ')}.`
    : `No rule, ℓ/T and N had the three separations with ⟨I⟩ > 0 a log-log fit of I against d needs, so no decay exponent is reported.`;
  return [
    `For each pair we report the mutual information I(A:B) = S_A + S_B − S_{A∪B} on the same state, after checking in the causal order that A and B share no element and no element of A is related to one of B; with double truncation each of A, B and A∪B is cut at its own restricted cut (√n/(4π) with n its own element count), so I depends on that choice of truncation.`,
    measured,
    `The continuum trend we compare with is the two-interval result of a c = 1 vacuum, I = (1/3) ln[(ℓ+d)²/(d(2ℓ+d))] ${cite('calabrese2004', 'casini2009')}, exact for a free Dirac fermion and only a trend for the boson, with each sub-diamond standing for its base interval of length ℓ; its log-log slope over the same d/T values is quoted beside each measured one, as a comparison of shapes, not of values. I is a difference of large numbers, so its relative error far exceeds that of S, and at small N the sub-diamonds hold few elements.`,
  ];
}
