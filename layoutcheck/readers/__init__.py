"""Readers: files in, a :class:`~layoutcheck.model.Board` out.  They never print.

``read_board(path, project)`` dispatches on what ``path`` holds: a folder or zip of Gerber +
NC drill files, or a single such file.  (IPC-2581 files and stripboard plans are further
readers with their own modules.)
"""
from __future__ import annotations

from pathlib import Path

from ..limits import DEFAULT_LIMITS, Limits
from ..model import Board
from ..project import Project
from .fabset import collect


def read_board(path: Path | str, project: Project, *, limits: Limits = DEFAULT_LIMITS,
               progress=None) -> Board:
    """Read the board at ``path`` (folder, zip or single fab file).  Units: mm."""
    from .gerber_board import board_from_fab_files

    path = Path(path)
    files = collect(path, limits)
    name = path.stem if path.is_file() else path.resolve().name
    board = board_from_fab_files(files, project, name=name, limits=limits, progress=progress)
    board.source = str(path)
    return board
