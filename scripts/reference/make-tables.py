#!/usr/bin/env python3
"""
Reference values for the statistics engine's accuracy checks, computed in arbitrary precision.

Writes tests/reference/tables/special-functions.json. The tests read that committed file; CI does
not run Python. To regenerate (Debian: apt-get install -y python3-scipy python3-mpmath):

    python3 scripts/reference/make-tables.py

Every value is computed with mpmath at 50 significant digits and rounded once to a double
(17 significant digits). SciPy is used only to give a root-finder its starting point; the
quantiles are then solved in mpmath. Sources of the formulas evaluated here:

- regularised incomplete beta I_x(a, b): the positive-term hypergeometric series
  I_x(a,b) = x^a (1-x)^b / (a B(a,b)) * 2F1(a+b, 1; a+1; x)  (NIST DLMF 8.17.8), summed
  directly, on the side where it converges fast (the other side by DLMF 8.17.4);
  for whole shapes it is checked here against the binomial sum of DLMF 8.17.5.
- regularised incomplete gamma P(a, x) and Q(a, x): mpmath.gammainc.
- Stirling's error delta(n) = log Gamma(n+1) - (n + 1/2) log n + n - log(2 pi)/2 (C. Loader, 2000).
- deviance term D(x, M) = x log(x/M) + M - x (C. Loader, 2000).
- binomial, Poisson and hypergeometric CDFs: direct sums of the probabilities.
"""
import json
import time
import os
import sys

import mpmath as mp
import scipy
import scipy.special as sc

mp.mp.dps = 50
OUT = os.path.join(os.path.dirname(__file__), '..', '..', 'tests', 'reference', 'tables', 'special-functions.json')


def f(v):
    """Round an mpmath value once to the nearest double."""
    return float(mp.mpf(v))


def beta_lower_series(x, a, b):
    """I_x(a, b) by DLMF 8.17.8 with positive terms: prefactor * sum_k (a+b)_k / (a+1)_k x^k."""
    x = mp.mpf(x)
    a = mp.mpf(a)
    b = mp.mpf(b)
    pref = mp.exp(a * mp.log(x) + b * mp.log1p(-x) + mp.loggamma(a + b) - mp.loggamma(a + 1) - mp.loggamma(b))
    total = mp.mpf(0)
    term = mp.mpf(1)
    k = 0
    while True:
        total += term
        term *= (a + b + k) * x / (a + 1 + k)
        k += 1
        if term < mp.mpf(10) ** -60 * total and (a + b + k) * x < (a + 1 + k):
            break
    return pref * total


def beta_pair(x, a, b):
    """(I_x(a,b), 1 - I_x(a,b)): the series is summed on the side where its term ratio
    (a+b+k)x/(a+1+k) is smaller by the 20th term (it converges fastest there), the other value
    is the complement (at higher precision when it is tiny)."""
    x = mp.mpf(x)
    lower_ratio = (a + b + 20) * x / (a + 21)
    upper_ratio = (a + b + 20) * (1 - x) / (b + 21)
    if lower_ratio <= upper_ratio:
        lower = beta_lower_series(x, a, b)
        upper = beta_upper_from(lower, x, a, b)
    else:
        upper = beta_lower_series(1 - x, b, a)
        lower = beta_upper_from(upper, 1 - x, b, a)
    return lower, upper


def beta_upper_from(lower, x, a, b):
    value = 1 - lower
    if value < mp.mpf(10) ** -30:  # too close to 1 for the subtraction at 50 digits: sum the other side
        mp.mp.dps = 400
        value = 1 - beta_lower_series(x, a, b)
        mp.mp.dps = 50
    return value


def binomial_sum_upper(x, a, b):
    """For whole a, b: I_x(a, b) = P(X >= a), X ~ Binomial(a + b - 1, x)  (DLMF 8.17.5)."""
    n = int(a + b - 1)
    x = mp.mpf(x)
    return mp.fsum(mp.binomial(n, j) * x**j * (1 - x) ** (n - j) for j in range(int(a), n + 1))


def stirling_error(n):
    n = mp.mpf(n)
    return mp.loggamma(n + 1) - (n + mp.mpf(1) / 2) * mp.log(n) + n - mp.log(2 * mp.pi) / 2


def deviance(x, m):
    x = mp.mpf(x)
    m = mp.mpf(m)
    if x == 0:
        return m
    return x * mp.log(x / m) + m - x


def binomial_cdf(k, n, p):
    p = mp.mpf(p)
    return mp.fsum(mp.binomial(n, j) * p**j * (1 - p) ** (n - j) for j in range(0, k + 1))


def poisson_cdf(k, lam):
    # Q(k + 1, lambda) = P(X <= k)
    return mp.gammainc(k + 1, lam, mp.inf, regularized=True)


def hyper_cdf(k, N, M, n):
    denom = mp.binomial(N, n)
    lo = max(0, n - (N - M))
    return mp.fsum(mp.binomial(M, j) * mp.binomial(N - M, n - j) for j in range(lo, k + 1)) / denom


def main():
    global T0
    T0 = time.time()
    table = {
        'generator': 'scripts/reference/make-tables.py',
        'versions': {'mpmath': mp.__version__, 'scipy': scipy.__version__, 'python': sys.version.split()[0]},
        'digits': mp.mp.dps,
    }

    # Regularised incomplete beta: [x, a, b, lower, upper].
    rows = []
    shapes_a = [0.5, 1, 2, 3.7, 10, 101, 1000, 5000]
    shapes_b = [0.5, 1, 2.5, 9, 50, 500, 2000, 9000]
    for a in shapes_a:
        for b in shapes_b:
            mean = a / (a + b)
            xs = {mean * r for r in (0.2, 0.5, 0.8, 0.95, 1, 1.05, 1.2, 1.5, 2)} | {1e-3, 0.5, 0.999}
            for x in sorted(v for v in xs if 0 < v < 1):
                lower, upper = beta_pair(x, a, b)
                rows.append([x, a, b, f(lower), f(upper)])
    # binomial-tail shapes I_p(k + 1, n - k)
    for n in (78, 1000, 10000):
        for k in (0, 2, 30, 150):
            if k >= n:
                continue
            for p in (0.001, 0.01, 0.02, 0.05, 0.06, 0.117, 0.3):
                lower, upper = beta_pair(p, k + 1, n - k)
                if n <= 1000:
                    check = binomial_sum_upper(p, k + 1, n - k)
                    assert abs(check - lower) <= mp.mpf(10) ** -40 * max(lower, mp.mpf(10) ** -300), (n, k, p)
                rows.append([p, k + 1, n - k, f(lower), f(upper)])
    print('betaInc', round(time.time() - T0, 1), file=sys.stderr)
    table['betaInc'] = [r for r in rows if r[3] > 1e-300 or r[4] > 1e-300]

    # Regularised incomplete gamma: [x, a, P, Q].
    rows = []
    for a in (0.2, 0.3, 1, 2, 3, 5, 10, 51, 101, 601, 1201, 9000, 10001):
        xs = {a * r for r in (0.3, 0.6, 0.9, 0.97, 1, 1.03, 1.1, 1.5, 2, 3)} | {0.1, 1, 5}
        for x in sorted(xs):
            P = mp.gammainc(a, 0, x, regularized=True)
            Q = mp.gammainc(a, x, mp.inf, regularized=True)
            rows.append([x, a, f(P), f(Q)])
    print('gammaInc', round(time.time() - T0, 1), file=sys.stderr)
    table['gammaInc'] = rows

    # Stirling's error: [n, delta(n)].
    ns = [k / 2 for k in range(1, 41)] + [0.001, 0.1, 0.3, 2.7, 7.3, 9.99, 12.9, 15.9, 16.1, 17.3, 25, 33.3, 50, 100, 1000, 1e5, 1e7, 1e9]
    print('stirlingError', round(time.time() - T0, 1), file=sys.stderr)
    table['stirlingError'] = [[n, f(stirling_error(n))] for n in sorted(set(ns))]

    # Deviance term: [x, M, D].
    rows = []
    for m in (0.5, 3, 78, 1e4, 1e7):
        for v in (-0.99, -0.9, -0.5, -0.2, -0.1, -0.05, -0.01, -1e-4, -1e-8, 1e-8, 1e-4, 0.01, 0.05, 0.1, 0.2, 0.5, 1, 3, 100):
            x = m * (1 + v)
            rows.append([x, m, f(deviance(x, m))])
        rows.append([0, m, f(m)])
    print('deviance', round(time.time() - T0, 1), file=sys.stderr)
    table['deviance'] = rows

    # Binomial CDF P(X <= k): [k, n, p, value].
    rows = []
    for n in (1, 10, 78, 1000, 10000):
        for p in (0.001, 0.02, 0.06, 0.117, 0.5, 0.9):
            for k in sorted({0, 1, 2, int(n * p / 2), int(n * p), int(n * p) + 1, int(n * p * 1.5) + 2, n - 1}):
                if 0 <= k < n:
                    v = binomial_cdf(k, n, p)
                    if v > 1e-300:
                        rows.append([k, n, p, f(v)])
    # the worked cases of the tests (2 or 1 deviations in 75 or 78 items at a 6% tolerable rate)
    for (k, n, p) in ((2, 75, 0.06), (1, 78, 0.06), (2, 78, 0.06)):
        rows.append([k, n, p, f(binomial_cdf(k, n, p))])
    print('binomialCdf', round(time.time() - T0, 1), file=sys.stderr)
    table['binomialCdf'] = rows

    # Poisson CDF, including means above 1,000: [k, lambda, value].
    rows = []
    for lam in (0.01, 1, 4.68, 50.5, 1000, 3000, 12000):
        for k in sorted({0, 1, 5, int(lam * 0.9), int(lam * 0.97), int(lam), int(lam * 1.03), int(lam * 1.1)}):
            v = poisson_cdf(k, lam)
            if v > 1e-300:
                rows.append([k, lam, f(v)])
    print('poissonCdf', round(time.time() - T0, 1), file=sys.stderr)
    table['poissonCdf'] = rows

    # Hypergeometric CDF for populations up to 10,000,000: [k, N, M, n, value].
    rows = []
    for N in (1000, 100000, 10000000):
        for M_rate in (0.01, 0.05, 0.1):
            M = -(-int(N * M_rate * 1000) // 1000)
            for n in (m for m in (20, 93, 500, 2000) if m <= N):
                for k in sorted({0, 1, int(n * M_rate), int(n * M_rate * 1.5) + 1}):
                    if k <= min(n, M):
                        v = hyper_cdf(k, N, M, n)
                        if v > 1e-300:
                            rows.append([k, N, M, n, f(v)])
    print('hypergeometricCdf', round(time.time() - T0, 1), file=sys.stderr)
    table['hypergeometricCdf'] = rows

    # Gamma quantile for large shapes: [prob, a, x] with P(a, x) = prob.
    rows = []
    for a in (1, 3, 101, 1201, 5001, 10001):
        for prob in (0.05, 0.5, 0.9, 0.95):
            start = sc.gammaincinv(a, prob)
            x = mp.findroot(lambda t: mp.gammainc(a, 0, t, regularized=True) - prob, mp.mpf(start), tol=mp.mpf(10) ** -40)
            rows.append([prob, a, f(x)])
    print('gammaQuantile', round(time.time() - T0, 1), file=sys.stderr)
    table['gammaQuantile'] = rows

    # Beta quantile (the Clopper-Pearson upper limit) for large samples: [prob, a, b, x] with I_x(a,b) = prob.
    rows = []
    for (a, b) in ((1, 78), (3, 76), (3, 73), (31, 970), (151, 9850), (1001, 9000), (5000, 5000)):
        for prob in (0.05, 0.9, 0.95, 0.99):
            start = sc.betaincinv(a, b, prob)
            x = mp.findroot(lambda t: beta_pair(t, a, b)[0] - prob, mp.mpf(start), tol=mp.mpf(10) ** -40)
            rows.append([prob, a, b, f(x)])
    print('betaQuantile', round(time.time() - T0, 1), file=sys.stderr)
    table['betaQuantile'] = rows

    # One row a line, so that a regenerated table diffs row by row.
    parts = []
    for key, value in table.items():
        if isinstance(value, list):
            rows = ',\n'.join('    ' + json.dumps(r) for r in value)
            parts.append(f'  {json.dumps(key)}: [\n{rows}\n  ]')
        else:
            parts.append(f'  {json.dumps(key)}: {json.dumps(value)}')
    with open(OUT, 'w') as out:
        out.write('{\n' + ',\n'.join(parts) + '\n}\n')
    print('wrote', os.path.normpath(OUT), {k: len(v) for k, v in table.items() if isinstance(v, list)})


if __name__ == '__main__':
    main()
