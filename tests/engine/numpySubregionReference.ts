import { runPython } from '../support/python';

/**
 * An independent numpy reference for the entropies of several element sets on one massless 2D state
 * (server/engine/README.md §9–§10, §15), sharing only the point coordinates and the element lists with
 * the engine. It builds C from t_j − t_i > |x_j − x_i| (§1), K = ½Cᵀ (Johnston 2008, CQG 25 202001),
 * iΔ = i(K − Kᵀ) and its complex Hermitian spectrum by numpy.linalg.eigh (not the engine's real route
 * through ΔᵀΔ), W as the positive spectral part of iΔ cut at `stateCut` (Sorkin 2011; Johnston 2009),
 * then for each set O: W_O v = μ iΔ_O v on the modes of iΔ_O with |λ| above √n/(4π) (double truncation,
 * Sorkin–Yazdi 2018, CQG 35 074004, with n the set's own element count) or above 1e-6 of the largest
 * (the numerical kernel), and S = Σ μ ln|μ| (Sorkin 2012, arXiv:1205.2953).
 *
 * Rényi entropies are not taken from a closed formula in μ: each pair μ, 1 − μ is a thermal bosonic mode
 * with occupation probabilities p_k = (1/μ)((μ − 1)/μ)^k (a fact of the trade for Gaussian states), and
 * numpy sums ln Σ_k p_k^α / (1 − α) over that Fock ladder, S_∞ = −ln max_k p_k.
 *
 * With `complementOf`, numpy also lists the causal complement of that set — the elements outside it with
 * no C entry to or from any of its elements (§15) — and its entropy by the same rule.
 */
const fockRenyi = String.raw`
def renyi(mu, alpha):
    # S_α of the thermal modes of the pairs (μ, 1 − μ), μ > 1: ln Σ_k p_k^α / (1 − α), p_k = (1/μ) q^k
    total = 0.0
    for m in mu[mu > 1 + 1e-12]:
        q = (m - 1) / m
        if alpha == 'inf':
            total += np.log(m)  # -ln p_0, the largest p_k
            continue
        kmax = int(np.ceil(60 / (min(alpha, 1) * -np.log(q)))) + 10  # p_k^α falls like q^(αk)
        pk = (1 / m) * q ** np.arange(kmax)
        total += np.log(np.sum(pk ** alpha)) / (1 - alpha)
    return float(total)
`;

const script = String.raw`
import json, sys
import numpy as np
${fockRenyi}

d = json.load(sys.stdin)
p = np.array(d['points'], dtype=float).reshape(-1, 2)
t, x = p[:, 0], p[:, 1]
C = (t[None, :] - t[:, None]) > np.abs(x[None, :] - x[:, None])
K = 0.5 * C.T.astype(float)
H = 1j * (K - K.T)
lam, V = np.linalg.eigh(H)
cut = d['stateCut']
keep = lam > cut
W = (V[:, keep] * lam[keep]) @ V[:, keep].conj().T
both = np.abs(lam) > cut
Hc = (V[:, both] * lam[both]) @ V[:, both].conj().T if cut > 0 else H

def entropy(O):
    O = np.array(O, dtype=int)
    n = len(O)
    WO = W[np.ix_(O, O)]
    HO = Hc[np.ix_(O, O)]
    l, U = np.linalg.eigh(HO)
    rc = np.sqrt(n) / (4 * np.pi) if d['double'] else 1e-6 * np.max(np.abs(l))
    k = np.abs(l) > rc
    Uk = U[:, k]
    mu = np.linalg.eigvals((Uk.conj().T @ WO @ Uk) / l[k][:, None])
    imag = float(np.abs(mu.imag).max()) if len(mu) else 0.0
    mu = np.sort(mu.real)[::-1]
    nz = np.abs(mu) > 1e-300
    return {'n': n, 'kept': int(k.sum()), 'S': float(np.sum(mu[nz] * np.log(np.abs(mu[nz])))), 'mu': mu.tolist(), 'maxImagMu': imag,
            'renyi': {str(a): renyi(mu, a) for a in d['orders']}}

out = {'sets': [entropy(O) for O in d['sets']]}
if d['complementOf'] is not None:
    O = np.array(d['complementOf'], dtype=int)
    related = C[O, :].any(axis=0) | C[:, O].any(axis=1)
    related[O] = True
    complement = np.where(~related)[0]
    out['complement'] = complement.tolist()
    out['complementEntropy'] = entropy(complement)
print(json.dumps(out))
`;

export interface NumpySetEntropy {
  n: number;
  /** modes of iΔ_O kept (both signs) */
  kept: number;
  S: number;
  /** descending */
  mu: number[];
  maxImagMu: number;
  /** S_α by the order's key ("0.5", "2", "inf") */
  renyi: Record<string, number>;
}

export function numpySubregionEntropies(input: {
  points: ArrayLike<number>;
  /** λ of the whole-region cut (0: untruncated) */
  stateCut: number;
  double: boolean;
  sets: ArrayLike<number>[];
  orders?: (number | 'inf')[];
  complementOf?: ArrayLike<number>;
}): { sets: NumpySetEntropy[]; complement?: number[]; complementEntropy?: NumpySetEntropy } {
  return runPython(script, {
    points: Array.from(input.points),
    stateCut: input.stateCut,
    double: input.double,
    sets: input.sets.map((s) => Array.from(s)),
    orders: input.orders ?? [],
    complementOf: input.complementOf ? Array.from(input.complementOf) : null,
  });
}

/** numpy's Fock-ladder S_α (see above) of single modes: out[i][j] for alphas[i] and upper[j] (each μ > 1). */
export function numpyModeRenyi(upper: number[], alphas: (number | 'inf')[]): number[][] {
  return runPython(
    String.raw`
import json, sys
import numpy as np
${fockRenyi}
d = json.load(sys.stdin)
print(json.dumps([[renyi(np.array([m]), a) for m in d['upper']] for a in d['alphas']]))
`,
    { upper, alphas },
  );
}
