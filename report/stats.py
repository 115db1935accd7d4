"""Interval estimates and paired tests. Pure functions of counts; nothing here prints."""

from __future__ import annotations

import math
import random
from collections import defaultdict
from typing import Hashable, Iterable, Sequence

Z95 = 1.959963984540054  # the 0.975 quantile of the standard normal


def wilson_interval(k: int, n: int, z: float = Z95) -> tuple[float, float]:
    """Wilson score interval (Wilson 1927) for k successes in n trials; (0, 0) when n == 0."""
    if n <= 0:
        return (0.0, 0.0)
    if not 0 <= k <= n:
        raise ValueError(f"need 0 <= k <= n, got k={k}, n={n}")
    p = k / n
    z2 = z * z
    denom = 1.0 + z2 / n
    centre = (p + z2 / (2 * n)) / denom
    half = (z / denom) * math.sqrt(p * (1 - p) / n + z2 / (4 * n * n))
    return (max(0.0, centre - half), min(1.0, centre + half))


def cluster_bootstrap_ci(
    items: Sequence[tuple[Hashable, bool]], *, seed: int = 0, n_boot: int = 2000, level: float = 0.95
) -> tuple[float, float]:
    """Percentile bootstrap interval of a rate, resampling whole clusters (source sentences).

    ``items`` are ``(cluster_id, success)``; the rate is total successes / total items of the
    resampled clusters. Seeded, so the same input gives the same interval.
    """
    if not items:
        return (0.0, 0.0)
    groups: dict[Hashable, list[int]] = defaultdict(lambda: [0, 0])
    for cid, ok in items:
        g = groups[cid]
        g[0] += int(bool(ok))
        g[1] += 1
    counts = list(groups.values())
    m = len(counts)
    rng = random.Random(seed)
    rates = []
    for _ in range(n_boot):
        k = n = 0
        for _j in range(m):
            a, b = counts[rng.randrange(m)]
            k += a
            n += b
        rates.append(k / n)
    rates.sort()
    lo_i = int(math.floor((1 - level) / 2 * n_boot))
    hi_i = min(n_boot - 1, int(math.ceil((1 + level) / 2 * n_boot)) - 1)
    return (rates[lo_i], rates[hi_i])
