"""Safety limits for untrusted input (a fab house or CI may review uploads).

Each limit is generous for real boards and stops absurd files before they exhaust memory.
Lengths are millimetres.  Readers raise :class:`layoutcheck.errors.ResourceLimitError`
naming the limit when one is exceeded.
"""
from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Limits:
    max_aperture_mm: float = 1000.0          # no pad or stroke wider than a metre
    max_coordinate_mm: float = 10_000.0      # |x|, |y| within 10 m of the origin
    max_objects_per_file: int = 5_000_000    # graphic objects in one Gerber file
    max_outline_vertices: int = 5_000        # Gerber spec limit for macro outline primitive
    max_region_vertices: int = 2_000_000     # points in one region statement
    max_step_repeat: int = 100_000           # nx * ny of one SR block
    max_step_repeat_objects: int = 5_000_000 # objects created by SR copies
    max_block_depth: int = 20                # nesting of block apertures
    max_macro_primitives: int = 10_000
    max_polygon_vertices: int = 12           # regular polygon aperture (spec: 3..12)
    max_file_bytes: int = 512 * 1024 * 1024  # one fab file
    max_zip_members: int = 2_000
    max_zip_total_bytes: int = 1024 * 1024 * 1024   # sum of expanded sizes
    max_zip_ratio: float = 500.0             # expanded / compressed per member
    max_drill_hits: int = 2_000_000
    max_arc_segments: int = 10_000           # chords in one flattened arc
    max_total_vertices: int = 50_000_000     # polygon vertices one file may create


DEFAULT_LIMITS = Limits()
