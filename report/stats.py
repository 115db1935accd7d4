"""Interval estimates and paired tests. Pure functions of counts; nothing here prints.

- :func:`wilson_interval`: the Wilson score interval for a binomial proportion (Wilson 1927).
- :func:`cluster_bootstrap_ci`: a seeded percentile bootstrap of a rate that resamples whole
  clusters (source sentences), for pairs that are not independent because several come from one
  sentence (Efron & Tibshirani 1993, ch. 13, percentile interval; resampling clusters rather than
  items is common practice for clustered data), widened to contain the Wilson interval at the
  effective sample size (:func:`wilson_interval_at`).
- :func:`mcnemar_exact`: McNemar's test (McNemar 1947) in its exact form, a two-sided binomial
  test on the discordant pairs.
- :func:`holm`: Holm's step-down adjustment of p-values for several tests (Holm 1979).
"""

from __future__ import annotations

import math
from collections import defaultdict
from statistics import NormalDist
from typing import Hashable, Sequence

Z95 = 1.959963984540054  # the 0.975 quantile of the standard normal


def wilson_interval(k: int, n: int, z: float = Z95) -> tuple[float, float]:
    """Wilson score interval (Wilson 1927) for ``k`` successes in ``n`` trials.

    With ``n == 0`` nothing is known and the interval is ``(0.0, 1.0)``.
    """
    if n < 0 or not 0 <= k <= max(n, 0):
        raise ValueError(f"need 0 <= k <= n, got k={k}, n={n}")
    if n == 0:
        return (0.0, 1.0)
    return wilson_interval_at(k / n, n, z)  # k / n is exactly 0.0 at k == 0 and 1.0 at k == n


def wilson_interval_at(rate: float, n: int, z: float = Z95) -> tuple[float, float]:
    """The Wilson score interval of an observed ``rate`` as if it came from ``n`` independent trials.

    ``rate * n`` need not be a whole number: this is the interval of a rate measured on more items
    than ``n`` that are not independent, at an effective sample size ``n`` (the number of
    clusters). With ``n == 0`` the interval is ``(0.0, 1.0)``.
    """
    if not 0.0 <= rate <= 1.0:
        raise ValueError(f"rate must lie in [0, 1], got {rate}")
    if n < 0:
        raise ValueError(f"n must be >= 0, got {n}")
    if n == 0:
        return (0.0, 1.0)
    p = rate
    z2 = z * z
    denom = 1.0 + z2 / n
    centre = (p + z2 / (2 * n)) / denom
    half = (z / denom) * math.sqrt(p * (1 - p) / n + z2 / (4 * n * n))
    lo, hi = centre - half, centre + half
    # At a rate of 0 (1) the bound is exactly 0 (1); rounding can leave 1e-17 instead.
    if p == 0.0:
        lo = 0.0
    if p == 1.0:
        hi = 1.0
    return (max(0.0, lo), min(1.0, hi))


def cluster_bootstrap_ci(
    items: Sequence[tuple[Hashable, bool]], *, seed: int = 0, n_boot: int = 2000, level: float = 0.95
) -> tuple[float, float]:
    """Percentile bootstrap interval of a rate, resampling whole clusters (source sentences).

    ``items`` are ``(cluster_id, success)``; the rate of a resample is its total successes over
    its total items (a ratio estimator, so large clusters weigh more, as in the point estimate).
    Each of ``n_boot`` resamples draws as many clusters as there are, with replacement. Seeded
    (numpy's PCG64), so the same input and seed give the same interval on every machine.
    With no items the interval is ``(0.0, 1.0)``.

    The interval is never narrower than the Wilson interval of the same counts at the effective
    sample size: with ``p`` = successes / items and ``n_eff`` = the number of clusters (each
    cluster given holds at least one item), ``(lo_w, hi_w) = wilson_interval_at(p, n_eff)`` at
    the same ``level``, and the result is ``(min(lo_boot, lo_w), max(hi_boot, hi_w))``. This
    matters where the bootstrap collapses: when every cluster has the same rate (0 successes,
    all successes, or one rate everywhere) every resample gives that rate, the percentile
    interval is a single point, and the Wilson interval at ``n_eff`` is returned instead (no
    resampling is done). Since ``n_eff`` is at most the number of items and the Wilson interval
    at a smaller ``n`` contains the one at a larger ``n`` for the same rate (its bounds solve
    ``(p - t)**2 = z**2 t (1 - t) / n``), the result also contains the plain Wilson interval over
    items, so ``--on upper`` with ``--cluster source`` is never less cautious than without.
    """
    import numpy as np

    if not 0 < level < 1:
        raise ValueError(f"level must lie in (0, 1), got {level}")
    if n_boot < 1:
        raise ValueError(f"n_boot must be at least 1, got {n_boot}")
    if not items:
        return (0.0, 1.0)
    groups: dict[Hashable, list[int]] = defaultdict(lambda: [0, 0])
    for cid, ok in items:
        g = groups[cid]
        g[0] += int(bool(ok))
        g[1] += 1
    succ = np.array([g[0] for g in groups.values()], dtype=np.float64)
    size = np.array([g[1] for g in groups.values()], dtype=np.float64)
    m = len(succ)
    z = Z95 if level == 0.95 else NormalDist().inv_cdf(0.5 + level / 2.0)  # Z95 as in wilson_interval
    w_lo, w_hi = wilson_interval_at(float(succ.sum() / size.sum()), m, z)
    # Every cluster at one rate (counts are whole numbers, so the cross products are exact):
    # every resample has that rate and the percentile interval would be a single point.
    if np.array_equal(succ * size[0], size * succ[0]):
        return (w_lo, w_hi)
    rng = np.random.default_rng(seed)
    rates = np.empty(n_boot, dtype=np.float64)
    # Draw cluster multiplicities (a multinomial over the clusters) in chunks, so memory stays
    # bounded at about 4 MB whatever the number of clusters.
    chunk = max(1, min(n_boot, (1 << 19) // m))
    probs = np.full(m, 1.0 / m)
    for start in range(0, n_boot, chunk):
        stop = min(n_boot, start + chunk)
        w = rng.multinomial(m, probs, size=stop - start).astype(np.float64)
        rates[start:stop] = (w @ succ) / (w @ size)
    alpha = (1.0 - level) / 2.0
    lo, hi = np.quantile(rates, [alpha, 1.0 - alpha])
    return (min(float(lo), w_lo), max(float(hi), w_hi))


def binom_cdf_half(k: int, n: int) -> float:
    """P(X <= k) for X ~ Binomial(n, 1/2), computed exactly with integers."""
    if k < 0:
        return 0.0
    if k >= n:
        return 1.0
    total = 0
    c = 1
    for i in range(k + 1):
        if i:
            c = c * (n - i + 1) // i
        total += c
    return total / (1 << n)


def mcnemar_exact(b: int, c: int) -> float:
    """Exact two-sided McNemar p-value (McNemar 1947) from the two discordant counts.

    ``b`` and ``c`` are the pairs violated by one model only and by the other only. Under the
    null hypothesis each discordant pair is equally likely to go either way, so the p-value is
    ``min(1, 2 * P(X <= min(b, c)))`` with ``X ~ Binomial(b + c, 1/2)``; 1.0 when ``b + c == 0``.
    """
    if b < 0 or c < 0:
        raise ValueError(f"discordant counts must be >= 0, got b={b}, c={c}")
    n = b + c
    if n == 0:
        return 1.0
    return min(1.0, 2.0 * binom_cdf_half(min(b, c), n))


def holm(pvalues: Sequence[float]) -> list[float]:
    """Holm's step-down adjusted p-values (Holm 1979), in the order given.

    Sort the m p-values ascending; the i-th smallest (from 1) is multiplied by ``m - i + 1``,
    the results are made non-decreasing by a running maximum and capped at 1.
    """
    m = len(pvalues)
    for p in pvalues:
        if not (0.0 <= p <= 1.0):
            raise ValueError(f"p-values must lie in [0, 1], got {p}")
    order = sorted(range(m), key=lambda i: pvalues[i])
    adjusted = [0.0] * m
    running = 0.0
    for rank, i in enumerate(order):
        running = max(running, min(1.0, (m - rank) * pvalues[i]))
        adjusted[i] = running
    return adjusted
