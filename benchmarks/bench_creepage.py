"""Benchmark: the creepage rule on a synthetic board with many slots and slot-crossing pairs.

Run by hand (not part of the tests):

    python benchmarks/bench_creepage.py [--slots 200] [--above 2] [--below 5]

The board is a grid of cells, one per slot.  Each cell holds a routed slot 2 mm wide (round
ends, flattened like a drill file's slots) with ``--above`` round 1.6 mm pads of 800 V
nets above it and ``--below`` pads of 0 V nets below it; every pad above is within the
8 mm creepage that IEC 60664-1 asks at 800 V (pollution degree 2, material group IIIa,
basic or functional insulation) of every pad below, but the slot blocks the straight line,
so every such pair needs a surface geodesic.  Every other cell has a shorter slot (6 mm
instead of 10 mm), so some pairs fall short (findings) and others pass.  Prints the counts and the times as
rows for the README's benchmark table.
"""
from __future__ import annotations

import argparse
import platform
import resource
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from shapely.geometry import LineString, box  # noqa: E402

from layoutcheck.checks import CheckContext, creepage  # noqa: E402
from layoutcheck.geometry.arcs import circle, quad_segs_for  # noqa: E402
from layoutcheck.model import Board, CopperShape, Hole  # noqa: E402
from layoutcheck.netgraph import build_netgraph  # noqa: E402
from layoutcheck.project import project_from_data  # noqa: E402

CELL_X, CELL_Y = 20.0, 24.0


def make_board(slots: int, above: int, below: int) -> Board:
    """The synthetic board (mm): ``slots`` cells on a grid 20 cells wide."""
    cols = 20
    rows = (slots + cols - 1) // cols
    shapes, holes = [], []
    for k in range(slots):
        cx = (k % cols + 0.5) * CELL_X
        cy = (k // cols + 0.5) * CELL_Y
        half = 5.0 if k % 2 == 0 else 3.0          # 10 mm or 6 mm long slot
        path = LineString([(cx - half + 1.0, cy), (cx + half - 1.0, cy)])
        geom = path.buffer(1.0, quad_segs=quad_segs_for(1.0))
        holes.append(Hole(geometry=geom, diameter=2.0, plated=False, span=("top", "bottom"),
                          is_slot=True))
        for i in range(above):
            x = cx + 2.5 * (i - (above - 1) / 2)
            shapes.append(CopperShape(circle(x, cy + 3.0, 1.6), "top", f"HV_{k}_{i}",
                                      component=f"U{k}", pin=str(i + 1),
                                      function="ComponentPad", kind="flash"))
        for j in range(below):
            x = cx + 2.5 * (j - (below - 1) / 2)
            shapes.append(CopperShape(circle(x, cy - 3.0, 1.6), "top", f"N_{k}_{j}",
                                      component=f"U{k}", pin=str(above + j + 1),
                                      function="ComponentPad", kind="flash"))
    return Board(name="creepage-bench", copper_layers=["top", "bottom"], shapes=shapes,
                 holes=holes, outline=box(0, 0, cols * CELL_X, rows * CELL_Y),
                 has_net_names=True)


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--slots", type=int, default=200)
    ap.add_argument("--above", type=int, default=2)
    ap.add_argument("--below", type=int, default=5)
    a = ap.parse_args(argv)
    board = make_board(a.slots, a.above, a.below)
    project = project_from_data({
        "voltages": {"HV_*": 800, "*": 0},
        "environment": {"standard": "iec60664-1", "pollution_degree": 2,
                        "material_group": "IIIa", "overvoltage_category": "II"}}, None)
    t0 = time.perf_counter()
    graph = build_netgraph(board)
    t_graph = time.perf_counter() - t0

    calls = {"all": 0, "geodesic": 0, "time": 0.0}
    real = creepage.geodesic

    def counted(domain, x, y, limit=float("inf")):
        t = time.perf_counter()
        geo = real(domain, x, y, limit)
        calls["time"] += time.perf_counter() - t
        calls["all"] += 1
        if geo is None or not geo.straight:
            calls["geodesic"] += 1
        return geo

    creepage.geodesic = counted
    try:
        t0 = time.perf_counter()
        found = creepage.findings(CheckContext(board, graph, project))
        t_rule = time.perf_counter() - t0
    finally:
        creepage.geodesic = real
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0
    print(f"machine: {platform.machine()}, Python {platform.python_version()}; "
          f"{len(board.holes)} slots, {len(graph.nets)} nets, "
          f"{calls['all']} place/pair measurements of which {calls['geodesic']} needed a "
          f"geodesic (straight line blocked), {len(found)} findings")
    print("| stage | time (s) |")
    print("|---|---|")
    print(f"| net graph | {t_graph:.2f} |")
    print(f"| creepage rule (surface, places, geodesics) | {t_rule:.2f} |")
    print(f"| of which geodesics ({calls['geodesic']}) | {calls['time']:.2f} |")
    print(f"| peak resident memory | {peak:.0f} MB |")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
