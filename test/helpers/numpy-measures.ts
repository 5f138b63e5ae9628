/**
 * An independent numpy computation of the activity measures Lacuna reports, written from the
 * README's definitions (section "Measures" and what each estimate summarises), not from the code:
 *
 *   activity ratio a = (Σr/n)² / (Σr²/n) (Treves & Rolls 1991); sparseness S = (1 − a)/(1 − 1/n)
 *   (Vinje & Gallant 2000); Hoyer (2004) (√n − ‖r‖₁/‖r‖₂)/(√n − 1); Gini (Hurley & Rickard 2009)
 *   1 − 2 Σₖ (c₍ₖ₎/‖c‖₁)(n − k + ½)/n over |r| sorted ascending; excess kurtosis g₂ = m₄/m₂² − 3
 *   with biased moments (Joanes & Gill 1998; scipy.stats.kurtosis(fisher=True, bias=True));
 *   density = fraction of elements with |x| above the zero tolerance.
 *   population_sparseness: mean over defined bins of S across units; lifetime_sparseness, hoyer,
 *   gini, activity_ratio: mean over defined units across bins; kurtosis: median over units with
 *   at least `min_nonzero` nonzero bins and nonzero variance.
 *
 * `MEASURES_PY` defines `measures(X, min_nonzero, tol)` for a units × bins float64 array; a test
 * appends the code that builds X from files (so numpy reads the data itself) and prints
 * `json.dumps(measures(X, …))`.
 */
export const MEASURES_PY = String.raw`
import numpy as np
from scipy import stats

def _s(X, axis):
    n = X.shape[axis]
    s1 = X.sum(axis=axis)
    s2 = (X * X).sum(axis=axis)
    with np.errstate(divide='ignore', invalid='ignore'):
        a = (s1 / n) ** 2 / (s2 / n)
        s = (1 - a) / (1 - 1 / n)
    return s, a

def _mean_defined(v):
    v = v[np.isfinite(v)]
    return float(v.mean()) if v.size else None

def measures(X, min_nonzero=10, tol=0.0):
    X = np.asarray(X, dtype=np.float64)
    U, B = X.shape
    pop, _ = _s(X, 0)
    life, ar = _s(X, 1)
    A = np.abs(X)
    l1 = A.sum(axis=1)
    l2 = np.sqrt((X * X).sum(axis=1))
    with np.errstate(divide='ignore', invalid='ignore'):
        hoyer = (np.sqrt(B) - l1 / l2) / (np.sqrt(B) - 1)
    C = np.sort(A, axis=1)
    k = np.arange(1, B + 1)
    with np.errstate(divide='ignore', invalid='ignore'):
        gini = 1 - 2 * ((C / l1[:, None]) * ((B - k + 0.5) / B)).sum(axis=1)
    nonzero = (A > tol).sum(axis=1)
    g2 = stats.kurtosis(X, axis=1, fisher=True, bias=True)
    var = X.var(axis=1)
    g2 = np.where((nonzero >= min_nonzero) & (var > 0), g2, np.nan)
    g2 = g2[np.isfinite(g2)]
    return {
        'units': U, 'bins': B,
        'population_sparseness': _mean_defined(pop),
        'lifetime_sparseness': _mean_defined(life),
        'activity_ratio': _mean_defined(ar),
        'hoyer': _mean_defined(hoyer),
        'gini': _mean_defined(gini),
        'kurtosis': float(np.median(g2)) if g2.size else None,
        'density': float((A > tol).sum() / A.size),
    }
`;

/** The measures compared, by their names in a DatasetResult. */
export const COMPARED_MEASURES = ['population_sparseness', 'lifetime_sparseness', 'activity_ratio', 'hoyer', 'gini', 'kurtosis', 'density'] as const;
