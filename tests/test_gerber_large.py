"""A large generated file parses and resolves correctly.

Object counts and areas are checked against values worked from the generated layout.
Timing is not tested here (speed targets live in benchmarks/, run by hand).
"""
from __future__ import annotations

import math

from layoutcheck.readers.gerber import parse_gerber, resolve_polarity
from layoutcheck.units import CHORD_TOLERANCE_MM

N_SIDE = 60           # 60 x 60 = 3,600 pad flashes
PITCH = 1.0           # mm


def _layout() -> str:
    w = ["%FSLAX46Y46*%", "%MOMM*%", "%ADD10C,0.5*%", "%ADD11C,0.2*%", "%ADD12C,0.3*%",
         "%TO.N,GND*%", "D10*"]
    m = 1_000_000
    for i in range(N_SIDE):
        for j in range(N_SIDE):
            w.append(f"X{int(i * PITCH * m)}Y{int(j * PITCH * m)}D03*")
    w.append("D11*")
    # (N-1) x N short horizontal tracks between neighbouring pads in every row
    for j in range(N_SIDE):
        for i in range(N_SIDE - 1):
            w.append(f"X{int(i * m)}Y{int(j * m)}D02*")
            w.append(f"X{int((i + 1) * m)}Y{int(j * m)}D01*")
    # 100 clear dots on the rows, after everything: each erases part of one track + pad
    w += ["%LPC*%", "D12*"]
    for k in range(100):
        w.append(f"X{int((k % 50) * m + 500_000)}Y{int((k // 50) * m)}D03*")
    w.append("M02*")
    return "\n".join(w) + "\n"


def test_large_file_counts_and_areas():
    text = _layout()
    gf = parse_gerber(text, "big.gbr")
    n_pads = N_SIDE * N_SIDE
    n_tracks = N_SIDE * (N_SIDE - 1)
    assert len(gf.objects) == n_pads + n_tracks + 100
    pieces = resolve_polarity(gf.objects)
    # each clear dot (d 0.3) sits mid-way between two pads (d 0.5, 1 mm apart) on a track:
    # it cuts that track in two and touches neither pad (0.25 + 0.15 < 0.5).
    assert len(pieces) == n_pads + n_tracks + 100
    track_area = 1.0 * 0.2 + math.pi * 0.01
    cap_allowance = math.pi * 0.2 * CHORD_TOLERANCE_MM   # round caps flattened inside
    cut = [p for p, o in pieces if o.kind == "draw"]
    total = sum(p.area for p in cut)
    # removed per dot: the 0.3 circle over the 0.2 band, between 0.05 and 0.3 * 0.2
    # (disc-band area 2(h sqrt(r^2-h^2) + r^2 asin(h/r)) = 0.0551 for r 0.15, h 0.1)
    assert n_tracks * (track_area - cap_allowance) - 100 * 0.06 < total
    assert total < n_tracks * track_area - 100 * 0.05
