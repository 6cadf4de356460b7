"""Benchmark: generate a board of ~N copper features and time read + net graph + checks.

Run by hand (not part of the tests):

    python benchmarks/bench_review.py [--features 50000] [--seed 0]

Prints one Markdown table row per stage for the README's benchmark table.  Peak memory is
the process's maximum resident set size (Linux ``ru_maxrss``).
"""
from __future__ import annotations

import argparse
import platform
import resource
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from big_board import make_big_board  # noqa: E402

from layoutcheck.checks import CheckContext, run_checks  # noqa: E402
from layoutcheck.netgraph import build_netgraph  # noqa: E402
from layoutcheck.project import find_project_file, load_project  # noqa: E402
from layoutcheck.readers import read_board  # noqa: E402


def peak_mb() -> float:
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--features", type=int, default=50_000)
    ap.add_argument("--seed", type=int, default=0)
    a = ap.parse_args(argv)
    with tempfile.TemporaryDirectory() as tmp:
        t0 = time.perf_counter()
        folder = make_big_board(Path(tmp), a.features, a.seed)
        t_gen = time.perf_counter() - t0
        project = load_project(find_project_file(folder))
        t0 = time.perf_counter()
        board = read_board(folder, project)
        t_read = time.perf_counter() - t0
        t0 = time.perf_counter()
        graph = build_netgraph(board)
        t_graph = time.perf_counter() - t0
        t0 = time.perf_counter()
        findings = run_checks(CheckContext(board, graph, project))
        t_check = time.perf_counter() - t0
    print(f"machine: {platform.machine()}, Python {platform.python_version()}, "
          f"{len(board.shapes)} copper shapes, {len(board.holes)} holes, "
          f"{len(graph.nets)} nets, {len(findings)} findings (generation {t_gen:.1f} s)")
    print("| stage | time (s) |")
    print("|---|---|")
    print(f"| read Gerber + drill | {t_read:.2f} |")
    print(f"| net graph | {t_graph:.2f} |")
    print(f"| all checks | {t_check:.2f} |")
    print(f"| total | {t_read + t_graph + t_check:.2f} |")
    print(f"peak resident memory: {peak_mb():.0f} MB")
    return 0


if __name__ == "__main__":
    sys.exit(main())
