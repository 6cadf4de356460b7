"""Benchmark: loop inductance of a 2,000-segment loop, and every loop of the sample boards.

Run by hand (not part of the tests):

    python benchmarks/bench_loops.py

Prints Markdown table rows for the README.
"""
from __future__ import annotations

import sys
import time
from pathlib import Path

import numpy as np

from layoutcheck.loops import LoopContext, evaluate_legs
from layoutcheck.netgraph import build_netgraph
from layoutcheck.physics.inductance import loop_inductance, trace_segments
from layoutcheck.project import find_project_file, load_project
from layoutcheck.readers import read_board

ROOT = Path(__file__).resolve().parent.parent


def rectangle(n_segments: int, a: float = 40.0, b: float = 15.0) -> list:
    """A closed a x b mm rectangle of 3 mm / 35 um trace cut into ``n_segments`` pieces."""
    per = n_segments // 4
    corners = [(0, 0), (a, 0), (a, b), (0, b), (0, 0)]
    pts = []
    for (x0, y0), (x1, y1) in zip(corners, corners[1:]):
        t = np.linspace(0, 1, per, endpoint=False)
        pts += list(zip(x0 + (x1 - x0) * t, y0 + (y1 - y0) * t))
    pts.append((0.0, 0.0))
    return trace_segments(pts, z=0.0, width=3.0, thickness=0.035)


def main() -> int:
    print("| case | segments | L (nH) | time (s) |")
    print("|---|---|---|---|")
    for n in (4, 2000):
        segs = rectangle(n)
        t0 = time.perf_counter()
        L = loop_inductance(segs)
        dt = time.perf_counter() - t0
        print(f"| 40 x 15 mm rectangle, 3 mm trace | {len(segs)} | {L * 1e9:.2f} | {dt:.3f} |")
    for rev in ("a", "b"):
        folder = ROOT / "sample_boards" / f"fullbridge-rev-{rev}"
        project = load_project(find_project_file(folder))
        board = read_board(folder, project)
        graph = build_netgraph(board)
        t0 = time.perf_counter()
        legs = evaluate_legs(LoopContext(board, graph, project))
        dt = time.perf_counter() - t0
        n = sum(len(leg.loops) for leg in legs)
        print(f"| every loop of fullbridge-rev-{rev} ({len(legs)} legs, {n} loops) | - | - | "
              f"{dt:.3f} |")
    return 0


if __name__ == "__main__":
    sys.exit(main())
