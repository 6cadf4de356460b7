"""What a loop inductance means, and what a stacked return would reach.

Units: millimetres for geometry, henries, volts, amperes, seconds (di/dt in A/s), farads,
hertz, ohms; each function says which it takes.  Public names are re-exported by
:mod:`layoutcheck.physics.inductance`.

Sources: the shared power-layout notes, sections 0 and 1 (PL-1 overshoot ``dV = L di/dt``
and ``L_max = (0.8 V_BR - V_bus) / (di/dt)``; PL-2 ringing ``f = 1/(2 pi sqrt(L C))``,
``Z0 = sqrt(L / C)``; PL-4 stacked return ``L = mu0 h l / w``), all textbook circuit and
field theory; the fringing correction is named at :func:`stacked_return_inductance`.
"""
from __future__ import annotations

import math
import warnings

import numpy as np

from ..errors import UsageError

#: mu0 / (4 pi) in H/mm (1e-7 H/m; the SI value since 2019 differs by 5.5e-10).
MU0_4PI = 1e-10
#: Permeability of free space in H/mm (1.2566e-9 H/mm = 1.2566 nH/mm).
MU0 = 4.0 * math.pi * MU0_4PI


def enclosed_area(path_xy) -> float:
    """Area (mm^2) enclosed by a closed path projected on the x-y plane (shoelace).

    ``path_xy`` is a sequence of points (mm); only x and y are used; the path closes
    itself from the last point back to the first.  Returns the absolute area.
    """
    p = np.asarray(path_xy, dtype=float)
    if p.ndim != 2 or p.shape[1] < 2 or len(p) < 3:
        raise UsageError(f"expected at least three (x, y) points in mm, got shape {p.shape}")
    x, y = p[:, 0], p[:, 1]
    return float(abs(np.dot(x, np.roll(y, -1)) - np.dot(np.roll(x, -1), y)) / 2)


def stacked_return_inductance(length: float, width: float, separation: float,
                              fringing: bool = True, thickness: float = 0.0) -> float:
    """Inductance (H) of a path whose return runs directly under it on the other layer.

    Lengths in mm: path length ``l``, strip width ``w``, separation ``h`` between the two
    copper layers (the laminate thickness).  With a copper ``thickness`` ``t`` > 0, ``h`` is
    replaced by ``h + 2 t / 3``: uniform current through each copper layer adds ``t/3`` of
    flux-linking height per layer (textbook internal inductance of a plate).  Without
    fringing, the parallel-plate formula (textbook)::

        L = mu0 h l / w            (valid for w >> h; warns below w = 10 h)

    With ``fringing`` (default), the two-strip line seen as a microstrip of height
    ``h/2`` over its plane of symmetry (image principle: ``L' = 2 L'_ms``), with
    Hammerstad's air-filled microstrip impedance ("Equations for microstrip circuit
    design", Proc. 5th European Microwave Conf., 1975; quoted from memory, stated
    accuracy about 1 %), ``u = 2 w / h``::

        L' = 2 mu0 / (u + 1.393 + 0.667 ln(u + 1.444))       for u >= 1
        L' = (mu0 / pi) ln(8/u + u/4)                          for u < 1

    Both are two-dimensional: no end effects, the return exactly as wide as the path.
    """
    require_positive(length=length, width=width, separation=separation)
    if not (math.isfinite(thickness) and thickness >= 0):
        raise UsageError(f"thickness must be >= 0 mm, got {thickness!r}")
    separation = separation + 2.0 * thickness / 3.0
    if not fringing:
        if width < 10 * separation:
            warnings.warn(f"parallel-plate formula used with w/h = {width / separation:.3g}"
                          " < 10: it ignores fringing and over-estimates L", stacklevel=2)
        return MU0 * separation * length / width
    u = 2 * width / separation
    if u >= 1:
        per_mm = 2 * MU0 / (u + 1.393 + 0.667 * math.log(u + 1.444))
    else:
        per_mm = MU0 / math.pi * math.log(8 / u + u / 4)
    return per_mm * length


def overshoot_v(inductance: float, di_dt: float) -> float:
    """Voltage overshoot ``dV = L di/dt`` in volts (L in H, di/dt in A/s)."""
    return inductance * di_dt


def ringing_hz(inductance: float, capacitance: float) -> float:
    """Ringing frequency ``1 / (2 pi sqrt(L C))`` in Hz (L in H, C in F)."""
    require_positive(inductance=inductance, capacitance=capacitance)
    return 1.0 / (2 * math.pi * math.sqrt(inductance * capacitance))


def z0(inductance: float, capacitance: float) -> float:
    """Characteristic impedance ``sqrt(L / C)`` in ohms (L in H, C in F)."""
    require_positive(inductance=inductance, capacitance=capacitance)
    return math.sqrt(inductance / capacitance)


def max_inductance_for(v_bus: float, v_rating: float, derating: float, di_dt: float) -> float:
    """Largest loop inductance (H) that keeps ``V_bus + L di/dt <= derating * V_rating``.

    ``L_max = (derating * V_rating - V_bus) / (di/dt)``; volts, A/s, ``derating`` a
    fraction (0.8 for 80 %).  A value <= 0 means the bus voltage alone already exceeds
    the derated rating.
    """
    require_positive(di_dt=di_dt, v_rating=v_rating, derating=derating)
    return (derating * v_rating - v_bus) / di_dt


def require_positive(**values):
    """Raise :class:`UsageError` unless every keyword value is a finite number > 0."""
    for name, v in values.items():
        if not (math.isfinite(v) and v > 0):
            raise UsageError(f"{name} must be a finite number > 0, got {v!r}")
