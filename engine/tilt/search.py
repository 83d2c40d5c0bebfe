"""The schedule search on arrays: periods from switch days, a schedule's daily values,
the exhaustive two-period and lattice four-period searches and the local search for
a non-separable objective; MM-DD dates and day indices. No sky, no site.
"""

from __future__ import annotations

import itertools

import numpy as np
import pandas as pd

from .options import _monthly_from_daily, _score_monthly


def _mmdd(year: int, day_index: int) -> str:
    return (pd.Timestamp(year, 1, 1) + pd.Timedelta(days=int(day_index))).strftime("%m-%d")


def _day_from_mmdd(year: int, text: str) -> int:
    try:
        ts = pd.Timestamp(f"{year}-{text}")
    except ValueError:
        raise ValueError(f"switch date {text!r}: expected MM-DD") from None
    return int(ts.day_of_year) - 1


# -- schedule search --------------------------------------------------------------

def _periods_from_switches(switches, n_days):
    """Cyclic periods [s_i, s_{i+1}) from sorted switch days."""
    s = list(switches)
    return [(s[i], s[(i + 1) % len(s)]) for i in range(len(s))]


def _period_days(a, b, n_days):
    return np.arange(a, b) if b > a else np.r_[np.arange(a, n_days), np.arange(0, b)]


def _schedule_daily(daily: np.ndarray, switches, tilt_idx, n_days) -> np.ndarray:
    """Daily irradiation of a schedule (tilt column per period)."""
    out = np.empty(n_days)
    for (a, b), t in zip(_periods_from_switches(switches, n_days), tilt_idx, strict=True):
        d = _period_days(a, b, n_days)
        out[d] = daily[d, t]
    return out


def _best_tilts_separable(cum, switches, n_days):
    """Best tilt per period and the total, for a separable (weighted-sum) objective."""
    total = 0.0
    tilts = []
    for a, b in _periods_from_switches(switches, n_days):
        seg = cum[b] - cum[a] if b > a else (cum[n_days] - cum[a]) + cum[b]
        t = int(np.argmax(seg))
        tilts.append(t)
        total += float(seg[t])
    return tilts, total


def _two_period_exhaustive(cum, n_days, min_days):
    """Exhaustive search of two switch days and their best tilts.

    A two-period split is one period ``[s1, s1 + length)`` (cyclic) and the
    rest; a length and its complement give the same splits, so lengths up to
    half the year cover every split once.
    """
    total_all = cum[n_days]
    cum2 = np.vstack([cum, total_all[None, :] + cum[1:]])   # cumulative over two years
    s1 = np.arange(n_days)
    best_total, best_sw = -np.inf, None
    for length in range(min_days, n_days // 2 + 1):
        seg_a = cum2[s1 + length] - cum2[s1]
        seg_b = total_all[None, :] - seg_a
        tot = seg_a.max(axis=1) + seg_b.max(axis=1)
        i = int(np.argmax(tot))
        if tot[i] > best_total:
            best_total = float(tot[i])
            best_sw = sorted([int(s1[i]), int((s1[i] + length) % n_days)])
    tilts, total = _best_tilts_separable(cum, best_sw, n_days)
    return best_sw, tilts, total


def _k_period_search(cum, n_days, k, min_days, lattice=14):
    """K switch days: exhaustive on a lattice, then refined to the day."""
    grid = np.arange(0, n_days, lattice)
    best_total, best_sw = -np.inf, None
    for combo in itertools.combinations(grid.tolist(), k):
        gaps = np.diff(list(combo) + [combo[0] + n_days])
        if gaps.min() < min_days:
            continue
        _, tot = _best_tilts_separable(cum, combo, n_days)
        if tot > best_total:
            best_total, best_sw = tot, list(combo)
    improved = True
    while improved:
        improved = False
        for i in range(k):
            for delta in range(-lattice, lattice + 1):
                if delta == 0:
                    continue
                trial = best_sw.copy()
                trial[i] = (trial[i] + delta) % n_days
                if len(set(trial)) < k:
                    continue
                srt = sorted(trial)
                gaps = np.diff(srt + [srt[0] + n_days])
                if gaps.min() < min_days:
                    continue
                _, tot = _best_tilts_separable(cum, srt, n_days)
                if tot > best_total + 1e-12:
                    best_total, best_sw, improved = tot, srt, True
    tilts, total = _best_tilts_separable(cum, best_sw, n_days)
    return best_sw, tilts, total


def _improve_for_objective(daily, switches, tilts, month_of_day, opts, n_days, min_days,
                           active=None):
    """Local search on tilts and switch days for a non-separable objective."""
    def score(sw, tl):
        d = _schedule_daily(daily, sw, tl, n_days)
        return float(_score_monthly(_monthly_from_daily(d[:, None], month_of_day), opts,
                                    active)[0])

    best = score(switches, tilts)
    sw, tl = list(switches), list(tilts)
    improved = True
    n_t = daily.shape[1]
    while improved:
        improved = False
        for p in range(len(tl)):
            for t in range(n_t):
                if t == tl[p]:
                    continue
                trial = tl.copy()
                trial[p] = t
                v = score(sw, trial)
                if v > best + 1e-12:
                    best, tl, improved = v, trial, True
        for i in range(len(sw)):
            for delta in (-7, -3, -1, 1, 3, 7):
                trial = sw.copy()
                trial[i] = (trial[i] + delta) % n_days
                srt = sorted(trial)
                if len(set(srt)) < len(srt):
                    continue
                if np.diff(srt + [srt[0] + n_days]).min() < min_days:
                    continue
                order = np.argsort(trial)
                v = score(srt, [tl[j] for j in order])
                if v > best + 1e-12:
                    best, sw, tl, improved = v, srt, [tl[j] for j in order], True
    return sw, tl
