"""Findings: what a check returns.  Reports format them; checks never format.

Units: millimetres, volts.  ``basis`` says where each required number came from
(standard, table, column, row, or formula and source).
"""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

SEVERITIES = ("error", "warning", "info")
SEVERITY_RANK = {"error": 0, "warning": 1, "info": 2}


@dataclass
class Finding:
    """One result of one rule at one place.

    rule:        rule id (``clearance``, ``net-short``, ...).
    severity:    ``error`` | ``warning`` | ``info``.
    message:     one plain sentence for a person.
    layer:       copper layer name, if the finding is on one layer.
    nets:        the nets concerned, sorted.
    measured_mm / required_mm: the distance found and the one required.
    voltage_v:   the working voltage used to look up the requirement.
    basis:       source of ``required_mm`` (standard, table, column, row) or of a formula.
    where / to:  (x, y) board millimetres: the two nearest points, or a location.
    extra:       further JSON-ready fields a rule adds (``path``, ``via``, ``loops``...).
    """

    rule: str
    severity: str
    message: str
    layer: str | None = None
    nets: list[str] = field(default_factory=list)
    measured_mm: float | None = None
    required_mm: float | None = None
    voltage_v: float | None = None
    basis: str | None = None
    where: tuple[float, float] | None = None
    to: tuple[float, float] | None = None
    extra: dict[str, Any] = field(default_factory=dict)

    def __post_init__(self):
        if self.severity not in SEVERITIES:
            raise ValueError(f"severity must be one of {SEVERITIES}, got {self.severity!r}")
        self.nets = sorted(self.nets)

    def sort_key(self):
        shortfall = 0.0
        if self.required_mm is not None and self.measured_mm is not None:
            shortfall = -(self.required_mm - self.measured_mm)
        w = self.where or (0.0, 0.0)
        return (SEVERITY_RANK[self.severity], self.rule, shortfall, self.layer or "",
                tuple(self.nets), round(w[0], 6), round(w[1], 6))
