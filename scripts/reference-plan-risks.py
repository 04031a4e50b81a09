#!/usr/bin/env python3
"""
Independent reference values for tests/reference/plan-risks.test.ts, written to
tests/reference/plan-risks.json.

Tool: Python 3 (run with 3.11.7) and its standard library only -- fractions.Fraction for exact
rational arithmetic and math.comb for exact binomial coefficients. No floating point is used
until each final value is converted (correctly rounded) to a double for the JSON file, except
where a section says otherwise. Nothing here imports or mirrors tolrate's code: every figure is
computed from its definition.

Rates are read from their decimal strings ("0.06"), so 6% is exactly 3/50. For a known
population the deviations at the tolerable rate are ceil(TDR*N) and at the expected rate
floor(EDR*N). A result "supports reliance" when the exact risk of overreliance is <= beta.

Run:  python3 scripts/reference-plan-risks.py   (4 to 12 minutes; rewrites the JSON file)
CI does not run it: the JSON file is committed.
"""
import json
import math
import platform
from fractions import Fraction as F
from functools import lru_cache

OUT = 'tests/reference/plan-risks.json'


def binom_pmf(n, x, p):
    if x < 0 or x > n:
        return F(0)
    return math.comb(n, x) * p ** x * (1 - p) ** (n - x)


def binom_cdf(n, k, p):
    return sum((binom_pmf(n, x, p) for x in range(0, min(k, n) + 1)), F(0))


def hyper_pmf(N, M, n, x):
    if x < 0 or x > n or x > M or n - x > N - M:
        return F(0)
    return F(math.comb(M, x) * math.comb(N - M, n - x), math.comb(N, n))


def hyper_cdf(N, M, n, k):
    return sum((hyper_pmf(N, M, n, x) for x in range(0, min(k, n) + 1)), F(0))


class Binomial:
    def __init__(self, p):
        self.p = p

    def pmf(self, n, x):
        return binom_pmf(n, x, self.p)

    def cdf(self, n, k):
        return binom_cdf(n, k, self.p) if k >= 0 else F(0)

    def after(self, n, x):
        return self


class Hyper:
    def __init__(self, N, M):
        self.N, self.M = N, M

    def pmf(self, n, x):
        return hyper_pmf(self.N, self.M, n, x)

    def cdf(self, n, k):
        return hyper_cdf(self.N, self.M, n, k) if k >= 0 else F(0)

    def after(self, n, x):
        return Hyper(self.N - n, self.M - x)


def draw(model, rate, N, rounding):
    r = F(rate)
    if model == 'binomial':
        return Binomial(r)
    M = math.ceil(r * N) if rounding == 'ceil' else math.floor(r * N)
    return Hyper(N, min(N, M))


def plan_accept(plan, d):
    """P(accept) and ASN of a single-stage {n, c} or two-stage {n1, c1, r1, n2, c2} plan."""
    if 'n' in plan:
        return d.cdf(plan['n'], plan['c']), F(plan['n'])
    n1, c1, r1, n2, c2 = plan['n1'], plan['c1'], plan['r1'], plan['n2'], plan['c2']
    acc = d.cdf(n1, c1)
    cont = F(0)
    for x in range(c1 + 1, r1):
        px = d.pmf(n1, x)
        cont += px
        acc += px * d.after(n1, x).cdf(n2, c2 - x)
    return acc, n1 + n2 * cont


def risk(model, T, N, n, k):
    return draw(model, T, N, 'ceil').cdf(n, k)


def extension_total(model, T, N, beta, n, k, cap):
    """Smallest total t > n with risk(t, k) <= beta, or None (also when k = n)."""
    if risk(model, T, N, n, k) <= beta:
        return n
    if k >= n or risk(model, T, N, cap, k) > beta:
        return None
    lo, hi = n + 1, cap
    while lo < hi:
        mid = (lo + hi) // 2
        if risk(model, T, N, mid, k) <= beta:
            hi = mid
        else:
            lo = mid + 1
    return lo


def f(x):
    return float(x)


def main():
    out = {
        'tool': f'Python {platform.python_version()}, fractions.Fraction and math.comb (exact rational arithmetic)',
        'script': 'scripts/reference-plan-risks.py',
        'plans': [],
        'oc': [],
        'underreliance': [],
        'bothRisks': [],
        'extension': [],
        'combined': [],
        'tolerableDeviations': [],
    }

    # 1. Exact risks of given two-stage (and single-stage) plans.
    plan_cases = [
        ('binomial', None, '0.06', '0.01', {'n1': 62, 'c1': 0, 'r1': 2, 'n2': 18, 'c2': 1}),
        ('binomial', None, '0.05', '0.01', {'n1': 61, 'c1': 0, 'r1': 2, 'n2': 18, 'c2': 1}),
        ('binomial', None, '0.04', '0.02', {'n1': 208, 'c1': 3, 'r1': 6, 'n2': 132, 'c2': 7}),
        ('binomial', None, '0.06', '0.01', {'n1': 50, 'c1': 0, 'r1': 3, 'n2': 50, 'c2': 2}),
        ('hypergeometric', 1500, '0.06', '0.01', {'n1': 64, 'c1': 0, 'r1': 2, 'n2': 13, 'c2': 1}),
        ('hypergeometric', 400, '0.05', '0.01', {'n1': 40, 'c1': 0, 'r1': 3, 'n2': 40, 'c2': 2}),
        ('hypergeometric', 3412, '0.06', '0.01', {'n': 77, 'c': 1}),
        ('binomial', None, '0.06', '0.01', {'n': 78, 'c': 1}),
    ]
    for model, N, T, E, plan in plan_cases:
        aT, asnT = plan_accept(plan, draw(model, T, N, 'ceil'))
        aE, asnE = plan_accept(plan, draw(model, E, N, 'floor'))
        out['plans'].append({
            'model': model, 'populationSize': N, 'tolerableRate': float(F(T)), 'expectedRate': float(F(E)), 'plan': plan,
            'overrelianceRisk': f(aT), 'underrelianceRisk': f(1 - aE),
            'averageSampleNumber': f(asnE), 'averageSampleNumberAtTolerable': f(asnT),
        })

    # 2. Operating characteristic points (rates as decimal strings; hypergeometric M = ceil(rate*N)).
    for model, N, plan in [('binomial', None, {'n1': 62, 'c1': 0, 'r1': 2, 'n2': 18, 'c2': 1}),
                           ('hypergeometric', 1500, {'n1': 64, 'c1': 0, 'r1': 2, 'n2': 13, 'c2': 1}),
                           ('binomial', None, {'n': 78, 'c': 1})]:
        for rate in ['0', '0.005', '0.01', '0.02', '0.04', '0.06', '0.1', '0.2']:
            a, asn = plan_accept(plan, draw(model, rate, N, 'ceil'))
            out['oc'].append({'model': model, 'populationSize': N, 'plan': plan, 'rate': float(F(rate)),
                              'acceptanceProbability': f(a), 'averageSampleNumber': f(asn)})

    # 3. Risk of underreliance of single-stage plans: 1 - P(X <= c) at the expected rate.
    for model, N, n, c, E in [('binomial', None, 78, 1, '0.01'), ('binomial', None, 103, 2, '0.01'),
                              ('binomial', None, 294, 6, '0.02'), ('hypergeometric', 3412, 77, 1, '0.01'),
                              ('hypergeometric', 318, 68, 1, '0.0125'), ('binomial', None, 45, 0, '0.005')]:
        d = draw(model, E, N, 'floor')
        out['underreliance'].append({'model': model, 'populationSize': N, 'sampleSize': n, 'acceptanceNumber': c,
                                     'expectedRate': float(F(E)), 'underrelianceRisk': f(1 - d.cdf(n, c))})

    # 4. Planning for both risks: the smallest n (binomial) with c = the largest acceptance number
    #    whose risk of overreliance is <= beta, and 1 - P(X <= c | EDR) <= alpha.
    for conf, T, E, alpha in [('0.95', '0.06', '0.01', '0.1'), ('0.9', '0.05', '0.01', '0.05'), ('0.95', '0.1', '0.02', '0.2')]:
        beta = 1 - F(conf)
        p, q = F(T), F(E)
        n, c = 0, -1
        while True:
            n += 1
            while c + 1 < n and binom_cdf(n, c + 1, p) <= beta:
                c += 1
            if c >= 0 and 1 - binom_cdf(n, c, q) <= F(alpha):
                break
        out['bothRisks'].append({'confidence': float(F(conf)), 'tolerableRate': float(p), 'expectedRate': float(q),
                                 'underrelianceRisk': float(F(alpha)), 'sampleSize': n, 'acceptanceNumber': c,
                                 'overrelianceRiskAchieved': f(binom_cdf(n, c, p)), 'underrelianceRiskAchieved': f(1 - binom_cdf(n, c, q))})

    # 5. The extension procedure actually followed: "test n; with x > c extend to the single-stage
    #    total t(x) and rely only if none of the added items deviates". Exact sum over x; terms with
    #    P(X = x) < 1e-40 are left out (their total is below 1e-38).
    for model, N, conf, T, n in [('binomial', None, '0.95', '0.06', 78), ('binomial', None, '0.9', '0.05', 77),
                                 ('hypergeometric', 3412, '0.95', '0.06', 77), ('hypergeometric', 1000, '0.95', '0.05', 88)]:
        beta = 1 - F(conf)
        cap = 10000 if N is None else N
        d = draw(model, T, N, 'ceil')
        c = -1
        while c + 1 < n and d.cdf(n, c + 1) <= beta:
            c += 1
        total = d.cdf(n, c)
        figures = {}
        for x in range(c + 1, n + 1):
            px = d.pmf(n, x)
            if px < F(1, 10 ** 40):
                if x > n * float(F(T)):
                    break
                continue
            t = extension_total(model, T, N, beta, n, x, cap)
            if t is None:
                continue
            if x <= 4:
                figures[str(x)] = t - n
            total += px * d.after(n, x).pmf(t - n, 0)
        out['extension'].append({'model': model, 'populationSize': N, 'confidence': float(F(conf)), 'tolerableRate': float(F(T)),
                                 'sampleSize': n, 'acceptanceNumber': c, 'extensionSizes': figures, 'procedureRisk': f(total)})

    # 5b. The repeated procedure (extend again after each extension that finds a deviation), for a
    #     small population so that every path can be followed: backward recursion over (tested, deviations).
    for N, conf, T, n in [(300, '0.95', '0.06', 74), (200, '0.9', '0.1', 20)]:
        beta = 1 - F(conf)
        d0 = draw('hypergeometric', T, N, 'ceil')
        Mt = d0.M

        @lru_cache(maxsize=None)
        def target(k):
            return extension_total('hypergeometric', T, N, beta, k + 1, k, N) if k + 1 <= N else None

        @lru_cache(maxsize=None)
        def R(tested, k):
            if hyper_cdf(N, Mt, tested, k) <= beta:
                return F(1)
            if k >= tested:
                return F(0)
            t = target(k)
            if t is None or t <= tested:
                return F(0)
            m = t - tested
            rest = Hyper(N - tested, Mt - k)
            v = rest.pmf(m, 0)
            for j in range(1, min(m, rest.M) + 1):
                pj = rest.pmf(m, j)
                if pj:
                    v += pj * R(t, k + j)
            return v

        total = sum((d0.pmf(n, x) * R(n, x) for x in range(0, min(n, Mt) + 1)), F(0))
        out['extension'].append({'model': 'hypergeometric', 'populationSize': N, 'confidence': float(F(conf)), 'tolerableRate': float(F(T)),
                                 'sampleSize': n, 'repeatedProcedureRisk': f(total)})

    # 6. Combined upper limit over parts: the largest total m such that, for the worst allocation
    #    M_1 + ... + M_P = m, P(sum N_i X_i / n_i <= observed) > beta (brute force over allocations).
    for conf, parts in [('0.95', [(1000, 88, 1)]), ('0.95', [(600, 40, 1), (400, 30, 0)]),
                        ('0.9', [(500, 45, 2), (300, 20, 0)]), ('0.95', [(200, 20, 0), (150, 15, 1), (100, 10, 0)])]:
        beta = 1 - F(conf)
        t_obs = sum(F(Ni * ki, ni) for Ni, ni, ki in parts)
        outcomes = []

        def walk(i, acc):
            if i == len(parts):
                if sum(F(parts[j][0] * acc[j], parts[j][1]) for j in range(len(parts))) <= t_obs:
                    outcomes.append(tuple(acc))
                return
            for x in range(0, parts[i][1] + 1):
                if F(parts[i][0] * x, parts[i][1]) > t_obs:
                    break
                walk(i + 1, acc + [x])

        walk(0, [])

        def allocations(m, i=0):
            if i == len(parts) - 1:
                if m <= parts[i][0]:
                    yield (m,)
                return
            rest = sum(p[0] for p in parts[i + 1:])
            for Mi in range(max(0, m - rest), min(parts[i][0], m) + 1):
                for tail in allocations(m - Mi, i + 1):
                    yield (Mi,) + tail

        def pval(m):
            best = F(-1)
            for alloc in allocations(m):
                s = F(0)
                for o in outcomes:
                    prod = F(1)
                    for (Ni, ni, ki), Mi, xi in zip(parts, alloc, o):
                        prod *= hyper_pmf(Ni, Mi, ni, xi)
                        if prod == 0:
                            break
                    s += prod
                best = max(best, s)
            return best

        m = sum(k for _, _, k in parts)
        while pval(m + 1) > beta:
            m += 1
        Ntot = sum(p[0] for p in parts)
        out['combined'].append({'confidence': float(F(conf)),
                                'parts': [{'populationSize': a, 'sampleSize': b, 'deviations': c} for a, b, c in parts],
                                'deviationsInPopulation': m, 'rate': f(F(m, Ntot))})

    # 6b. The two-stage search, by brute force over the space tolrate's search documents: every
    #     n1 below the single-stage size ns, c1 <= cs (the acceptance number of ns), c1 < c2 <= cs + 2,
    #     c1 + 2 <= r1 <= c2 + 1, and every n2 while n1 + n2 * P(continue) < ns; the smallest n2 with
    #     risk <= beta, kept when its risk of underreliance is <= that of the single stage; the
    #     smallest average sample number wins (ties: smaller n1 + n2). Double precision here
    #     (math.comb times powers, in floats), with a relative tolerance of 1e-12 on each comparison,
    #     as exact rationals would take hours; the sizes found are compared exactly.
    out['twoStage'] = []
    for conf, T, E, N in [('0.95', '0.06', '0.01', None), ('0.9', '0.05', '0.01', None), ('0.95', '0.08', '0.02', None), ('0.95', '0.06', '0.01', 1500)]:
        beta = 1 - float(F(conf))
        model = 'binomial' if N is None else 'hypergeometric'

        def pmf_f(d, n, x):
            if isinstance(d, Binomial):
                if x < 0 or x > n:
                    return 0.0
                return math.comb(n, x) * float(d.p) ** x * (1 - float(d.p)) ** (n - x)
            if x < 0 or x > n or x > d.M or n - x > d.N - d.M:
                return 0.0
            return math.comb(d.M, x) * math.comb(d.N - d.M, n - x) / math.comb(d.N, n)

        def cdf_f(d, n, k):
            return sum(pmf_f(d, n, x) for x in range(0, k + 1))

        dT, dE = draw(model, T, N, 'ceil'), draw(model, E, N, 'floor')
        # single stage: smallest n with risk at ceil(n * EDR) <= beta
        ns = 1
        while cdf_f(dT, ns, math.ceil(F(E) * ns)) > beta * (1 + 1e-12):
            ns += 1
        cs = 0
        while cdf_f(dT, ns, cs + 1) <= beta * (1 + 1e-12):
            cs += 1
        alpha = 1 - cdf_f(dE, ns, cs)
        best = None
        for n1 in range(1, ns):
            for c1 in range(0, min(cs, n1 - 1) + 1):
                for c2 in range(c1 + 1, cs + 3):
                    for r1 in range(c1 + 2, min(c2 + 1, n1 + 1) + 1):
                        cont = sum(pmf_f(dE, n1, x) for x in range(c1 + 1, r1))
                        if cont == 0:
                            continue

                        def acc(d, n2):
                            a = cdf_f(d, n1, c1)
                            for x in range(c1 + 1, r1):
                                a += pmf_f(d, n1, x) * cdf_f(d.after(n1, x), n2, c2 - x)
                            return a

                        n2 = 1
                        while n1 + n2 * cont < ns and acc(dT, n2) > beta * (1 + 1e-12):
                            n2 += 1
                        if n1 + n2 * cont >= ns:
                            continue
                        if 1 - acc(dE, n2) > alpha * (1 + 1e-12):
                            continue
                        asn = n1 + n2 * cont
                        key = (asn, n1 + n2)
                        if best is None or key[0] < best[0][0] - 1e-12 or (abs(key[0] - best[0][0]) <= 1e-12 and key[1] < best[0][1]):
                            best = (key, {'n1': n1, 'c1': c1, 'r1': r1, 'n2': n2, 'c2': c2})
        out['twoStage'].append({'confidence': float(F(conf)), 'tolerableRate': float(F(T)), 'expectedRate': float(F(E)), 'populationSize': N,
                                'singleStageSize': ns, 'singleStageAcceptanceNumber': cs, 'plan': best[1], 'averageSampleNumber': best[0][0]})

    # 7. Tolerable counts ceil(TDR * N) from the decimal as typed.
    for N, T in [(884590000, '0.07'), (1000, '0.05'), (3412, '0.06'), (100, '0.07'), (999999937, '0.0299'), (10 ** 9, '0.1')]:
        out['tolerableDeviations'].append({'populationSize': N, 'tolerableRate': T, 'count': math.ceil(F(T) * N)})

    with open(OUT, 'w') as fh:
        json.dump(out, fh, indent=1)
        fh.write('\n')


if __name__ == '__main__':
    main()
