"""What a commutation-loop inductance means: overshoot, peak against the derated switch
rating, the largest inductance allowed, and ringing.

Units: henries, volts, amperes per nanosecond (di/dt as the project file gives it), farads,
hertz, ohms.

Sources: the shared power-layout notes, PL-1 (``dV = L di/dt``, ``V_pk = V_bus + dV``,
``V_pk <= 0.8 V_BR`` [N], ``L_max = (0.8 V_BR - V_bus) / (di/dt)``) and PL-2 (``f_r =
1 / (2 pi sqrt(L C_oss))``, ``Z0 = sqrt(L / C_oss)``, a ring between 30 and 300 MHz falls in
the radiated-emission band [M]); textbook circuit theory.  The physics helpers live in
:mod:`layoutcheck.physics.inductance`.
"""
from __future__ import annotations

from dataclasses import dataclass

from ..physics.inductance import max_inductance_for, overshoot_v, ringing_hz, z0

#: Ringing in this band (Hz) radiates (power-layout notes PL-2, from memory [M]).
RADIATED_BAND_HZ = (30e6, 300e6)


@dataclass(frozen=True)
class Consequences:
    """The numbers behind a loop's verdict.

    inductance_h: H.  di_dt_a_per_ns: A/ns.  overshoot_v, bus_v, peak_v, rating_v,
    allowed_v (``derating * rating_v``): V.  ratio: ``peak_v / rating_v``.
    max_inductance_h: the largest loop inductance keeping the peak within the derated
    rating (H; <= 0 when the bus alone exceeds it).  coss_f: F.  ringing_hz: Hz.  z0_ohm: ohm.
    """

    inductance_h: float
    di_dt_a_per_ns: float
    overshoot_v: float
    bus_v: float
    peak_v: float
    derating: float
    rating_v: float | None = None
    allowed_v: float | None = None
    ratio: float | None = None
    max_inductance_h: float | None = None
    coss_f: float | None = None
    ringing_hz: float | None = None
    z0_ohm: float | None = None

    @property
    def exceeds_rating(self) -> bool:
        """True when the peak is above the derated rating (False when no rating known)."""
        return self.allowed_v is not None and self.peak_v > self.allowed_v

    @property
    def rings_in_radiated_band(self) -> bool:
        lo, hi = RADIATED_BAND_HZ
        return self.ringing_hz is not None and lo <= self.ringing_hz <= hi


def consequences(inductance_h: float, di_dt_a_per_ns: float, bus_v: float,
                 rating_v: float | None = None, derating: float = 0.8,
                 coss_f: float | None = None) -> Consequences:
    """Overshoot ``L di/dt``, peak ``V_bus + dV``, its share of the rating and the ringing.

    ``inductance_h`` in H, ``di_dt_a_per_ns`` in A/ns, voltages in V, ``derating`` a
    fraction (0.8 allows the peak to reach 80 % of the rating), ``coss_f`` in F.
    """
    di_dt = di_dt_a_per_ns * 1e9                      # A/s
    dv = overshoot_v(inductance_h, di_dt)
    peak = bus_v + dv
    kw = {}
    if rating_v is not None:
        kw = dict(rating_v=rating_v, allowed_v=derating * rating_v, ratio=peak / rating_v,
                  max_inductance_h=max_inductance_for(bus_v, rating_v, derating, di_dt))
    if coss_f is not None and inductance_h > 0:
        kw.update(coss_f=coss_f, ringing_hz=ringing_hz(inductance_h, coss_f),
                  z0_ohm=z0(inductance_h, coss_f))
    return Consequences(inductance_h, di_dt_a_per_ns, dv, bus_v, peak, derating, **kw)


def grade(c: Consequences, warn_nh: float) -> str:
    """``error`` when the peak exceeds the derated rating, ``warning`` when the inductance
    is above ``warn_nh`` (nH), else ``info``."""
    if c.exceeds_rating:
        return "error"
    if c.inductance_h > warn_nh * 1e-9:
        return "warning"
    return "info"
