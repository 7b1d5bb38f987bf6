#!/usr/bin/python3
"""Reference fixtures for lib/agreement (Quorum).

Run with the Debian python (numpy + statsmodels):  /usr/bin/python3 scripts/reference/make-agreement-fixtures.py
Writes tests/fixtures/agreement/random-tables.json and published-examples.json.

Sources of the expected values:
- Cohen's kappa (unweighted, linear, quadratic): statsmodels.stats.inter_rater.cohens_kappa
  (statsmodels version recorded in the file header).
- Fleiss' kappa: statsmodels.stats.inter_rater.fleiss_kappa on the count table from
  aggregate_raters / to_table.
- Krippendorff's alpha (nominal, missing values): statsmodels 0.13.5 has no alpha, so it is computed
  here independently in numpy by building the coincidence matrix o_ck unit by unit from ordered value
  pairs, exactly as in Krippendorff 2011, "Computing Krippendorff's Alpha-Reliability", section on
  nominal data: alpha = 1 - (n - 1) * sum_{c != k} o_ck / sum_{c != k} n_c n_k.
- Percent agreement, specific agreement, PABAK (Byrt, Bishop & Carlin 1993) and Gwet's AC1
  (Gwet 2008): no statsmodels function either; computed here in numpy from the published formulas,
  independently of the TypeScript code (different layout, loops over rater pairs).
A value that is undefined (single category, fewer than 2 usable items) is written as null.
"""
import itertools
import json
import os
import warnings

import numpy as np
import statsmodels
from statsmodels.stats.inter_rater import aggregate_raters, cohens_kappa, fleiss_kappa, to_table

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, '..', '..', 'tests', 'fixtures', 'agreement')
HEADER = {
    'generator': 'scripts/reference/make-agreement-fixtures.py',
    'library': 'statsmodels %s (statsmodels.stats.inter_rater), numpy %s' % (statsmodels.__version__, np.__version__),
    'note': 'alpha, percent, specific agreement, PABAK and AC1 are independent numpy implementations '
            '(statsmodels 0.13.5 has none of them); kappas are statsmodels.',
}


def none_if_nan(x):
    x = float(x)
    return None if not np.isfinite(x) else x


def pair_stats(data, a, b, k):
    """Cohen kappas of raters a, b over items both rated, via statsmodels.cohens_kappa."""
    both = (data[:, a] >= 0) & (data[:, b] >= 0)
    n = int(both.sum())
    pair = np.stack([data[both, a], data[both, b]], axis=1)
    table, _ = to_table(pair, bins=np.arange(k + 1) - 0.5) if n > 0 else (np.zeros((k, k)), None)
    out = {'a': a, 'b': b, 'n': n, 'table': table.astype(int).tolist()}
    if n < 2:
        out.update(kappa=None, linear=None, quadratic=None)
        return out
    rows = table.sum(1)
    cols = table.sum(0)
    pe = float((rows * cols).sum()) / n / n
    if pe > 1 - 1e-12:
        out.update(kappa=None, linear=None, quadratic=None)
        return out
    out['kappa'] = none_if_nan(cohens_kappa(table).kappa)
    out['linear'] = none_if_nan(cohens_kappa(table, wt='linear').kappa)
    out['quadratic'] = none_if_nan(cohens_kappa(table, wt='quadratic').kappa)
    # two-rater AC1 (Gwet 2008) and pair percent agreement, numpy
    po = np.trace(table) / n
    pi = (rows + cols) / (2.0 * n)
    pe_g = (pi * (1 - pi)).sum() / (k - 1)
    out['percent'] = float(po)
    out['ac1'] = float((po - pe_g) / (1 - pe_g))
    return out


def counts_of(data, k):
    c = np.zeros((data.shape[0], k))
    for i, row in enumerate(data):
        for v in row:
            if v >= 0:
                c[i, v] += 1
    return c


def fleiss_expected(data, k):
    c = counts_of(data, k)
    m = c.sum(1)
    mstar = int(m.max())
    keep = m == mstar
    used = int(keep.sum())
    if used < 2 or mstar < 2:
        return None, used, mstar
    tab = c[keep]
    if np.all(data >= 0):
        # complete table: go through aggregate_raters as a user of statsmodels would
        tab2, _ = aggregate_raters(data, n_cat=k)
        assert np.array_equal(tab2, tab)
    p = tab.sum(0) / tab.sum()
    if 1 - (p * p).sum() < 1e-12:
        return None, used, mstar
    return float(fleiss_kappa(tab, method='fleiss')), used, mstar


def alpha_nominal(data, k):
    """Krippendorff 2011: coincidence matrix from ordered pairs within each pairable unit."""
    o = np.zeros((k, k))
    units = 0
    for row in data:
        vals = [v for v in row if v >= 0]
        m = len(vals)
        if m < 2:
            continue
        units += 1
        for i, j in itertools.permutations(range(m), 2):
            o[vals[i], vals[j]] += 1.0 / (m - 1)
    if units < 2:
        return None
    nc = o.sum(1)
    n = nc.sum()
    do = o.sum() - np.trace(o)
    de = (np.outer(nc, nc).sum() - (nc * nc).sum())
    if de <= 1e-12 * n * n:
        return None
    return float(1 - (n - 1) * do / de)


def multi_stats(data, k):
    """Percent agreement (mean over items of agreeing pairs), specific agreement, PABAK, AC1."""
    agrees, shares = [], []
    num = np.zeros(k)
    den = np.zeros(k)
    for row in data:
        vals = [v for v in row if v >= 0]
        m = len(vals)
        if m < 2:
            continue
        pairs = list(itertools.combinations(vals, 2))
        agrees.append(sum(1 for x, y in pairs if x == y) / len(pairs))
        cnt = np.bincount(vals, minlength=k).astype(float)
        shares.append(cnt / m)
        num += cnt * (cnt - 1)
        den += cnt * (m - 1)
    if len(agrees) < 2:
        return dict(percent=None, pabak=None, ac1=None, specific=[None] * k)
    pa = float(np.mean(agrees))
    pi = np.mean(shares, axis=0)
    pe = (pi * (1 - pi)).sum() / (k - 1)
    spec = [float(num[c] / den[c]) if den[c] > 0 else None for c in range(k)]
    return dict(percent=pa, pabak=float((k * pa - 1) / (k - 1)), ac1=float((pa - pe) / (1 - pe)), specific=spec)


def random_case(rng, name, n, r, k, missing, skew):
    # a latent true class with imbalanced prevalence, raters who copy it with some accuracy
    if skew:
        prev = np.array([0.85] + [0.15 / (k - 1)] * (k - 1))
    else:
        prev = rng.dirichlet(np.ones(k) * 2)
    truth = rng.choice(k, size=n, p=prev)
    acc = rng.uniform(0.4, 0.95, size=r)
    data = np.empty((n, r), dtype=int)
    for j in range(r):
        copy = rng.random(n) < acc[j]
        data[:, j] = np.where(copy, truth, rng.choice(k, size=n, p=prev))
    if missing > 0:
        drop = rng.random((n, r)) < missing
        data[drop] = -1
    case = {'name': name, 'k': k, 'raters': r, 'items': n, 'missing': missing,
            'codes': [[None if v < 0 else int(v) for v in row] for row in data]}
    case['pairs'] = [pair_stats(data, a, b, k) for a, b in itertools.combinations(range(r), 2)]
    fk, used, mstar = fleiss_expected(data, k)
    case['fleiss'] = {'kappa': fk, 'used': used, 'votesPerItem': mstar}
    case['alpha'] = alpha_nominal(data, k)
    case.update(multi_stats(data, k))
    return case


def main():
    # cohens_kappa also computes standard errors, which warn (sqrt of <0) on tiny tables; kappa is unaffected
    warnings.simplefilter('ignore', RuntimeWarning)
    rng = np.random.default_rng(20260)
    cases = []
    t = 0
    for r in range(2, 6):
        for k in range(2, 5):
            for skew in (False, True):
                for missing in (0.0, 0.2):
                    n = int(rng.integers(8, 60))
                    cases.append(random_case(rng, 'r%d-k%d-%s-%s-%d' % (r, k, 'skew' if skew else 'mixed',
                                                                     'missing' if missing else 'complete', t), n, r, k, missing, skew))
                    t += 1
    # a degenerate table: everyone uses one category only
    d = np.zeros((10, 3), dtype=int)
    case = {'name': 'degenerate-one-category', 'k': 3, 'raters': 3, 'items': 10, 'missing': 0.0,
            'codes': d.tolist(), 'pairs': [pair_stats(d, a, b, 3) for a, b in itertools.combinations(range(3), 2)]}
    fk, used, mstar = fleiss_expected(d, 3)
    case['fleiss'] = {'kappa': fk, 'used': used, 'votesPerItem': mstar}
    case['alpha'] = alpha_nominal(d, 3)
    case.update(multi_stats(d, 3))
    cases.append(case)
    os.makedirs(OUT, exist_ok=True)
    with open(os.path.join(OUT, 'random-tables.json'), 'w') as f:
        json.dump({'header': HEADER, 'cases': cases}, f, separators=(',', ':'))

    # Published examples re-computed by the reference code (see tests for what was read vs recalled).
    cohen_table = np.array([[20, 5], [10, 15]])
    fleiss_table = np.array([
        [0, 0, 0, 0, 14], [0, 2, 6, 4, 2], [0, 0, 3, 5, 6], [0, 3, 9, 2, 0], [2, 2, 8, 1, 1],
        [7, 7, 0, 0, 0], [3, 2, 6, 3, 0], [2, 5, 3, 2, 2], [6, 5, 2, 1, 0], [0, 2, 2, 3, 7]])
    kripp = np.array([  # observers A-D (columns) x units 1-12 (rows); values 1..5 -> codes 0..4; -1 missing
        [1, 1, -1, 1], [2, 2, 3, 2], [3, 3, 3, 3], [3, 3, 3, 3], [2, 2, 2, 2], [1, 2, 3, 4],
        [4, 4, 4, 4], [1, 1, 2, 1], [2, 2, 2, 2], [-1, 5, 5, 5], [-1, -1, 1, 1], [-1, 3, -1, -1]])
    kripp_codes = np.where(kripp > 0, kripp - 1, -1)
    published = {
        'header': HEADER,
        'cohen1960_50_items': {'table': cohen_table.tolist(), 'kappa': float(cohens_kappa(cohen_table).kappa)},
        'fleiss1971_10x14x5': {'counts': fleiss_table.tolist(), 'kappa': float(fleiss_kappa(fleiss_table))},
        'krippendorff2011_nominal': {'codes': [[None if v < 0 else int(v) for v in row] for row in kripp_codes],
                                     'alpha': alpha_nominal(kripp_codes, 5)},
    }
    with open(os.path.join(OUT, 'published-examples.json'), 'w') as f:
        json.dump(published, f, indent=1)
    print('wrote %d random cases; cohen %.6f fleiss %.6f alpha %.6f' % (
        len(cases), published['cohen1960_50_items']['kappa'], published['fleiss1971_10x14x5']['kappa'],
        published['krippendorff2011_nominal']['alpha']))


if __name__ == '__main__':
    main()
