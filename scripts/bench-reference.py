#!/usr/bin/env python3
"""The numpy reference for the benchmark (scripts/bench.ts): what a careful lab member would
write to get the same numbers from a units x bins activity matrix stored as .npy.

    python3 scripts/bench-reference.py FILE.npy --block-length L [--resamples 1000]
            [--level 0.95] [--seed 1] [--chunk-units 100] [--min-nonzero 10]

1. np.load(mmap_mode='r'); units are taken in chunks of --chunk-units rows, each chunk converted
   to float64 (every accumulator is float64).
2. Per chunk:
   - density: number of elements > 0 (the bench data are counts, so |x| > 0 is the same);
   - per bin, across units: sum r and sum r^2 (added chunk by chunk), for the population
     sparseness of each bin;
   - per unit, across bins: lifetime sparseness S = (1 - a) / (1 - 1/n) with the activity ratio
     a = (sum r / n)^2 / (sum r^2 / n) (Treves & Rolls 1991; Vinje & Gallant 2000), NaN for an
     all-zero unit;
   - per unit: excess kurtosis g2 = m4/m2^2 - 3 by the moment formula, about the unit's mean
     (biased moments, Joanes & Gill 1998; the same number as scipy.stats.kurtosis with
     fisher=True, bias=True, which is about 3x slower here), NaN for a constant unit or one with
     fewer than --min-nonzero nonzero bins (the same rule as the manifest's min_nonzero).
   Written the way a careful person would: no Python loops over elements, einsum for sums of
   squares (no squared temporary), one centred temporary per chunk, squared in place.
3. Population sparseness of each bin from the per-bin sums (NaN for an all-zero bin); its mean
   over defined bins.
4. Percentile interval of that mean by the moving-block bootstrap (Kuensch 1989, Ann. Statist.
   17:1217-1241): undefined bins dropped, k = ceil(n/L) blocks of L consecutive bins with starts
   uniform over the n - L + 1 overlapping blocks, laid end to end, the last block truncated so a
   resample has exactly n bins. Vectorised: one prefix-sum array, a (B, k) array of random starts,
   block sums as prefix differences. The block length L is given on the command line (the bench
   passes ceil(n^(1/3)), the order of the optimal block length for variance-type quantities,
   Hall, Horowitz & Jing 1995, Biometrika 82:561-574). Limits: np.quantile (linear, type 7).

Prints one JSON object: seconds per stage and in all, the estimates, the interval.
"""
import argparse
import json
import time

import numpy as np


def main() -> None:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument('file')
    p.add_argument('--block-length', type=int, required=True)
    p.add_argument('--resamples', type=int, default=1000)
    p.add_argument('--level', type=float, default=0.95)
    p.add_argument('--seed', type=int, default=1)
    p.add_argument('--chunk-units', type=int, default=100)
    p.add_argument('--min-nonzero', type=int, default=10)
    a = p.parse_args()

    t0 = time.perf_counter()
    x = np.load(a.file, mmap_mode='r')
    units, bins = x.shape

    # 2. One pass over chunks of units.
    nonzero = 0
    bin_sum = np.zeros(bins)
    bin_sum_sq = np.zeros(bins)
    lifetime = np.empty(units)
    kurt = np.empty(units)
    for u0 in range(0, units, a.chunk_units):
        c = np.asarray(x[u0:u0 + a.chunk_units], dtype=np.float64)
        rows = len(c)
        nz = np.count_nonzero(c, axis=1)
        nonzero += int(nz.sum())
        bin_sum += c.sum(axis=0)
        bin_sum_sq += np.einsum('ij,ij->j', c, c)
        s1 = c.sum(axis=1)
        s2 = np.einsum('ij,ij->i', c, c)
        with np.errstate(invalid='ignore', divide='ignore'):
            ratio = (s1 / bins) ** 2 / (s2 / bins)
            lifetime[u0:u0 + rows] = (1 - ratio) / (1 - 1 / bins)
            d = c - (s1 / bins)[:, None]
            np.square(d, out=d)
            m2 = d.sum(axis=1) / bins
            m4 = np.einsum('ij,ij->i', d, d) / bins
            g2 = m4 / (m2 * m2) - 3
        g2[(nz < a.min_nonzero) | (m2 == 0)] = np.nan
        kurt[u0:u0 + rows] = g2
    t_pass = time.perf_counter()

    # 3. Population sparseness per bin.
    with np.errstate(invalid='ignore', divide='ignore'):
        act = (bin_sum / units) ** 2 / (bin_sum_sq / units)
    pop = (1 - act) / (1 - 1 / units)
    values = pop[~np.isnan(pop)]
    n = len(values)
    estimate = float(values.mean())

    # 4. Moving-block bootstrap of the mean, percentile interval.
    L = a.block_length
    k = -(-n // L)
    last = n - (k - 1) * L
    prefix = np.concatenate(([0.0], np.cumsum(values)))
    rng = np.random.default_rng(a.seed)
    starts = rng.integers(0, n - L + 1, size=(a.resamples, k))
    sums = (prefix[starts[:, :-1] + L] - prefix[starts[:, :-1]]).sum(axis=1)
    sums += prefix[starts[:, -1] + last] - prefix[starts[:, -1]]
    boot = sums / n
    alpha = 1 - a.level
    lower, upper = np.quantile(boot, [alpha / 2, 1 - alpha / 2])
    t_end = time.perf_counter()

    print(json.dumps({
        'seconds': {'pass': t_pass - t0, 'bootstrap': t_end - t_pass, 'total': t_end - t0},
        'shape': [units, bins],
        'chunkUnits': a.chunk_units,
        'estimates': {
            'density': nonzero / (units * bins),
            'population_sparseness': estimate,
            'lifetime_sparseness': float(np.nanmean(lifetime)),
            'kurtosis': float(np.nanmedian(kurt)),
        },
        'interval': {'lower': float(lower), 'upper': float(upper), 'level': a.level,
                     'resamples': a.resamples, 'blockLength': L, 'n': n},
        'versions': {'numpy': np.__version__},
    }))


if __name__ == '__main__':
    main()
