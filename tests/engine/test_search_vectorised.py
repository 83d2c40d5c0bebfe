"""The vectorised schedule search gives the schedules a one-by-one scan gives.

The references here are the plain loops (every lattice combination scored by
``_best_tilts_separable``; the local search trying one tilt at a time, each month
summed with ``np.add.at``). The inputs are smooth synthetic daily tables; what is
checked is that two ways of computing agree, not any value of them.
"""

import itertools
from types import SimpleNamespace

import numpy as np
import pytest

from tiltyard.engine.manyplane import sum_by_month
from tiltyard.engine.tilt import search
from tiltyard.engine.tilt.options import _score_monthly

N_DAYS = 365
MONTH = np.repeat(np.arange(1, 13), [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31])


def _daily(seed, n_t=46):
    rng = np.random.default_rng(seed)
    doy = np.arange(N_DAYS)
    opt = rng.uniform(10, 40) + 20 * np.cos(2 * np.pi * (doy + 10) / N_DAYS)
    tilts = np.arange(n_t) * 2.0
    return 6 - 0.002 * (tilts[None, :] - opt[:, None]) ** 2 + rng.normal(0, 0.01, (N_DAYS, n_t))


@pytest.mark.parametrize("order", ["C", "F"])
@pytest.mark.parametrize("shape", [(N_DAYS,), (N_DAYS, 1), (N_DAYS, 3), (N_DAYS, 200)])
def test_sum_by_month_is_add_at_bit_for_bit(shape, order):
    # "F": a grid's daily table, stored plane by plane
    d = np.asarray(np.random.default_rng(1).random(shape) * 7, order=order)
    ref = np.zeros((12,) + shape[1:])
    np.add.at(ref, MONTH - 1, d)
    np.testing.assert_array_equal(sum_by_month(d, MONTH), ref)
    assert sum_by_month(d, MONTH).tobytes() == ref.tobytes()


def test_sum_by_month_days_out_of_month_order():
    # days not in month order: the sums are add.at's all the same
    month = np.roll(MONTH, 40)
    d = np.asfortranarray(np.random.default_rng(2).random((N_DAYS, 50)))
    ref = np.zeros((12, 50))
    np.add.at(ref, month - 1, d)
    assert sum_by_month(d, month).tobytes() == ref.tobytes()


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_lattice_totals_match_the_loop(seed):
    daily = _daily(seed)
    cum = np.vstack([np.zeros(daily.shape[1]), np.cumsum(daily, axis=0)])
    grid = np.arange(0, N_DAYS, 14)
    best, best_sw = -np.inf, None
    for combo in itertools.combinations(grid.tolist(), 4):
        if np.diff(list(combo) + [combo[0] + N_DAYS]).min() < 30:
            continue
        _, tot = search._best_tilts_separable(cum, combo, N_DAYS)
        if tot > best:
            best, best_sw = tot, list(combo)
    combos = search._lattice_combos(N_DAYS, 4, 14, 30)
    totals = search._lattice_totals(cum, grid, combos, N_DAYS)
    i = int(np.argmax(totals))
    assert grid[combos[i]].tolist() == best_sw
    assert totals[i] == best


def _improve_one_by_one(daily, switches, tilts, opts, min_days, active):
    def score(sw, tl):
        d = search._schedule_daily(daily, sw, tl, N_DAYS)
        m = np.zeros((12, 1))
        np.add.at(m, MONTH - 1, d[:, None])
        return float(_score_monthly(m, opts, active)[0])

    best, sw, tl = score(switches, tilts), list(switches), list(tilts)
    improved = True
    while improved:
        improved = False
        for p in range(len(tl)):
            for t in range(daily.shape[1]):
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
                trial[i] = (trial[i] + delta) % N_DAYS
                srt = sorted(trial)
                if len(set(srt)) < len(srt) or np.diff(srt + [srt[0] + N_DAYS]).min() < min_days:
                    continue
                order = np.argsort(trial)
                v = score(srt, [tl[j] for j in order])
                if v > best + 1e-12:
                    best, sw, tl, improved = v, srt, [tl[j] for j in order], True
    return sw, tl


@pytest.mark.parametrize("objective,months", [("worst-month", ()), ("annual", ()),
                                              ("months", (11, 12, 1, 2, 3, 4, 5, 6, 7))])
def test_local_search_matches_one_by_one(objective, months):
    opts = SimpleNamespace(objective=objective, months=months)
    for seed in (3, 4):
        daily = _daily(seed)
        cum = np.vstack([np.zeros(daily.shape[1]), np.cumsum(daily, axis=0)])
        sw, tl, _ = search._k_period_search(cum, N_DAYS, 4, 30)
        active = np.ones(12, dtype=bool)
        active[seed] = False
        want = _improve_one_by_one(daily, sw, tl, opts, 30, active)
        got = search._improve_for_objective(daily, sw, tl, MONTH, opts, N_DAYS, 30, active)
        assert (list(got[0]), list(got[1])) == (list(want[0]), list(want[1]))
        if objective == "worst-month":      # the search has moved the schedule
            assert (list(got[0]), list(got[1])) != (list(sw), list(tl))


def _two_period_by_gathering(cum, n_days, min_days):
    """The two-period search as a plain loop with gathered segment sums."""
    total_all = cum[n_days]
    cum2 = np.vstack([cum, total_all[None, :] + cum[1:]])
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
    return best_sw, best_total


@pytest.mark.parametrize("seed", [0, 1, 2])
@pytest.mark.parametrize("min_days", [1, 30, 90])
def test_two_period_search_matches_the_loop(seed, min_days):
    daily = _daily(seed)
    cum = np.vstack([np.zeros(daily.shape[1]), np.cumsum(daily, axis=0)])
    ref_sw, ref_total = _two_period_by_gathering(cum, N_DAYS, min_days)
    sw, tilts, total = search._two_period_exhaustive(cum, N_DAYS, min_days)
    assert sw == ref_sw
    assert total == search._best_tilts_separable(cum, ref_sw, N_DAYS)[1]
    assert max(ref_total, total) > 0


def _two_period_one_by_one(cum, n_days, min_days):
    """The plain two-period search: every length, every start, every tilt column; the
    first strictly better total kept (lengths ascending, then starts)."""
    total_all = cum[n_days]
    cum2 = np.vstack([cum, total_all[None, :] + cum[1:]])
    best, best_sw = -np.inf, None
    for length in range(min_days, n_days // 2 + 1):
        seg_a = cum2[length:length + n_days] - cum2[:n_days]
        tot = seg_a.max(axis=1) + (total_all[None, :] - seg_a).max(axis=1)
        i = int(np.argmax(tot))
        if tot[i] > best:
            best, best_sw = float(tot[i]), sorted([i, (i + length) % n_days])
    return best_sw


@pytest.mark.parametrize("n_t", [1, 3, 9, 46, 91])
@pytest.mark.parametrize("seed", [0, 1, 2, 3])
def test_two_period_bounded_search_matches_the_loop(seed, n_t):
    # smooth tables, noisy tables (the bound's excess is large) and a table with ties
    daily = _daily(seed, n_t)
    if seed == 2:
        daily = daily + np.random.default_rng(5).normal(0, 0.5, daily.shape)
    if seed == 3:
        daily = np.round(daily, 1)
    cum = np.vstack([np.zeros(daily.shape[1]), np.cumsum(daily, axis=0)])
    sw, tilts, total = search._two_period_exhaustive(cum, N_DAYS, 30)
    assert sw == _two_period_one_by_one(cum, N_DAYS, 30)
    assert (tilts, total) == search._best_tilts_separable(cum, sw, N_DAYS)


def _k_period_one_by_one(cum, n_days, k, min_days, lattice=14):
    """The plain K-period search: lattice combinations one by one, then each switch
    moved by each day in turn, every move scored alone."""
    best, best_sw = -np.inf, None
    for combo in itertools.combinations(range(0, n_days, lattice), k):
        if np.diff(list(combo) + [combo[0] + n_days]).min() < min_days:
            continue
        _, tot = search._best_tilts_separable(cum, combo, n_days)
        if tot > best:
            best, best_sw = tot, list(combo)
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
                if np.diff(srt + [srt[0] + n_days]).min() < min_days:
                    continue
                _, tot = search._best_tilts_separable(cum, srt, n_days)
                if tot > best + 1e-12:
                    best, best_sw, improved = tot, srt, True
    return best_sw, best


@pytest.mark.parametrize("min_days", [14, 30, 60])
@pytest.mark.parametrize("seed", [0, 1, 2, 3])
def test_k_period_search_matches_the_loop(seed, min_days):
    daily = _daily(seed, 41)
    if seed == 2:
        daily = daily + np.random.default_rng(7).normal(0, 0.3, daily.shape)
    if seed == 3:
        daily = np.round(daily, 1)
    cum = np.vstack([np.zeros(daily.shape[1]), np.cumsum(daily, axis=0)])
    ref_sw, ref_total = _k_period_one_by_one(cum, N_DAYS, 4, min_days)
    sw, tilts, total = search._k_period_search(cum, N_DAYS, 4, min_days)
    assert sw == ref_sw
    assert total == ref_total
    assert (tilts, total) == search._best_tilts_separable(cum, sw, N_DAYS)
