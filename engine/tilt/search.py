"""The schedule search on arrays: periods from switch days, a schedule's daily values,
the exhaustive two-period and lattice four-period searches and the local search for
a non-separable objective; MM-DD dates and day indices. No sky, no site.
"""

from __future__ import annotations

import functools
import itertools

import numpy as np
import pandas as pd


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


def _two_period_totals(cum2_t, total_all, n_days, lengths):
    """Two-period totals ``(len(lengths), n_days)``: row ``j``, column ``i`` is the best
    tilt's sum over ``[i, i + lengths[j])`` (cyclic) plus the best over the rest.

    ``cum2_t`` holds the two-year cumulative sums tilt by tilt (``(n_tilts, 2 n_days
    + 1)``, C order). Each length's segment sums are computed into the same two
    buffers (slices, no gathering), so they stay in cache, and the best tilt is a
    running maximum down the tilt rows.
    """
    start = cum2_t[:, :n_days]
    seg_a, seg_b = np.empty_like(start), np.empty_like(start)
    tot = np.empty((len(lengths), n_days))
    best_b = np.empty(n_days)
    for j, length in enumerate(lengths):
        np.subtract(cum2_t[:, length:length + n_days], start, out=seg_a)
        np.subtract(total_all[:, None], seg_a, out=seg_b)
        np.maximum.reduce(seg_a, axis=0, out=tot[j])
        np.maximum.reduce(seg_b, axis=0, out=best_b)
        tot[j] += best_b
    return tot


def _two_period_exhaustive(cum, n_days, min_days, stride=4):
    """Exhaustive search of two switch days and their best tilts.

    A two-period split is one period ``[s1, s1 + length)`` (cyclic) and the
    rest; a length and its complement give the same splits, so lengths up to
    half the year cover every split once. The first best split, lengths
    ascending and then start days, is kept, as a loop keeping only strictly
    better totals would.

    Bounded, with the same result bit for bit: every split is first scored on
    every ``stride``-th tilt column (a lower bound of its total, the same
    arithmetic on fewer columns). Each skipped column ``t`` between kept columns
    ``s1 < t < s2`` is ``lam x D[s1] + (1 - lam) x D[s2] + c[t]`` day by day
    (``lam`` from the tilt positions), so any period's sum at ``t`` is at most the
    best kept column's plus the period's sum of ``e = max_t c[t]`` (at least 0);
    both periods together gain at most the year's sum of ``e``. Splits whose
    lower bound falls short of the best lower bound by more than that (and a
    rounding margin) cannot be best; the rest are scored on every column exactly
    as the plain search scores them.
    """
    total_all = cum[n_days]
    cum2 = np.vstack([cum, total_all[None, :] + cum[1:]])   # cumulative over two years
    lengths = np.arange(min_days, n_days // 2 + 1)
    n_t = cum.shape[1]
    kept = np.unique(np.r_[np.arange(0, n_t, stride), n_t - 1])
    lower = _two_period_totals(np.ascontiguousarray(cum2[:, kept].T), total_all[kept], n_days,
                               lengths)
    daily = np.diff(cum, axis=0)                             # (n_days, n_t)
    cols = np.arange(n_t)
    hi = np.searchsorted(kept, cols)                         # kept[hi] >= column
    lo = np.where(kept[hi] == cols, hi, hi - 1)
    span = (kept[hi] - kept[lo]).astype(float)
    lam = np.where(span > 0, (kept[hi] - cols) / np.where(span > 0, span, 1.0), 1.0)
    resid = daily - (lam * daily[:, kept[lo]] + (1.0 - lam) * daily[:, kept[hi]])
    excess = float(np.maximum(resid.max(axis=1), 0.0).sum())
    margin = 1e-9 * float(np.abs(cum).max())
    cand_l, cand_i = np.nonzero(lower >= lower.max() - excess - margin)
    seg_a = cum2[lengths[cand_l] + cand_i] - cum2[cand_i]
    seg_b = total_all[None, :] - seg_a
    cand_tot = seg_a.max(axis=1) + seg_b.max(axis=1)
    best = float(cand_tot.max())
    first = int(np.flatnonzero(cand_tot == best)[0])        # candidates in (length, start) order
    i, length = int(cand_i[first]), int(lengths[cand_l[first]])
    best_sw = sorted([i, (i + length) % n_days])
    tilts, total = _best_tilts_separable(cum, best_sw, n_days)
    return best_sw, tilts, total


@functools.lru_cache(maxsize=8)
def _lattice_combos(n_days: int, k: int, lattice: int, min_days: int) -> np.ndarray:
    """Sorted k-combinations of the lattice days (as indices into the lattice), in
    ``itertools.combinations`` order, with every cyclic gap at least ``min_days``."""
    grid = np.arange(0, n_days, lattice)
    combos = np.array(list(itertools.combinations(range(grid.size), k)), dtype=np.intp)
    days = grid[combos]
    gaps = np.diff(np.concatenate([days, days[:, :1] + n_days], axis=1), axis=1)
    out = combos[gaps.min(axis=1) >= min_days]
    out.setflags(write=False)
    return out


def _lattice_totals(cum, grid, combos, n_days):
    """:func:`_best_tilts_separable`'s total for each row of ``combos`` (sorted indices
    into the lattice days ``grid``), all rows at once.

    The best segment sum between every pair of lattice days is tabled once, with the
    same arithmetic (``cum[b] - cum[a]`` forward, ``(cum[n] - cum[a]) + cum[b]`` round
    the year's end, the maximum over the tilts), and the periods' maxima are added in
    the same order, so each total equals the one-by-one value bit for bit.
    """
    c = cum[grid]                                           # (g, n_tilts)
    forward = (c[None, :, :] - c[:, None, :]).max(axis=2)   # [a, b]: from a to b
    wrap = ((cum[n_days][None, None, :] - c[:, None, :]) + c[None, :, :]).max(axis=2)
    k = combos.shape[1]
    total = np.zeros(combos.shape[0])
    for i in range(k):
        a, b = combos[:, i], combos[:, (i + 1) % k]
        total = total + (forward[a, b] if i < k - 1 else wrap[a, b])
    return total


def _k_period_search(cum, n_days, k, min_days, lattice=14):
    """K switch days: exhaustive on a lattice, then refined to the day.

    Every lattice combination is scored at once (:func:`_lattice_totals`); the
    first best, in the order of ``itertools.combinations``, is kept, as a loop
    keeping only strictly better totals would.
    """
    grid = np.arange(0, n_days, lattice)
    combos = _lattice_combos(n_days, k, lattice, min_days)
    best_sw = None
    best_total = -np.inf
    if combos.shape[0]:
        totals = _lattice_totals(cum, grid, combos, n_days)
        i = int(np.argmax(totals))
        best_total, best_sw = float(totals[i]), grid[combos[i]].tolist()
    deltas = [d for d in range(-lattice, lattice + 1) if d != 0]
    improved = True
    while improved:
        improved = False
        for i in range(k):
            start = 0
            while start < len(deltas):
                # every remaining move of switch i scored at once; the first strictly
                # better one is taken and the moves after it are scored again from it
                tried = deltas[start:]
                totals, valid = _moved_totals(cum, best_sw, i, tried, n_days, min_days)
                better = np.flatnonzero(valid & (totals > best_total + 1e-12))
                if better.size == 0:
                    break
                j = int(better[0])
                trial = best_sw.copy()
                trial[i] = (trial[i] + tried[j]) % n_days
                best_total, best_sw, improved = float(totals[j]), sorted(trial), True
                start += j + 1
    tilts, total = _best_tilts_separable(cum, best_sw, n_days)
    return best_sw, tilts, total


def _moved_totals(cum, switches, i, deltas, n_days, min_days):
    """:func:`_best_tilts_separable`'s total with switch ``i`` moved by each of ``deltas``
    (the others kept), and whether each moved schedule is allowed (distinct switch days,
    every gap at least ``min_days``).

    Each total adds the periods' best segment sums in period order from 0.0, as the
    one-by-one function does, so it is the same number.
    """
    base = np.asarray(switches, dtype=np.intp)
    k = base.size
    trials = np.repeat(base[None, :], len(deltas), axis=0)
    trials[:, i] = (trials[:, i] + np.asarray(deltas, dtype=np.intp)) % n_days
    srt = np.sort(trials, axis=1)
    gaps = np.diff(np.concatenate([srt, srt[:, :1] + n_days], axis=1), axis=1)
    valid = (gaps.min(axis=1) >= min_days) & (np.diff(srt, axis=1) > 0).all(axis=1)
    total = np.zeros(len(deltas))
    for p in range(k):
        a, b = srt[:, p], srt[:, (p + 1) % k]
        fwd = cum[b] - cum[a]
        wrap = (cum[n_days][None, :] - cum[a]) + cum[b]
        seg = np.where((b > a)[:, None], fwd, wrap)
        total = total + seg.max(axis=1)
    return total, valid


def _day_tilts(switches, tilt_idx, n_days) -> np.ndarray:
    """Each day's tilt column under a schedule (see :func:`_schedule_daily`)."""
    out = np.empty(n_days, dtype=np.intp)
    for (a, b), t in zip(_periods_from_switches(switches, n_days), tilt_idx, strict=True):
        if b > a:
            out[a:b] = t
        else:
            out[a:] = t
            out[:b] = t
    return out


def _schedule_scores(monthly_rows: np.ndarray, opts, active=None) -> np.ndarray:
    """:func:`_score_monthly` of each schedule, from ``(n, 12)`` monthly rows.

    Bit for bit what ``_score_monthly`` gives for each schedule alone as a
    ``(12, 1)`` column: numpy sums a contiguous run of values pairwise, and each
    row here is one contiguous run, as that column is.
    """
    if opts.objective == "annual":
        return monthly_rows.sum(axis=1)
    if opts.objective == "worst-month":
        act = np.ones(12, dtype=bool) if active is None else np.asarray(active, dtype=bool)
        return monthly_rows[:, act].min(axis=1) + 1e-6 * monthly_rows.sum(axis=1)
    idx = np.asarray(sorted({int(m) for m in opts.months})) - 1
    return np.ascontiguousarray(monthly_rows[:, idx]).sum(axis=1)


def _improve_for_objective(daily, switches, tilts, month_of_day, opts, n_days, min_days,
                           active=None):
    """Local search on tilts and switch days for a non-separable objective.

    Greedy: each period's tilt in turn, then each switch day moved by 1, 3 or 7
    days either way, keeping any strictly better schedule, until nothing
    improves. The tilts of one period are scored together (the other periods
    stay as they are while that period's tilt is tried), then accepted in the
    order a one-by-one scan would.
    """
    daily = np.asarray(daily, dtype=float)
    month = np.asarray(month_of_day, dtype=np.intp) - 1
    rows = np.arange(n_days)
    n_t = daily.shape[1]
    daily_t = np.ascontiguousarray(daily.T)                     # (tilt, day)
    bins = (np.arange(n_t)[:, None] * 12 + month[None, :]).ravel()

    def score(sw, tl):
        d = daily[rows, _day_tilts(sw, tl, n_days)]
        m = np.bincount(month, weights=d, minlength=12)
        return float(_schedule_scores(m[None, :], opts, active)[0])

    def scores(cands):
        """:func:`score` of several ``(_, switches, tilts)`` at once: bin (schedule,
        month) takes its days in day order, as a bincount of one schedule does."""
        d = np.stack([daily[rows, _day_tilts(c[1], c[2], n_days)] for c in cands])
        b = (np.arange(len(cands))[:, None] * 12 + month[None, :]).ravel()
        m = np.bincount(b, weights=d.ravel(), minlength=12 * len(cands))
        return _schedule_scores(m.reshape(len(cands), 12), opts, active)

    def scores_of_period(sw, tl, p):
        """Scores with period ``p`` at every tilt column, the others as in ``tl``."""
        day_t = _day_tilts(sw, tl, n_days)
        a, b = _periods_from_switches(sw, n_days)[p]
        in_p = np.zeros(n_days, dtype=bool)
        in_p[_period_days(a, b, n_days)] = True
        base = daily[rows, day_t]
        # one bincount for every tilt column: bin (t, month) takes its days in day
        # order, as a bincount of column t alone does
        trial = np.where(in_p[None, :], daily_t, base[None, :])
        monthly = np.bincount(bins, weights=trial.ravel(), minlength=n_t * 12)
        return _schedule_scores(monthly.reshape(n_t, 12), opts, active)

    best = score(switches, tilts)
    sw, tl = list(switches), list(tilts)
    improved = True
    while improved:
        improved = False
        for p in range(len(tl)):
            v_all = scores_of_period(sw, tl, p)
            for t in range(n_t):
                if t == tl[p]:
                    continue
                v = float(v_all[t])
                if v > best + 1e-12:
                    trial = tl.copy()
                    trial[p] = t
                    best, tl, improved = v, trial, True
        for i in range(len(sw)):
            moves = list(_SWITCH_MOVES)
            while moves:
                # the remaining moves of switch i scored at once; the first strictly
                # better one is taken and the moves after it scored again from it
                cands = _moved_schedules(sw, tl, i, moves, n_days, min_days)
                if not cands:
                    break
                v_all = scores(cands)
                better = [j for j, v in enumerate(v_all) if float(v) > best + 1e-12]
                if not better:
                    break
                j = better[0]
                best, sw, tl, improved = float(v_all[j]), cands[j][1], cands[j][2], True
                moves = moves[cands[j][0] + 1:]
    return sw, tl


#: How far the local search moves a switch day, in the order it tries them.
_SWITCH_MOVES = (-7, -3, -1, 1, 3, 7)


def _moved_schedules(sw, tl, i, moves, n_days, min_days) -> list:
    """``(move index, switches, tilts)`` for each allowed move of switch ``i`` (sorted
    switch days, distinct, every gap at least ``min_days``; tilts following their
    periods)."""
    out = []
    for j, delta in enumerate(moves):
        trial = list(sw)
        trial[i] = (trial[i] + delta) % n_days
        srt = sorted(trial)
        if len(set(srt)) < len(srt):
            continue
        if np.diff(srt + [srt[0] + n_days]).min() < min_days:
            continue
        order = np.argsort(trial)
        out.append((j, srt, [tl[k] for k in order]))
    return out
