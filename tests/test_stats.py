"""Statistics against outside references: statsmodels/scipy and worked examples of the literature."""

from __future__ import annotations

import random

import numpy as np
import pytest

from pairflip.report.stats import binom_cdf_half, cluster_bootstrap_ci, holm, mcnemar_exact, wilson_interval

# --------------------------------------------------------------------------- Wilson

# (k, n) grid with the edges: k = 0, k = n, n = 1, tiny and large n.
KN = [(0, 1), (1, 1), (0, 2), (1, 2), (2, 2), (0, 5), (5, 5), (1, 7), (3, 10), (0, 50), (50, 50),
      (1, 1000), (999, 1000), (500, 1000), (12345, 98765), (7, 23), (19, 20)]
rng = random.Random(1927)
KN += [(k, n) for n in (rng.randrange(1, 3000) for _ in range(60)) for k in [rng.randrange(0, n + 1)]]


@pytest.mark.parametrize("k,n", KN)
def test_wilson_matches_statsmodels(k, n):
    # Reference implementation: statsmodels.stats.proportion.proportion_confint(method="wilson").
    from statsmodels.stats.proportion import proportion_confint

    lo, hi = proportion_confint(k, n, alpha=0.05, method="wilson")
    got = wilson_interval(k, n)
    assert got == pytest.approx((lo, hi), abs=1e-12)


# Newcombe R.G. (1998), "Two-sided confidence intervals for the single proportion: comparison of
# seven methods", Statistics in Medicine 17:857-872, Table I, method 3 (score interval without
# continuity correction). Values from memory, to 4 decimals; each is also checked against
# statsmodels above and here.
NEWCOMBE = [
    (81, 263, 0.2553, 0.3662),
    (15, 148, 0.0624, 0.1605),
    (0, 20, 0.0000, 0.1611),
    (1, 29, 0.0061, 0.1718),
]


@pytest.mark.parametrize("k,n,lo,hi", NEWCOMBE)
def test_wilson_newcombe_worked_examples(k, n, lo, hi):
    from statsmodels.stats.proportion import proportion_confint

    got = wilson_interval(k, n)
    assert got[0] == pytest.approx(lo, abs=5e-5) and got[1] == pytest.approx(hi, abs=5e-5)
    ref = proportion_confint(k, n, method="wilson")
    assert ref[0] == pytest.approx(lo, abs=5e-5) and ref[1] == pytest.approx(hi, abs=5e-5)


def test_wilson_edges():
    assert wilson_interval(0, 0) == (0.0, 1.0)  # nothing known
    lo, hi = wilson_interval(0, 10)
    assert lo == 0.0 and 0 < hi < 1
    lo, hi = wilson_interval(10, 10)
    assert hi == 1.0 and 0 < lo < 1
    with pytest.raises(ValueError):
        wilson_interval(3, 2)
    with pytest.raises(ValueError):
        wilson_interval(-1, 2)


def test_wilson_other_levels_match_statsmodels():
    # z for 90 % from scipy's normal quantile; statsmodels takes alpha = 0.10.
    from scipy.stats import norm
    from statsmodels.stats.proportion import proportion_confint

    z = norm.ppf(0.95)
    for k, n in [(3, 40), (0, 9), (9, 9), (200, 301)]:
        assert wilson_interval(k, n, z=z) == pytest.approx(proportion_confint(k, n, alpha=0.10, method="wilson"), abs=1e-12)


# --------------------------------------------------------------------------- McNemar exact

MC = [(0, 0), (0, 1), (1, 0), (0, 5), (5, 0), (3, 3), (2, 9), (9, 2), (10, 25), (40, 61), (0, 30), (150, 190),
      (1, 1), (12, 13)]


@pytest.mark.parametrize("b,c", MC)
def test_mcnemar_exact_matches_statsmodels(b, c):
    # Reference: statsmodels.stats.contingency_tables.mcnemar(table, exact=True) on the 2x2 table
    # [[both, b], [c, neither]]; only the discordant cells matter.
    from statsmodels.stats.contingency_tables import mcnemar

    ref = mcnemar(np.array([[7, b], [c, 11]]), exact=True).pvalue
    assert mcnemar_exact(b, c) == pytest.approx(ref, rel=1e-10, abs=1e-300)


def test_mcnemar_symmetric_and_bounded():
    for b, c in MC:
        p = mcnemar_exact(b, c)
        assert p == mcnemar_exact(c, b)
        assert 0.0 < p <= 1.0
    assert mcnemar_exact(0, 0) == 1.0
    # 0 vs 10 discordant: 2 * 0.5**10 (exact binomial, by hand).
    assert mcnemar_exact(0, 10) == pytest.approx(2 * 0.5**10)


def test_binom_cdf_half_matches_scipy():
    from scipy.stats import binom

    for k, n in [(0, 1), (3, 10), (10, 10), (50, 120), (700, 1500)]:
        assert binom_cdf_half(k, n) == pytest.approx(binom.cdf(k, n, 0.5), rel=1e-9)


# --------------------------------------------------------------------------- Holm

HOLM = [
    [0.01, 0.04, 0.03, 0.005],
    [0.5],
    [0.2, 0.2, 0.2],
    [1e-6, 0.9, 0.049, 0.051, 0.0125],
    [0.04, 0.01],
    [1.0, 0.0, 0.3],
]


@pytest.mark.parametrize("ps", HOLM)
def test_holm_matches_statsmodels(ps):
    # Reference: statsmodels.stats.multitest.multipletests(pvals, method="holm")[1].
    from statsmodels.stats.multitest import multipletests

    ref = multipletests(ps, method="holm")[1]
    assert holm(ps) == pytest.approx(list(ref), abs=1e-12)


def test_holm_random_matches_statsmodels():
    from statsmodels.stats.multitest import multipletests

    r = np.random.default_rng(1979)
    for m in (2, 3, 7, 20):
        ps = list(r.uniform(0, 0.2, size=m))
        assert holm(ps) == pytest.approx(list(multipletests(ps, method="holm")[1]), abs=1e-12)


def test_holm_empty_and_bad():
    assert holm([]) == []
    with pytest.raises(ValueError):
        holm([0.5, 1.5])


# --------------------------------------------------------------------------- cluster bootstrap


def _clustered(seed: int, clusters: int, rate: float, spread: float = 0.0):
    """Clusters of 1-4 pairs; each cluster has its own success probability around ``rate``."""
    r = random.Random(seed)
    items = []
    for c in range(clusters):
        p = min(1.0, max(0.0, rate + r.uniform(-spread, spread)))
        for _ in range(r.randint(1, 4)):
            items.append((f"s{c}", r.random() < p))
    return items


def _agreeing(seed: int, clusters: int, rate: float):
    """Clusters of 1-6 pairs that share one outcome: the bootstrap is wider than the Wilson
    interval at the number of clusters, so the seed shows in the interval."""
    r = random.Random(seed)
    items = []
    for c in range(clusters):
        ok = r.random() < rate
        items += [(f"s{c}", ok)] * r.randint(1, 6)
    return items


def test_bootstrap_is_deterministic_for_a_seed():
    items = _agreeing(0, 80, 0.3)
    a = cluster_bootstrap_ci(items, seed=7)
    b = cluster_bootstrap_ci(items, seed=7)
    c = cluster_bootstrap_ci(items, seed=8)
    assert a == b
    assert a != c
    assert cluster_bootstrap_ci(list(items), seed=7) == a  # a copy of the input, same interval


def test_bootstrap_contains_point_and_bounds():
    items = _clustered(1, 60, 0.25, 0.2)
    k = sum(ok for _, ok in items)
    point = k / len(items)
    lo, hi = cluster_bootstrap_ci(items, seed=0)
    assert 0.0 <= lo <= point <= hi <= 1.0
    assert cluster_bootstrap_ci([], seed=0) == (0.0, 1.0)
    # no violations (all violating): the Wilson interval at two clusters, not a point (issue 12)
    assert cluster_bootstrap_ci([("a", False), ("b", False)]) == wilson_interval(0, 2)
    assert cluster_bootstrap_ci([("a", True), ("b", True)]) == wilson_interval(2, 2)


def test_bootstrap_with_singleton_clusters_is_close_to_wilson():
    # With one pair per cluster the bootstrap is an ordinary binomial bootstrap; for n = 400 and
    # a rate of 0.3 its percentile interval and the Wilson interval agree to about a point
    # (both approximate the same binomial sampling distribution; common practice).
    r = random.Random(3)
    items = [(i, r.random() < 0.3) for i in range(400)]
    k = sum(ok for _, ok in items)
    lo, hi = cluster_bootstrap_ci(items, seed=0, n_boot=4000)
    wl, wh = wilson_interval(k, 400)
    assert abs(lo - wl) < 0.012 and abs(hi - wh) < 0.012


def test_bootstrap_coverage_sanity():
    # Coverage sanity check: simulate 200 suites of 60 clustered sources with a known rate of 0.3
    # and count how often the 95 % interval contains it. The percentile bootstrap is known to
    # under-cover slightly for small samples (Efron & Tibshirani 1993, ch. 14), so accept
    # 85 %..99 %; a broken resampler (too narrow, wrong quantiles, ignoring clusters when pairs
    # within a source agree) falls far outside. Seeded, so the count is the same on every run.
    truth = 0.3
    hits = naive_hits = 0
    runs = 200
    for s in range(runs):
        r = random.Random(1000 + s)
        items = []
        for c in range(60):
            # strong within-source agreement: every pair of a source shares one outcome draw
            ok = r.random() < truth
            items += [(c, ok)] * r.randint(1, 4)
        lo, hi = cluster_bootstrap_ci(items, seed=s, n_boot=500)
        hits += lo <= truth <= hi
        # the same data with every pair its own cluster: ignores the dependence
        lo, hi = cluster_bootstrap_ci([(i, ok) for i, (_c, ok) in enumerate(items)], seed=s, n_boot=500)
        naive_hits += lo <= truth <= hi
    assert 0.85 * runs <= hits <= 0.99 * runs
    assert naive_hits < 0.85 * runs  # the check has teeth: ignoring clusters under-covers


def test_bootstrap_wider_than_wilson_when_pairs_cluster():
    # When all pairs of a source share one outcome, the effective sample is the number of sources,
    # so the cluster interval must be wider than the (naive) Wilson interval over pairs.
    r = random.Random(5)
    items = []
    for c in range(100):
        ok = r.random() < 0.4
        items += [(c, ok)] * 4
    k = sum(ok for _, ok in items)
    lo, hi = cluster_bootstrap_ci(items, seed=0)
    wl, wh = wilson_interval(k, len(items))
    assert (hi - lo) > 1.5 * (wh - wl)


def test_bootstrap_bad_arguments():
    with pytest.raises(ValueError):
        cluster_bootstrap_ci([("a", True)], level=1.0)
    with pytest.raises(ValueError):
        cluster_bootstrap_ci([("a", True)], n_boot=0)


# --------------------------------------------------------------------------- cluster interval floor (issue 12)
# The cluster interval must contain the Wilson interval of the same rate at the effective sample
# size n_eff (the number of clusters). Reference implementation: statsmodels'
# proportion_confint(method="wilson"), given the count as rate * n_eff (it uses count / nobs only).


def _wilson_eff(items):
    from statsmodels.stats.proportion import proportion_confint

    n_eff = len({c for c, _ in items})
    rate = sum(ok for _, ok in items) / len(items)
    return proportion_confint(rate * n_eff, n_eff, alpha=0.05, method="wilson")


def _sized(outcomes_and_sizes):
    """One cluster per (outcome, size): ``size`` pairs that all share ``outcome``."""
    items = []
    for c, (ok, size) in enumerate(outcomes_and_sizes):
        items += [(f"s{c}", ok)] * size
    return items


def test_cluster_interval_with_no_violations_is_wilson_at_the_cluster_count():
    # 8 sources of 5 pairs, none violated: before the fix the bootstrap gave (0.0, 0.0).
    items = _sized([(False, 5)] * 8)
    lo, hi = cluster_bootstrap_ci(items, seed=0)
    ref = _wilson_eff(items)
    assert (lo, hi) == pytest.approx(ref, abs=1e-12)
    assert lo == 0.0 and hi == pytest.approx(0.3244, abs=1e-4)  # z^2 / (8 + z^2), z = 1.96
    assert hi > wilson_interval(0, 40)[1]  # wider than Wilson over the 40 pairs


def test_cluster_interval_with_every_pair_violated_is_wilson_at_the_cluster_count():
    items = _sized([(True, 1), (True, 3), (True, 2), (True, 6), (True, 1)])
    lo, hi = cluster_bootstrap_ci(items, seed=3)
    assert (lo, hi) == pytest.approx(_wilson_eff(items), abs=1e-12)
    assert hi == 1.0 and lo < wilson_interval(13, 13)[0] < 1.0


def test_cluster_interval_when_every_cluster_has_one_rate():
    # Each source: one of its two pairs violated. Every resample has the rate 0.5, so the bootstrap
    # is degenerate at a rate that is neither 0 nor 1; statsmodels gets the count 0.5 * 12 = 6.
    items = []
    for c in range(12):
        items += [(c, True), (c, False)]
    got = cluster_bootstrap_ci(items, seed=0)
    assert got == pytest.approx(_wilson_eff(items), abs=1e-12)
    assert got[0] < 0.5 < got[1]


def test_cluster_interval_keeps_the_bootstrap_where_it_is_already_wider():
    # 30 single-pair sources (9 violated) and 10 sources of 12 pairs (4 violated): the big sources
    # swing the rate, so the percentile bootstrap is wider than Wilson at 40 clusters on both sides
    # and is returned as it is.
    items = _sized([(i < 9, 1) for i in range(30)] + [(c < 4, 12) for c in range(10)])
    lo, hi = cluster_bootstrap_ci(items, seed=0)
    w_lo, w_hi = _wilson_eff(items)
    assert lo < w_lo - 0.05 and hi > w_hi + 0.05
    # A naive cluster bootstrap written out here (random.choices over the clusters, percentile
    # interval; Efron & Tibshirani 1993, ch. 13) agrees up to Monte Carlo error.
    groups: dict[str, list[bool]] = {}
    for cid, ok in items:
        groups.setdefault(cid, []).append(ok)
    clusters = list(groups.values())
    r = random.Random(11)
    rates = []
    for _ in range(4000):
        pick = r.choices(clusters, k=len(clusters))
        rates.append(sum(map(sum, pick)) / sum(map(len, pick)))
    ref_lo, ref_hi = np.quantile(rates, [0.025, 0.975])
    assert abs(lo - ref_lo) < 0.03 and abs(hi - ref_hi) < 0.03


@pytest.mark.parametrize("seed", range(40))
def test_cluster_interval_contains_both_wilson_intervals(seed):
    # Any clustered data: the interval contains Wilson at n_eff and so the plain Wilson interval
    # over the items (a Wilson interval at a smaller n contains the one at a larger n).
    r = random.Random(seed)
    rate = r.choice([0.0, 0.02, 0.3, 0.5, 0.97, 1.0])
    items = _clustered(seed, r.randint(1, 40), rate, r.choice([0.0, 0.3]))
    k = sum(ok for _, ok in items)
    lo, hi = cluster_bootstrap_ci(items, seed=seed, n_boot=300)
    w_lo, w_hi = _wilson_eff(items)
    assert lo <= w_lo + 1e-12 and hi >= w_hi - 1e-12
    p_lo, p_hi = wilson_interval(k, len(items))
    assert lo <= p_lo + 1e-12 and hi >= p_hi - 1e-12


def test_cluster_interval_at_another_level_uses_that_levels_wilson():
    from statsmodels.stats.proportion import proportion_confint

    items = _sized([(False, 3)] * 10)
    got = cluster_bootstrap_ci(items, seed=0, level=0.90)
    assert got == pytest.approx(proportion_confint(0, 10, alpha=0.10, method="wilson"), abs=1e-12)
