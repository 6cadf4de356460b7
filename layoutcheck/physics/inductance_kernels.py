"""Vectorised closed forms behind the partial-inductance model (internal).

Units: millimetres in; the kernels return plain numbers in mm-based units (mm, mm^2,
mm^5 ...) that :mod:`layoutcheck.physics.inductance` scales by ``mu0 / (4 pi)`` in H/mm.
Every function takes numpy arrays and works element-wise.

Formulas and sources
--------------------
Neumann's formula for the mutual inductance of two current paths (textbook)::

    M = mu0/(4 pi) * integral integral (dl1 . dl2) / R

Parallel filaments.  Along a common axis, filament 1 covers ``[a1, b1]`` and filament 2
covers ``[a2, b2]``; ``d`` is the distance between their lines.  With
``G(u, d) = u asinh(u/d) - sqrt(u^2 + d^2)`` (so that ``G'' = 1/sqrt(u^2+d^2)``)::

    integral integral dz1 dz2 / R = G(b2-a1) - G(b2-b1) - G(a2-a1) + G(a2-b1)

which is Grover's formula for parallel filaments of any lengths and offsets (F. W. Grover,
*Inductance Calculations*, 1946, chapter on straight filaments; Campbell's form).

Parallel rectangular bars with uniform current.  The six-fold integral of ``1/R`` over the
two volumes is the same four-term difference applied on each axis to the function
``F(x, y, z)`` of C. Hoer and C. Love, "Exact inductance equations for rectangular
conductors with applications to more complicated geometries", J. Res. NBS 69C (1965),
which satisfies ``d6F/dx2 dy2 dz2 = 1/sqrt(x^2+y^2+z^2)``; A. E. Ruehli, "Inductance
calculations in a complex integrated circuit environment", IBM J. Res. Dev. 16 (1972)
gives the same result for the self term.  We checked the partial differential equation
symbolically while writing this module, and that ``d4F/dx2 dy2`` at ``z = 0`` equals
``-sqrt(x^2+y^2)`` (no extra gauge term), so the transverse differences of ``F`` at a
fixed axial offset ``Z`` are exactly ``A1 A2 <G(Z, d)>``, the mean of ``G`` over all pairs of
points of the two cross-sections.

Long bars.  The 64-term difference of ``F`` cancels badly when the axial offset ``Z`` is
much larger than the cross-sections (terms of size ``Z^5`` leave a result of size
``w^2 t^2 Z``).  For ``|Z| >= SERIES_RATIO * dmax`` (``dmax`` the largest distance between
points of the two cross-sections) the same mean is taken from its convergent series::

    <G(Z, d)> = |Z| ln(2|Z|) - |Z| - |Z| <ln d> - <d^2>/(4|Z|) + <d^4>/(32|Z|^3)
                - <d^6>/(96|Z|^5) + O(<d^8>/|Z|^7)

(expansion of ``asinh``; the next coefficient is 5/1024, so the truncation is below 1e-7
of the leading term at ratio 5).  ``<ln d>`` is the log of the geometric mean distance
(GMD) between the two rectangles, exact through the function ``PHI`` below with
``d4 PHI / dx2 dy2 = ln sqrt(x^2 + y^2)`` (the two-dimensional analogue of ``F``; for one
rectangle with itself it reproduces Maxwell's GMD of a rectangle, Rosa & Grover, Bull.
Bureau of Standards 8 (1912)).  The moments ``<d^2k>`` are polynomial in the sizes.

Skew and oblique filaments.  The inner integral of Neumann's formula along filament 2 is
done exactly, ``integral_0^l2 ds / |P - Q(s)| = asinh((l2-b)/h) + asinh(b/h)`` with ``b``
the projection of ``P`` on filament 2 and ``h`` its distance from that line; the outer
integral uses fixed Gauss-Legendre nodes on the two parts of filament 1 split at its
point closest to filament 2, with the cubic change of variable ``s = 1 - (1 - tau)^3`` that
crowds the nodes of each part towards the split point, where the logarithmic peak of the
inner integral sits (filaments far apart relative to their length get plain nodes).
"""
from __future__ import annotations

import numpy as np

#: Axial series is used for ``|Z| >= SERIES_RATIO * dmax``; below, the closed form.
SERIES_RATIO = 5.0

#: Gauss-Legendre nodes per half of filament 1 in the oblique-pair quadrature.
GL_NODES = 32

#: Plain Gauss-Legendre nodes for oblique filaments at least ``FAR_RATIO`` lengths apart.
FAR_NODES = 6
FAR_RATIO = 1.0

_GL_X, _GL_W = np.polynomial.legendre.leggauss(GL_NODES)
_FX, _FW = np.polynomial.legendre.leggauss(FAR_NODES)
_FAR_T = 0.5 * (_FX + 1.0)
_FAR_W = 0.5 * _FW
# map [-1, 1] -> tau in [0, 1], then s = 1 - (1 - tau)^3: nodes crowd towards s = 1, the
# split point, where the inner integral has its logarithmic peak.
_GRADE = 3
_TAU = 0.5 * (_GL_X + 1.0)
_S_OF_TAU = 1.0 - (1.0 - _TAU) ** _GRADE
_W_OF_TAU = 0.5 * _GL_W * _GRADE * (1.0 - _TAU) ** (_GRADE - 1)


# --------------------------------------------------------------------------------------
# one-dimensional and filament kernels
def g_filament(u, d):
    """``G(u, d) = |u| asinh(|u|/d) - sqrt(u^2 + d^2)`` (mm), even in ``u``; ``d > 0``.

    Collinear filaments (``d = 0``) use :func:`g_collinear` instead.
    """
    u = np.abs(u)
    return u * np.arcsinh(u / d) - np.hypot(u, d)


def g_collinear(u):
    """Second antiderivative of ``1/|u|`` used for collinear filaments: ``|u| ln|u|``.

    Valid when the four offsets of the difference never straddle 0 (filaments that do not
    overlap); terms linear in ``u`` cancel in the four-term difference.
    """
    u = np.abs(u)
    out = np.zeros_like(u, dtype=float)
    pos = u > 0
    out[pos] = u[pos] * np.log(u[pos])
    return out


def axis_offsets(c, h1, h2):
    """The four offsets and signs of the difference along one transverse axis.

    Conductor 1 spans ``[-h1, h1]``, conductor 2 spans ``[c - h2, c + h2]`` (mm).  Returns
    ``(values, signs)`` with ``values`` of shape ``(4, ...)`` and ``signs = (+1, -1, -1, +1)``.
    """
    c, h1, h2 = np.broadcast_arrays(c, h1, h2)
    vals = np.stack([c + h1 + h2, c + h2 - h1, c - h2 + h1, c - h1 - h2])
    return vals, np.array([1.0, -1.0, -1.0, 1.0])


def _fold_mode(c, h1, h2):
    """0: four distinct offsets; 1: equal sizes (three); 2: common centre line (two)."""
    return np.where(c == 0.0, 2, np.where(h1 == h2, 1, 0))


def _folded_offsets(c, h1, h2, mode):
    if mode == 2:
        return [h1 + h2, np.abs(h1 - h2)], np.array([2.0, -2.0])
    if mode == 1:
        return [c + 2.0 * h1, c, c - 2.0 * h1], np.array([1.0, -2.0, 1.0])
    vals, sg = axis_offsets(c, h1, h2)
    return list(vals), sg


def span_offsets(a1, b1, a2, b2):
    """The four axial offsets ``(b2-a1, b2-b1, a2-a1, a2-b1)`` with signs ``(+, -, -, +)``."""
    a1, b1, a2, b2 = np.broadcast_arrays(a1, b1, a2, b2)
    vals = np.stack([b2 - a1, b2 - b1, a2 - a1, a2 - b1])
    return vals, np.array([1.0, -1.0, -1.0, 1.0])


def parallel_filament_integral(a1, b1, a2, b2, d):
    """``integral integral dz1 dz2 / R`` for parallel filaments (mm).

    Filament 1 spans ``[a1, b1]``, filament 2 spans ``[a2, b2]`` on a common axis, their
    lines ``d`` apart (mm, > 0).  Grover (1946) four-term form with ``G(u, d)``.
    """
    vals, sg = span_offsets(a1, b1, a2, b2)
    return np.tensordot(sg, g_filament(vals, d), axes=1)


# --------------------------------------------------------------------------------------
# Hoer & Love F and the two-dimensional PHI
def hoer_love_f(x, y, z):
    """Hoer & Love (1965) function ``F(x, y, z)`` with ``d6F/dx2dy2dz2 = 1/r`` (mm^5).

    Even in each argument (absolute values are taken).  Terms whose polynomial factor
    vanishes are set to their limit 0 where their logarithm or angle is undefined.
    """
    x = np.abs(np.asarray(x, dtype=float))
    y = np.abs(np.asarray(y, dtype=float))
    z = np.abs(np.asarray(z, dtype=float))
    x2, y2, z2 = x * x, y * y, z * z
    rho = np.sqrt(x2 + y2 + z2)
    with np.errstate(divide="ignore", invalid="ignore"):
        out = (x2 * x2 + y2 * y2 + z2 * z2 - 3.0 * (x2 * y2 + y2 * z2 + x2 * z2)) * rho / 60.0
        for a, a2, p2, q2 in ((x, x2, y2, z2), (y, y2, x2, z2), (z, z2, x2, y2)):
            q = np.sqrt(p2 + q2)
            pref = (p2 * q2 / 4.0 - p2 * p2 / 24.0 - q2 * q2 / 24.0) * a
            term = pref * np.arcsinh(np.where(q > 0, a / np.where(q > 0, q, 1.0), 0.0))
            out = out + np.where(q > 0, term, 0.0)
        xyz = x * y * z
        out = out - xyz * z2 / 6.0 * np.arctan2(x * y, z * rho)
        out = out - xyz * y2 / 6.0 * np.arctan2(x * z, y * rho)
        out = out - xyz * x2 / 6.0 * np.arctan2(y * z, x * rho)
    # arctan2(0, 0) = 0 in numpy, and its prefactor is 0 there anyway.
    return out


def phi_2d(x, y):
    """``PHI(x, y)`` with ``d4 PHI / dx2 dy2 = ln sqrt(x^2 + y^2)`` (mm^4 units).

    ``PHI = (x^2 y^2/4 - (x^4 + y^4)/24) ln r + (x^3 y atan(y/x) + x y^3 atan(x/y))/6
    - 25 x^2 y^2 / 48``; coefficients found and checked symbolically for this module.
    Even in each argument.
    """
    x = np.abs(np.asarray(x, dtype=float))
    y = np.abs(np.asarray(y, dtype=float))
    x2, y2 = x * x, y * y
    r2 = x2 + y2
    with np.errstate(divide="ignore", invalid="ignore"):
        lr = np.where(r2 > 0, 0.5 * np.log(np.where(r2 > 0, r2, 1.0)), 0.0)
    return ((x2 * y2 / 4.0 - (x2 * x2 + y2 * y2) / 24.0) * lr
            + (x2 * x * y * np.arctan2(y, x) + x * y2 * y * np.arctan2(x, y)) / 6.0
            - 25.0 / 48.0 * x2 * y2)


def log_gmd_rectangles(cx, cy, hw1, ht1, hw2, ht2):
    """``ln`` of the geometric mean distance between two aligned rectangles (ln mm).

    Rectangle 1 is centred at the origin with half-sizes ``hw1`` (x) and ``ht1`` (y);
    rectangle 2 is centred at ``(cx, cy)`` with half-sizes ``hw2``, ``ht2`` (mm).
    """
    xv, sx = axis_offsets(cx, hw1, hw2)
    yv, sy = axis_offsets(cy, ht1, ht2)
    tot = 0.0
    for i in range(4):
        for j in range(4):
            tot = tot + sx[i] * sy[j] * phi_2d(xv[i], yv[j])
    return tot / (16.0 * hw1 * ht1 * hw2 * ht2)


def rectangle_pair_moments(cx, cy, hw1, ht1, hw2, ht2):
    """``(<d^2>, <d^4>, <d^6>)`` over point pairs of two aligned rectangles (mm^2k)."""
    def axis(c, h1, h2):
        e2 = (h1 ** 2 + h2 ** 2) / 3.0
        e4 = h1 ** 4 / 5.0 + 6.0 * (h1 ** 2 / 3.0) * (h2 ** 2 / 3.0) + h2 ** 4 / 5.0
        e6 = (h1 ** 6 / 7.0 + 15.0 * (h1 ** 4 / 5.0) * (h2 ** 2 / 3.0)
              + 15.0 * (h1 ** 2 / 3.0) * (h2 ** 4 / 5.0) + h2 ** 6 / 7.0)
        c2 = c * c
        return (c2 + e2, c2 * c2 + 6.0 * c2 * e2 + e4,
                c2 ** 3 + 15.0 * c2 * c2 * e2 + 15.0 * c2 * e4 + e6)

    x2, x4, x6 = axis(cx, hw1, hw2)
    y2, y4, y6 = axis(cy, ht1, ht2)
    return (x2 + y2, x4 + 2.0 * x2 * y2 + y4, x6 + 3.0 * x4 * y2 + 3.0 * x2 * y4 + y6)


def mean_g_series(z, log_gmd, m2, m4, m6):
    """Series for ``<G(Z, d)>`` at ``|Z|`` large against the cross-sections (mm)."""
    z = np.abs(z)
    return (z * np.log(2.0 * z) - z - z * log_gmd - m2 / (4.0 * z)
            + m4 / (32.0 * z ** 3) - m6 / (96.0 * z ** 5))


def parallel_bars_integral(a1, b1, a2, b2, cx, cy, hw1, ht1, hw2, ht2, with_error=False):
    """``(1/(A1 A2)) * six-fold integral of 1/R`` for two aligned parallel bars (mm).

    Bar 1: axial span ``[a1, b1]``, cross-section centred at the origin, half-sizes
    ``hw1`` x ``ht1``.  Bar 2: axial span ``[a2, b2]``, cross-section centred at
    ``(cx, cy)``, half-sizes ``hw2`` x ``ht2`` (all mm, same axes).  Exact Hoer & Love
    closed form for axial offsets below ``SERIES_RATIO * dmax``, the convergent series
    above (see the module docstring).  All arguments broadcast to 1-D arrays.  With
    ``with_error`` also returns an estimate of the absolute rounding error (mm).
    """
    a1, b1, a2, b2, cx, cy, hw1, ht1, hw2, ht2 = (
        np.atleast_1d(np.asarray(v, dtype=float))
        for v in np.broadcast_arrays(a1, b1, a2, b2, cx, cy, hw1, ht1, hw2, ht2))
    zv, sz = span_offsets(a1, b1, a2, b2)
    dmax = np.hypot(np.abs(cx) + hw1 + hw2, np.abs(cy) + ht1 + ht2)
    use_series = np.abs(zv) >= SERIES_RATIO * dmax
    out = np.zeros(a1.shape)
    mag = np.zeros(a1.shape)
    if use_series.any():
        cols = np.nonzero(use_series.any(axis=0))[0]
        lg = log_gmd_rectangles(cx[cols], cy[cols], hw1[cols], ht1[cols], hw2[cols],
                                ht2[cols])
        m2, m4, m6 = rectangle_pair_moments(cx[cols], cy[cols], hw1[cols], ht1[cols],
                                            hw2[cols], ht2[cols])
        for k in range(4):
            sel = use_series[k, cols]
            if sel.any():
                c = cols[sel]
                out[c] += sz[k] * mean_g_series(zv[k, c], lg[sel], m2[sel], m4[sel], m6[sel])
    exact = ~use_series
    if exact.any():
        area = 16.0 * hw1 * ht1 * hw2 * ht2
        # Fewer F terms where offsets coincide: cross-sections centred on a common line
        # (c == 0; F is even) fold the four offsets of that axis into two, equal sizes
        # (h1 == h2) into three.
        xmode = _fold_mode(cx, hw1, hw2)
        ymode = _fold_mode(cy, ht1, ht2)
        for xm in range(3):
            for ym in range(3):
                grp = exact & (xmode == xm) & (ymode == ym)
                if not grp.any():
                    continue
                xv, sx = _folded_offsets(cx, hw1, hw2, xm)
                yv, sy = _folded_offsets(cy, ht1, ht2, ym)
                for k in range(4):
                    c = np.nonzero(grp[k])[0]
                    if c.size == 0:
                        continue
                    acc = np.zeros(c.size)
                    zk = zv[k, c]
                    for i in range(len(sx)):
                        for j in range(len(sy)):
                            term = sx[i] * sy[j] * hoer_love_f(xv[i][c], yv[j][c], zk)
                            acc += term
                            mag[c] += np.abs(term)
                    out[c] += sz[k] * acc / area[c]
    if with_error:
        # rounding error of the closed form: a few ulps of the largest terms summed
        return out, 4.0 * np.finfo(float).eps * mag / (16.0 * hw1 * ht1 * hw2 * ht2)
    return out


# --------------------------------------------------------------------------------------
# oblique filaments
def closest_fraction(p1, d1, p2, d2):
    """Fractions ``(s, t)`` in [0, 1] of the closest points ``p1 + s d1`` and ``p2 + t d2``
    of two non-parallel segments (closest points of segments, as in standard
    computational-geometry texts).  Arrays of shape ``(n, 3)``."""
    r = p1 - p2
    a = np.einsum("ij,ij->i", d1, d1)
    e = np.einsum("ij,ij->i", d2, d2)
    b = np.einsum("ij,ij->i", d1, d2)
    c = np.einsum("ij,ij->i", d1, r)
    f = np.einsum("ij,ij->i", d2, r)
    denom = a * e - b * b
    s = np.clip((b * f - c * e) / denom, 0.0, 1.0)
    t = (b * s + f) / e
    s = np.where(t < 0.0, np.clip(-c / a, 0.0, 1.0), s)
    s = np.where(t > 1.0, np.clip((b - c) / a, 0.0, 1.0), s)
    t = np.clip((b * s + f) / e, 0.0, 1.0)
    return s, t


def _inner_line_integral(pts, p2, u2, l2, scale):
    """``integral_0^l2 ds / |pts - (p2 + s u2)|`` for points ``pts`` of shape ``(n, m, 3)``."""
    q0 = pts[..., 0] - p2[:, None, 0]
    q1 = pts[..., 1] - p2[:, None, 1]
    q2 = pts[..., 2] - p2[:, None, 2]
    ux, uy, uz = u2[:, None, 0], u2[:, None, 1], u2[:, None, 2]
    b = q0 * ux + q1 * uy + q2 * uz
    cx = q1 * uz - q2 * uy
    cy = q2 * ux - q0 * uz
    cz = q0 * uy - q1 * ux
    h = np.sqrt(cx * cx + cy * cy + cz * cz)
    h = np.maximum(h, 1e-15 * scale[:, None])
    return np.arcsinh((l2[:, None] - b) / h) + np.arcsinh(b / h)


def oblique_filament_integral(p1, d1, p2, d2):
    """``integral integral ds1 ds2 / R`` for two non-parallel straight filaments (mm).

    Filament k runs from ``pk`` to ``pk + dk`` (arrays of shape ``(n, 3)``, mm).  The
    inner integral is exact.  The outer uses fixed Gauss-Legendre nodes: ``FAR_NODES``
    plain nodes when the filaments are at least ``FAR_RATIO`` times the longer one apart
    (a smooth integrand), else ``2 * GL_NODES`` nodes on the two parts of filament 1
    split at its point closest to filament 2, crowded towards the split (module
    docstring).  Multiply by ``cos`` of the angle and ``mu0/(4 pi)`` for ``M``.
    """
    n = p1.shape[0]
    out = np.zeros(n)
    if n == 0:
        return out
    l1 = np.linalg.norm(d1, axis=1)
    l2 = np.linalg.norm(d2, axis=1)
    u2 = d2 / l2[:, None]
    scale = np.maximum(l1, l2)
    sc, tc = closest_fraction(p1, d1, p2, d2)
    dmin = np.linalg.norm(p1 + sc[:, None] * d1 - p2 - tc[:, None] * d2, axis=1)
    far = dmin >= FAR_RATIO * scale
    if far.any():
        k = np.nonzero(far)[0]
        pts = p1[k, None, :] + _FAR_T[None, :, None] * d1[k, None, :]
        inner = _inner_line_integral(pts, p2[k], u2[k], l2[k], scale[k])
        out[k] = l1[k] * (inner @ _FAR_W)
    if (~far).any():
        k = np.nonzero(~far)[0]
        s = sc[k, None]
        frac = np.concatenate([s * _S_OF_TAU[None, :], 1.0 - (1.0 - s) * _S_OF_TAU[None, :]],
                              axis=1)
        wts = np.concatenate([s * _W_OF_TAU[None, :], (1.0 - s) * _W_OF_TAU[None, :]], axis=1)
        pts = p1[k, None, :] + frac[:, :, None] * d1[k, None, :]
        inner = _inner_line_integral(pts, p2[k], u2[k], l2[k], scale[k])
        out[k] = l1[k] * np.einsum("im,im->i", wts, inner)
    return out
