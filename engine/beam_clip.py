"""The beam's sign-change corrections on a tilt x azimuth grid, and their reuse.

:func:`tiltyard.engine.manyplane` sums the beam on a grid of planes without the
clip of ``max(cos aoi, 0)`` and then takes off (or adds) the part past each
(node, azimuth) pair's sign-change tilt: :func:`clip_parts` computes those
parts for one chunk of periods. A second pass over the same grid, periods and
nodes whose weights agree on the first pass's nodes (the open-horizon grid of
a study after the site's grid: the same nodes, with those the horizon hides
added) takes the first pass's parts from a :class:`ClipReuse` and computes only
the nodes it adds. Sums grouped that way differ from one pass over every node
only by rounding (well under 1e-12 relative).
"""

from __future__ import annotations

import numpy as np

from .horizon import _count_below


def clip_parts(sun, day, weights, tilt_u, cg, sg, cosb_u, sinb_u, m):
    """The beam past each row's sign-change tilt, for one chunk of periods.

    ``sun`` (rows of ``ManyPlaneTerms.sun_vec``), ``day`` (each row's period,
    from the chunk's first) and ``weights`` (one array per result) are the
    chunk's rows; ``cg``, ``sg`` the cosines and sines of the grid's azimuths,
    ``cosb_u``, ``sinb_u`` of its tilts. Returns one ``(tilts, azimuths x m)``
    array per weight, to be added to the chunk's unclipped sums (tilt-major),
    or None when no pair changes sign.

    References
    ----------
    pvlib.irradiance.beam_component and aoi_projection (Holmgren et al. 2018):
    the beam is ``dni max(cos aoi, 0)``; the sign analysis is plane
    trigonometry (common practice, no source), as in
    :func:`tiltyard.engine.manyplane._beam_grid`.
    """
    n_t, n_u = tilt_u.size, cg.size
    cz = sun[:, 0]
    sgn = np.where(cz > 0.0, -1.0, 1.0)
    vs = (sun[:, 1] * sgn)[:, None] * cg[None, :]
    vs += (sun[:, 2] * sgn)[:, None] * sg[None, :]
    pos = vs > 0.0
    keep = np.flatnonzero(pos)
    if keep.size == 0:
        return None
    # the kept pairs row by row: each row's values repeated over its kept azimuths
    counts = np.count_nonzero(pos, axis=1)
    den = vs.ravel()[keep]
    acz = np.repeat(np.abs(cz), counts)
    col = keep - np.repeat(np.arange(sun.shape[0]) * n_u, counts)
    # sun above: positive below b* (first tilt not below it); sun below: above b*.
    # p = n_t (no sign change within the tilts) goes to a spare row
    p = _count_below(tilt_u, np.degrees(np.arctan(acz / den)),
                     inclusive=np.repeat(cz <= 0.0, counts))
    base = (p * n_u + col) * m + np.repeat(day, counts)
    size = (n_t + 1) * n_u * m
    out = []
    for w in weights:
        # the part past b*, to be taken off (sun above) or added (sun below):
        # -w |cos z| for the cos b factor and w |v| for the sin b factor, each
        # summed pair by pair in row order, then run over the tilts in place
        wr = np.repeat(w, counts)
        part = np.bincount(base, weights=-(wr * acz), minlength=size).reshape(n_t + 1, -1)
        part_sin = np.bincount(base, weights=wr * den, minlength=size).reshape(n_t + 1, -1)
        for i in range(1, n_t):
            part[i] += part[i - 1]
            part_sin[i] += part_sin[i - 1]
        part = part[:n_t]
        part *= cosb_u[:, None]
        part_sin = part_sin[:n_t]
        part_sin *= sinb_u[:, None]
        part += part_sin
        out.append(part.reshape(n_t * n_u, m))
    return out


class ClipReuse:
    """One grid pass's clip parts (one weight), for a later pass over the same grid.

    :meth:`kept_rows` says which of a later pass's rows the kept parts cover: all
    of the kept rows, when the grid, periods, chunks and sun positions are the same
    and the later pass has every kept row with the same weight bit for bit;
    otherwise none. Mutable, so a study keeps one per grid (not shared between
    threads).
    """

    def __init__(self):
        self._key = None
        self._sun = None
        self._rows = None
        self._w = None
        self.parts = {}

    def _same(self, key, sun) -> bool:
        if self._key is None or len(key) != len(self._key):
            return False
        return (all(np.array_equal(a, b) for a, b in zip(key, self._key, strict=True))
                and np.array_equal(sun, self._sun))

    def kept_rows(self, key, sun, weights, rows) -> np.ndarray:
        """Boolean mask over ``rows`` (ascending) of the rows whose parts are kept."""
        none = np.zeros(rows.size, dtype=bool)
        if len(weights) != 1 or self._rows is None or not self._same(key, sun):
            return none
        if self._rows.size == 0 or rows.size == 0:
            return none
        pos = np.searchsorted(rows, self._rows)
        if pos.max() >= rows.size or not np.array_equal(rows[pos], self._rows):
            return none
        if not np.array_equal(weights[0][self._rows], self._w):
            return none
        none[pos] = True
        return none

    def start(self, key, sun, weights, rows) -> bool:
        """Forget the kept parts and keep this pass's (True when it has one weight)."""
        self.parts = {}
        if len(weights) != 1:
            self._key = self._rows = None
            return False
        self._key = tuple(np.array(k, copy=True) for k in key)
        self._sun = np.array(sun, copy=True)
        self._rows = np.array(rows, copy=True)
        self._w = np.array(weights[0][rows], copy=True)
        return True
