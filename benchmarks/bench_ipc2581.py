"""Benchmark: write the synthetic big board as one IPC-2581 file and time reading it.

Run by hand (not part of the tests):

    python benchmarks/bench_ipc2581.py [--features 50000] [--seed 0] [--units MILLIMETER]

The board is :func:`big_board.build_big_board` (the same design as ``bench_review.py``),
written by :func:`layoutcheck.writers.ipc2581.write_ipc2581`.  Reading runs in a fresh
child process so that its peak resident memory (Linux ``VmHWM`` of that process, else
``ru_maxrss``) is the reader's alone, not the generator's.  Prints a Markdown table row for the README.
"""
from __future__ import annotations

import argparse
import json
import platform
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
sys.path.insert(0, str(HERE.parent))

from big_board import build_big_board, feature_count  # noqa: E402

from layoutcheck.writers.ipc2581 import UNITS, write_ipc2581  # noqa: E402

_CHILD = r"""
import json, resource, sys, time
def peak_kb():
    # VmHWM is this process's own high-water mark (ru_maxrss may keep the parent's
    # figure from before exec on Linux)
    try:
        with open("/proc/self/status") as f:
            for line in f:
                if line.startswith("VmHWM:"):
                    return int(line.split()[1])
    except OSError:
        pass
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
from layoutcheck.project import load_project
from layoutcheck.readers import read_board
base = peak_kb()
t0 = time.perf_counter()
board = read_board(sys.argv[1], load_project(None))
t = time.perf_counter() - t0
print(json.dumps({"seconds": t, "peak_kb": peak_kb(), "base_kb": base,
                  "shapes": len(board.shapes), "holes": len(board.holes),
                  "components": len(board.components), "layers": board.copper_layers}))
"""


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--features", type=int, default=50_000)
    ap.add_argument("--seed", type=int, default=0)
    ap.add_argument("--units", choices=sorted(UNITS), default="MILLIMETER")
    a = ap.parse_args(argv)
    with tempfile.TemporaryDirectory() as tmp:
        t0 = time.perf_counter()
        design = build_big_board(a.features, a.seed)
        path = write_ipc2581(design, Path(tmp) / "bigboard.xml", units=a.units)
        t_write = time.perf_counter() - t0
        size_mb = path.stat().st_size / 1e6
        out = subprocess.run([sys.executable, "-c", _CHILD, str(path)], check=True,
                             capture_output=True, text=True, cwd=str(HERE.parent))
        r = json.loads(out.stdout.strip().splitlines()[-1])
    print(f"machine: {platform.machine()}, Python {platform.python_version()}, "
          f"{feature_count(design)} design features, file {size_mm_text(size_mb)}, "
          f"{r['shapes']} copper shapes, {r['holes']} holes, {r['components']} components "
          f"(generation + writing {t_write:.1f} s)")
    print("| stage | time (s) | peak memory (MB) |")
    print("|---|---|---|")
    print(f"| read IPC-2581 ({a.units.lower()}) | {r['seconds']:.2f} | "
          f"{r['peak_kb'] / 1024:.0f} (interpreter and imports alone: "
          f"{r['base_kb'] / 1024:.0f}) |")
    return 0


def size_mm_text(mb: float) -> str:
    return f"{mb:.1f} MB"


if __name__ == "__main__":
    sys.exit(main())
