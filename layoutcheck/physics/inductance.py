"""Partial inductance of straight conductors and the inductance of a current loop.

Units: **millimetres in, henries out** (areas in mm^2, volts, amperes, seconds, farads
for the consequence helpers).  Thin ``*_si`` helpers take metres.  The constant used is
``mu0 / (4 pi) = 1e-7 H/m = 1e-10 H/mm`` (the SI value since 2019 differs by 5.5e-10).

Model (partial element equivalent circuit, low frequency, uniform current density)
    A loop is a closed chain of straight :class:`Segment` s, each carrying the same
    current from ``start`` to ``end``.  Its inductance is::

        L = sum_i sum_j Lp_ij

    with ``Lp_ii`` the self partial inductance of segment ``i`` and ``Lp_ij`` the mutual
    partial inductance, which carries the sign of ``cos`` of the angle between the
    current directions (Neumann: ``dl_i . dl_j``), so reversed segments subtract.
    Orthogonal segments have ``Lp_ij = 0`` exactly (their current elements are
    perpendicular everywhere).  Ruehli (1972) and Hoer & Love (1965) give the closed forms;
    :mod:`layoutcheck.physics.inductance_kernels` holds them with their derivations.

Which formula a pair gets (and how accurate it is)
    * bars (rectangular cross-section), parallel, cross-sections aligned, centre lines
      closer than ``NEAR_RATIO`` times the sum of their half-diagonals: the exact Hoer &
      Love six-fold integral (series in the axial direction when long; rounding error
      tracked).  This includes a bar with itself, so self terms and pieces of one trace cut
      into many segments add up exactly.
    * other parallel pairs whose cross-sections do not overlap: Grover's parallel-filament
      formula between the centre lines, corrected to second order in the cross-section
      sizes (mean of ``G`` over the cross-sections by Taylor expansion).  Error below
      1e-3 of that term at ``NEAR_RATIO`` and falling as (size / distance)^4.  A near
      pair of very thin, wide and short pieces whose closed form would round worse than
      this also falls back to it (the rounding is estimated for every pair).
    * parallel round conductors on the same axis: the filament formula at the geometric
      mean distance (GMD) of the cross-section (Grover's GMD method): ``r e^-1/4`` for a
      solid round wire, ``r`` for a thin tube (a plated via barrel).  Self terms of round
      shapes use the same form, so a subdivided wire adds up exactly; against the exact
      uniform-current value the bracket ``ln(2l/r) - 3/4`` is off by ``(AMD - GMD) / l =
      0.127 r / l`` (0.03 % at ``l = 100 r``; AMD = mean distance across the section).
    * non-parallel, non-orthogonal pairs: Neumann's integral between the centre lines
      (filaments; inner integral exact, outer by fixed Gauss-Legendre nodes, about 1e-5),
      plus a cross-section correction: the parallel-pair value minus the filament value,
      both worked out with the two segments turned onto their bisector.  The correction
      is exact as the angle goes to 0 (a path of short chords along an arc then behaves
      like a bent bar, and a tiny kink changes nothing) and is an estimate of order
      ``mu0/(4 pi) * width`` per bend at larger angles, the usual partial-inductance
      corner approximation.

Also here (from :mod:`layoutcheck.physics.inductance_consequences`): the enclosed loop
area, the inductance the same path would have over a stacked return, and what an
inductance means for overshoot, ringing and the largest allowed value.

Vias are :class:`Segment` s with ``shape="tube"`` (plated barrel, current in a thin wall;
GMD = outer radius) or ``shape="round"`` (solid wire, GMD = ``r e^-1/4``); for round
shapes ``width`` is the diameter and ``thickness`` is ignored.
"""
from __future__ import annotations

import math
import os
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass

import numpy as np

from ..errors import UsageError
from . import inductance_kernels as kern
from .inductance_consequences import MU0, MU0_4PI, require_positive
from .inductance_consequences import (  # re-exported (see __all__)
    enclosed_area, max_inductance_for, overshoot_v, ringing_hz, stacked_return_inductance, z0)

__all__ = [
    "MU0", "MU0_4PI", "SHAPES", "Segment", "trace_segments", "via_segment",
    "bar_self_inductance", "rosa_bar_self_inductance", "round_wire_self_inductance",
    "rectangle_gmd", "parallel_filament_mutual", "filament_mutual",
    "segment_self_inductance", "segment_mutual", "partial_inductance_matrix",
    "loop_inductance", "enclosed_area", "stacked_return_inductance", "overshoot_v",
    "ringing_hz", "z0", "max_inductance_for", "bar_self_inductance_si",
    "round_wire_self_inductance_si", "stacked_return_inductance_si", "segment_from_metres",
]

#: Cross-section shapes understood by :class:`Segment`.
SHAPES = ("bar", "round", "tube")
#: Parallel aligned bars closer than this many summed half-diagonals use the exact form.
NEAR_RATIO = 3.0
#: A near pair keeps the closed form while its rounding estimate stays below this (or
#: below the filament form's own error, whichever is larger).
ROUNDING_LIMIT = 1e-8
#: Pairs processed per block in :func:`loop_inductance` (bounds memory).
BLOCK_PAIRS = 50_000
#: Threads used by :func:`loop_inductance` (numpy work releases the interpreter lock).
WORKERS = max(1, min(4, os.cpu_count() or 1))

_PAR_TOL = 1e-9     # |u_i x u_j| below this: parallel
_ORTH_TOL = 1e-12   # |u_i . u_j| below this: orthogonal


@dataclass(frozen=True)
class Segment:
    """A straight conductor carrying the loop current from ``start`` to ``end``.

    Parameters
    ----------
    start, end:
        Points ``(x, y, z)`` in mm on the conductor's axis (the centre of its
        cross-section).  For a board trace ``z`` is the middle of the copper.
    width:
        mm.  For a bar, the side lying along ``width_dir``; for ``"round"`` and ``"tube"``
        the outer diameter.
    thickness:
        mm, the other side of a bar (copper thickness for a trace).  Ignored for round
        shapes.
    shape:
        ``"bar"`` (rectangular cross-section, uniform current), ``"round"`` (solid round
        wire) or ``"tube"`` (thin-walled barrel such as a plated via).
    width_dir:
        Optional vector for the width side of a bar.  Default: in the board plane
        (perpendicular to z and to the segment); for a segment along z, the x axis.
    """

    start: tuple
    end: tuple
    width: float
    thickness: float = 0.035
    shape: str = "bar"
    width_dir: tuple | None = None

    def __post_init__(self):
        s = np.asarray(self.start, dtype=float)
        e = np.asarray(self.end, dtype=float)
        if s.shape != (3,) or e.shape != (3,) or not (np.all(np.isfinite(s))
                                                      and np.all(np.isfinite(e))):
            raise UsageError(f"segment ends must be finite (x, y, z) points in mm, got "
                             f"start={self.start!r}, end={self.end!r}")
        if np.linalg.norm(e - s) <= 0.0:
            raise UsageError(f"segment from {self.start!r} to {self.end!r} has zero length; "
                             "expected distinct end points")
        if self.shape not in SHAPES:
            raise UsageError(f"segment shape {self.shape!r} is not one of {', '.join(SHAPES)}")
        if not (math.isfinite(self.width) and self.width > 0):
            raise UsageError(f"segment width must be > 0 mm, got {self.width!r}")
        if self.shape == "bar" and not (math.isfinite(self.thickness) and self.thickness > 0):
            raise UsageError(f"bar thickness must be > 0 mm, got {self.thickness!r}")

    @property
    def length(self) -> float:
        """Length in mm."""
        return float(np.linalg.norm(np.subtract(self.end, self.start, dtype=float)))


def trace_segments(points, z: float, width: float, thickness: float = 0.035,
                   closed: bool = False) -> list[Segment]:
    """Bars along a polyline in a board layer.

    ``points`` are ``(x, y)`` in mm, ``z`` the mid-copper height in mm, ``width`` and
    ``thickness`` in mm.  With ``closed`` the last point joins the first.  Repeated points
    are skipped.
    """
    pts = np.asarray(points, dtype=float)
    if pts.ndim != 2 or pts.shape[1] != 2 or len(pts) < 2:
        raise UsageError(f"expected at least two (x, y) points in mm, got shape {pts.shape}")
    if closed:
        pts = np.vstack([pts, pts[:1]])
    out = []
    for a, b in zip(pts[:-1], pts[1:]):
        if np.hypot(*(b - a)) > 0:
            out.append(Segment((a[0], a[1], z), (b[0], b[1], z), width, thickness))
    return out


def via_segment(x: float, y: float, z_from: float, z_to: float, diameter: float,
                shape: str = "tube") -> Segment:
    """A via barrel from ``z_from`` to ``z_to`` at ``(x, y)`` (all mm); current flows
    from ``z_from`` to ``z_to``.  Default ``"tube"``: plated wall, GMD = radius."""
    return Segment((x, y, z_from), (x, y, z_to), diameter, shape=shape)


# --------------------------------------------------------------------------------------
# closed forms for single conductors
def bar_self_inductance(length: float, width: float, thickness: float) -> float:
    """Self partial inductance (H) of a straight rectangular bar, uniform current.

    Lengths in mm.  Exact: the Hoer & Love (1965) / Ruehli (1972) closed form of
    ``mu0/(4 pi A^2) * integral integral dV dV' / R``; for ``length`` above five times the
    cross-section diagonal the same integral is summed through its convergent series with
    Maxwell's exact GMD (truncation < 1e-7), because the closed form loses about
    ``log10(l^4 / (w^2 t^2))`` of its 16 digits there.
    """
    require_positive(length=length, width=width, thickness=thickness)
    v = kern.parallel_bars_integral(0.0, length, 0.0, length, 0.0, 0.0, width / 2,
                                    thickness / 2, width / 2, thickness / 2)
    return float(MU0_4PI * v[0])


def rosa_bar_self_inductance(length: float, width: float, thickness: float) -> float:
    """Rosa/Grover approximation for a rectangular bar (H), lengths in mm::

        L = (mu0 l / 2 pi) [ln(2 l / (w + t)) + 1/2 + 0.2235 (w + t) / l]

    Valid for ``l`` much larger than ``w + t`` (Grover 1946; E. B. Rosa, Bull. Bureau of
    Standards 4, 1908).  For comparison only; :func:`bar_self_inductance` is exact.
    """
    require_positive(length=length, width=width, thickness=thickness)
    s = width + thickness
    return MU0 * length / (2 * math.pi) * (math.log(2 * length / s) + 0.5 + 0.2235 * s / length)


def round_wire_self_inductance(length: float, radius: float, long_limit: bool = False) -> float:
    """Self partial inductance (H) of a straight solid round wire, uniform current.

    Lengths in mm.  Default: Grover's GMD method, the parallel-filament formula at the
    wire's GMD ``g = r e^(-1/4)``::

        L = (mu0 / 2 pi) [l asinh(l/g) - sqrt(l^2 + g^2) + g]

    With ``long_limit`` the textbook limit for ``l >> r`` (Rosa; Grover 1946)::

        L = (mu0 l / 2 pi) [ln(2 l / r) - 3/4]
    """
    require_positive(length=length, radius=radius)
    if long_limit:
        return MU0 * length / (2 * math.pi) * (math.log(2 * length / radius) - 0.75)
    g = radius * math.exp(-0.25)
    return MU0 / (2 * math.pi) * (length * math.asinh(length / g) - math.hypot(length, g) + g)


def rectangle_gmd(width: float, thickness: float) -> float:
    """Geometric mean distance (mm) of a ``width`` x ``thickness`` rectangle from itself.

    Exact (Maxwell's formula, Rosa & Grover 1912); about ``0.2235 (w + t)``.  Rounding
    costs about ``1e-16 (w/t)^2`` relative (1e-9 for 3 mm x 35 um copper).
    """
    require_positive(width=width, thickness=thickness)
    return float(np.exp(kern.log_gmd_rectangles(0.0, 0.0, width / 2, thickness / 2,
                                                width / 2, thickness / 2)))


def parallel_filament_mutual(length1: float, length2: float, distance: float,
                             offset: float = 0.0) -> float:
    """Mutual inductance (H) of two parallel filaments with currents in the same sense.

    Filament 1 spans ``[0, length1]``, filament 2 spans ``[offset, offset + length2]``
    along the common direction; their lines are ``distance`` apart (all mm).  Closed form
    of Neumann's integral (Grover 1946, parallel filaments of unequal lengths)::

        M = mu0/(4 pi) [G(b2-a1) - G(b2-b1) - G(a2-a1) + G(a2-b1)],
        G(u) = u asinh(u/d) - sqrt(u^2 + d^2)

    ``distance = 0`` is allowed for collinear filaments that do not overlap.
    """
    require_positive(length1=length1, length2=length2)
    if distance > 0:
        return float(MU0_4PI * kern.parallel_filament_integral(0.0, length1, offset,
                                                               offset + length2, distance))
    if distance == 0 and (offset >= length1 or offset + length2 <= 0):
        vals, sg = kern.span_offsets(0.0, length1, offset, offset + length2)
        return float(MU0_4PI * np.dot(sg, kern.g_collinear(np.atleast_1d(vals)).ravel()))
    raise UsageError(f"filaments at distance {distance!r} mm overlap or the distance is "
                     "negative; expected a distance > 0 or collinear filaments apart")


def filament_mutual(start1, end1, start2, end2) -> float:
    """Mutual inductance (H) of two straight filaments, current from start to end.

    Points ``(x, y, z)`` in mm.  Neumann's integral: closed form (Grover) for parallel
    filaments, 0 for orthogonal ones, inner-exact Gauss-Legendre quadrature otherwise.
    """
    p1, e1, p2, e2 = (np.asarray(v, dtype=float) for v in (start1, end1, start2, end2))
    d1, d2 = e1 - p1, e2 - p2
    l1, l2 = np.linalg.norm(d1), np.linalg.norm(d2)
    require_positive(length1=l1, length2=l2)
    u1, u2 = d1 / l1, d2 / l2
    cos = float(u1 @ u2)
    if np.linalg.norm(np.cross(u1, u2)) < _PAR_TOL:
        sgn = 1.0 if cos > 0 else -1.0
        rp, re = p2 - p1, e2 - p1
        sp, se = rp @ u1, re @ u1
        a2 = sp if sgn > 0 else se
        dist = float(np.linalg.norm(rp - sp * u1))
        if dist <= 1e-12 * max(l1, l2):
            dist = 0.0
        return sgn * parallel_filament_mutual(l1, l2, dist, a2)
    if abs(cos) < _ORTH_TOL:
        return 0.0
    v = kern.oblique_filament_integral(p1[None], d1[None], p2[None], d2[None])
    return float(MU0_4PI * cos * v[0])


# --------------------------------------------------------------------------------------
# segments, pairs and loops
class _Geo:
    """Segment data as arrays (mm)."""

    def __init__(self, segments):
        if len(segments) == 0:
            raise UsageError("expected at least one segment, got none")
        self.n = len(segments)
        self.P = np.array([s.start for s in segments], dtype=float)
        self.E = np.array([s.end for s in segments], dtype=float)
        d = self.E - self.P
        self.L = np.linalg.norm(d, axis=1)
        self.U = d / self.L[:, None]
        self.w = np.array([s.width for s in segments], dtype=float)
        self.t = np.array([s.thickness for s in segments], dtype=float)
        shape = np.array([SHAPES.index(s.shape) for s in segments])
        self.bar = shape == 0
        self.round = shape == 1
        self.tube = shape == 2
        wd = np.zeros((self.n, 3))
        for k, s in enumerate(segments):
            wd[k] = _width_dir(self.U[k], s.width_dir)
        self.WD = wd
        self.TD = np.cross(self.U, wd)
        r = self.w / 2
        self.ext = np.where(self.bar, np.hypot(self.w, self.t) / 2, r)
        self.gmd = np.where(self.round, r * math.exp(-0.25), r)      # round shapes only
        # second moments of the cross-section about its centre (mm^2)
        self.s_w = np.where(self.bar, self.w ** 2 / 12, np.where(self.round, r * r / 4, r * r / 2))
        self.s_t = np.where(self.bar, self.t ** 2 / 12, self.s_w)


def _width_dir(u, given):
    if given is None:
        zc = np.cross([0.0, 0.0, 1.0], u)
        if np.linalg.norm(zc) < 1e-9:
            return np.array([1.0, 0.0, 0.0])
        return zc / np.linalg.norm(zc)
    v = np.asarray(given, dtype=float)
    v = v - (v @ u) * u
    nv = np.linalg.norm(v)
    if not nv > 1e-9:
        raise UsageError(f"width_dir {given!r} is parallel to the segment; expected a "
                         "direction across it")
    return v / nv


def _pair_values(g: _Geo, i: np.ndarray, j: np.ndarray) -> np.ndarray:
    """Partial inductances Lp_ij (H) for index arrays ``i``, ``j`` (``i == j`` allowed)."""
    out = np.zeros(i.size)
    Ui, Uj = g.U[i], g.U[j]
    dot = np.einsum("ij,ij->i", Ui, Uj)
    cross = np.linalg.norm(np.cross(Ui, Uj), axis=1)
    par = (cross < _PAR_TOL) | (i == j)
    obl = ~par & (np.abs(dot) >= _ORTH_TOL)
    sgn = np.where(dot >= 0, 1.0, -1.0)
    if par.any():
        k = np.nonzero(par)[0]
        out[k] = MU0_4PI * sgn[k] * _parallel_core(g, i[k], j[k], Ui[k], sgn[k])
    obl_idx = np.nonzero(obl)[0]
    for c in range(0, obl_idx.size, 10_000):      # bounds the quadrature's node arrays
        k = obl_idx[c:c + 10_000]
        ii, jj = i[k], j[k]
        d1, d2 = g.E[ii] - g.P[ii], g.E[jj] - g.P[jj]
        v = kern.oblique_filament_integral(g.P[ii], d1, g.P[jj], d2)
        # Cross-section correction, worked out with both segments turned onto their
        # bisector: the parallel-bar value minus the centre-line filament value in that
        # frame.  It vanishes with the cross-sections, and as the angle goes to 0 the sum
        # tends to the parallel-pair value, so bent paths join straight ones continuously.
        axis = Ui[k] + sgn[k, None] * Uj[k]
        axis /= np.linalg.norm(axis, axis=1)[:, None]
        v += _parallel_core(g, ii, jj, axis, sgn[k], correction=True)
        out[k] = MU0_4PI * dot[k] * v
    return out


def _perp_unit(v, axis):
    v = v - np.einsum("ij,ij->i", v, axis)[:, None] * axis
    return v / np.linalg.norm(v, axis=1)[:, None]


def _parallel_core(g: _Geo, i, j, axis, sgn, correction=False):
    """``(1/(A_i A_j)) * integral integral dV dV' / R`` (mm) for segments ``i`` and ``j``
    taken as parallel to ``axis`` (their own direction, or the bisector of an oblique
    pair), current senses made equal (``sgn`` = sign of ``u_i . u_j``).  With
    ``correction`` the value minus that of the centre-line filaments in the same frame."""
    Mi = (g.P[i] + g.E[i]) / 2
    a1 = np.einsum("ij,ij->i", g.P[i] - Mi, axis)
    b1 = np.einsum("ij,ij->i", g.E[i] - Mi, axis)
    sp = np.einsum("ij,ij->i", g.P[j] - Mi, axis)
    se = np.einsum("ij,ij->i", g.E[j] - Mi, axis)
    a2 = np.where(sgn > 0, sp, se)
    b2 = np.where(sgn > 0, se, sp)
    off = (g.P[j] + g.E[j]) / 2 - Mi
    cvec = off - np.einsum("ij,ij->i", off, axis)[:, None] * axis
    rho = np.where(i == j, 0.0, np.linalg.norm(cvec, axis=1))

    def filament(k):
        out = np.empty(k.size)
        pos = rho[k] > 0
        kp, kz = k[pos], k[~pos]
        out[pos] = kern.parallel_filament_integral(a1[kp], b1[kp], a2[kp], b2[kp], rho[kp])
        if kz.size:
            vals, sz = kern.span_offsets(a1[kz], b1[kz], a2[kz], b2[kz])
            out[~pos] = np.tensordot(sz, kern.g_collinear(vals), axes=1)
        return out

    wdi = _perp_unit(g.WD[i], axis)
    tdi = np.cross(axis, wdi)
    wdj = _perp_unit(g.WD[j], axis)
    tdj = np.cross(axis, wdj)
    ratio = rho / (g.ext[i] + g.ext[j])
    val = np.full(i.size, np.nan)

    both_bar = g.bar[i] & g.bar[j]
    ww = np.abs(np.einsum("ij,ij->i", wdj, wdi))
    wt = np.abs(np.einsum("ij,ij->i", wdj, tdi))
    same = both_bar & (ww > 1 - 1e-9)
    swap = both_bar & ~same & (wt > 1 - 1e-9)
    near = (same | swap) & (ratio < NEAR_RATIO)
    if near.any():
        k = np.nonzero(near)[0]
        hwj = np.where(swap[k], g.t[j[k]], g.w[j[k]]) / 2
        htj = np.where(swap[k], g.w[j[k]], g.t[j[k]]) / 2
        cx = np.einsum("ij,ij->i", cvec[k], wdi[k])
        cy = np.einsum("ij,ij->i", cvec[k], tdi[k])
        v, err = kern.parallel_bars_integral(a1[k], b1[k], a2[k], b2[k], cx, cy,
                                             g.w[i[k]] / 2, g.t[i[k]] / 2, hwj, htj,
                                             with_error=True)
        # keep the closed form unless its rounding estimate is worse than the filament
        # form's truncation, about 0.15 / ratio^4 (measured against 50-digit evaluations)
        far_err = 0.15 / np.maximum(ratio[k], 1e-3) ** 4
        ok = (err <= np.maximum(ROUNDING_LIMIT, far_err) * np.abs(v)) | (ratio[k] < 1.0)
        k, v = k[ok], v[ok]
        val[k] = v - filament(k) if correction else v

    far = np.isnan(val) & (ratio >= 1.0)
    if far.any():
        # Grover's filament formula with the mean over both cross-sections taken to second
        # order in their sizes (Taylor expansion of G(Z, |c + delta|) about the centres).
        k = np.nonzero(far)[0]
        ii, jj = i[k], j[k]
        chat = cvec[k] / rho[k, None]
        sc = (g.s_w[ii] * np.einsum("ij,ij->i", chat, wdi[k]) ** 2
              + g.s_t[ii] * np.einsum("ij,ij->i", chat, tdi[k]) ** 2
              + g.s_w[jj] * np.einsum("ij,ij->i", chat, wdj[k]) ** 2
              + g.s_t[jj] * np.einsum("ij,ij->i", chat, tdj[k]) ** 2)
        stot = g.s_w[ii] + g.s_t[ii] + g.s_w[jj] + g.s_t[jj]
        zv, sz = kern.span_offsets(a1[k], b1[k], a2[k], b2[k])
        r = rho[k]
        R = np.hypot(zv, r)
        corr = (sc * zv ** 2 / R - (stot - sc) * R) / (2 * r * r)
        val[k] = np.tensordot(sz, corr if correction else kern.g_filament(zv, r) + corr,
                              axes=1)

    rest = np.isnan(val)
    if rest.any():
        # overlapping cross-sections that are not aligned bars: GMD method
        k = np.nonzero(rest)[0]
        gm = np.sqrt(_self_gmd(g, i[k]) * _self_gmd(g, j[k]))
        d = np.maximum(rho[k], gm)
        val[k] = kern.parallel_filament_integral(a1[k], b1[k], a2[k], b2[k], d)
        if correction:
            val[k] -= filament(k)
    return val


def _self_gmd(g: _Geo, idx):
    bar_g = 0.2235 * (g.w[idx] + g.t[idx])
    return np.where(g.bar[idx], bar_g, g.gmd[idx])


def segment_self_inductance(segment: Segment) -> float:
    """Self partial inductance (H) of one segment (mm geometry); see the module notes."""
    g = _Geo([segment])
    return float(_pair_values(g, np.array([0]), np.array([0]))[0])


def segment_mutual(a: Segment, b: Segment) -> float:
    """Mutual partial inductance (H) of two segments, signed by their current directions."""
    g = _Geo([a, b])
    return float(_pair_values(g, np.array([0]), np.array([1]))[0])


def partial_inductance_matrix(segments) -> np.ndarray:
    """The ``n x n`` matrix of partial inductances ``Lp_ij`` (H); geometry in mm."""
    g = _Geo(list(segments))
    m = np.zeros((g.n, g.n))
    iu, ju = np.triu_indices(g.n)
    for c in range(0, iu.size, BLOCK_PAIRS):
        ii, jj = iu[c:c + BLOCK_PAIRS], ju[c:c + BLOCK_PAIRS]
        v = _pair_values(g, ii, jj)
        m[ii, jj] = v
        m[jj, ii] = v
    return m


def loop_inductance(segments) -> float:
    """Inductance (H) of the loop formed by ``segments`` in series (geometry in mm).

    ``L = sum_i sum_j Lp_ij``: self terms plus twice every mutual pair, computed in blocks
    of vectorised pairs on up to ``WORKERS`` threads.  Time grows as ``n^2``: about 1.5 s
    for 2,000 segments of a straight-sided loop and 3 s when every pair is oblique (two
    cores).  The segments should form a closed path; an open path gives the partial
    inductance of that path, which depends on where the return is.
    """
    g = _Geo(list(segments))
    idx = np.arange(g.n)
    total = float(np.sum(_pair_values(g, idx, idx)))
    blocks = _row_blocks(g.n)

    def block_sum(rows):
        r = np.arange(*rows)
        ii = np.repeat(r, g.n - 1 - r)
        jj = np.concatenate([np.arange(k + 1, g.n) for k in r])
        return float(np.sum(_pair_values(g, ii, jj)))

    # numpy releases the interpreter lock inside its loops, so blocks run well on threads;
    # block sums are added in a fixed order, so the result does not depend on scheduling.
    workers = min(WORKERS, len(blocks))
    if workers > 1:
        with ThreadPoolExecutor(max_workers=workers) as pool:
            sums = list(pool.map(block_sum, blocks))
    else:
        sums = [block_sum(b) for b in blocks]
    return total + 2.0 * math.fsum(sums)


def _row_blocks(n):
    """Row ranges ``(first, stop)`` whose pairs ``i < j`` number about BLOCK_PAIRS each."""
    blocks, row = [], 0
    while row < n - 1:
        first, count = row, 0
        while row < n - 1 and (count == 0 or count + (n - 1 - row) <= BLOCK_PAIRS):
            count += n - 1 - row
            row += 1
        blocks.append((first, row))
    return blocks


# --------------------------------------------------------------------------------------
# SI (metre) helpers
def bar_self_inductance_si(length_m: float, width_m: float, thickness_m: float) -> float:
    """:func:`bar_self_inductance` with lengths in metres (H)."""
    return bar_self_inductance(length_m * 1e3, width_m * 1e3, thickness_m * 1e3)


def round_wire_self_inductance_si(length_m: float, radius_m: float) -> float:
    """:func:`round_wire_self_inductance` with lengths in metres (H)."""
    return round_wire_self_inductance(length_m * 1e3, radius_m * 1e3)


def stacked_return_inductance_si(length_m: float, width_m: float, separation_m: float,
                                 fringing: bool = True, thickness_m: float = 0.0) -> float:
    """:func:`stacked_return_inductance` with lengths in metres (H)."""
    return stacked_return_inductance(length_m * 1e3, width_m * 1e3, separation_m * 1e3,
                                     fringing, thickness_m * 1e3)


def segment_from_metres(start_m, end_m, width_m: float, thickness_m: float = 35e-6,
                        shape: str = "bar", width_dir=None) -> Segment:
    """A :class:`Segment` from coordinates and sizes in metres."""
    return Segment(tuple(np.asarray(start_m, dtype=float) * 1e3),
                   tuple(np.asarray(end_m, dtype=float) * 1e3),
                   width_m * 1e3, thickness_m * 1e3, shape, width_dir)
