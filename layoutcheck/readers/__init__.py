"""Readers: files in, a :class:`~layoutcheck.model.Board` out.  They never print.

``read_board(path, project)`` dispatches on what ``path`` holds: a single IPC-2581 XML file
(root element ``IPC-2581``, any namespace; :mod:`.ipc2581`), or a folder or zip of Gerber +
NC drill files, or a single such file.  (Stripboard plans are a further reader.)
"""
from __future__ import annotations

from pathlib import Path

from ..limits import DEFAULT_LIMITS, Limits
from ..model import Board
from ..project import Project
from .fabset import collect


def read_board(path: Path | str, project: Project, *, limits: Limits = DEFAULT_LIMITS,
               progress=None) -> Board:
    """Read the board at ``path`` (IPC-2581 file, folder, zip or single fab file).  Units: mm."""
    from .gerber_board import board_from_fab_files
    from .ipc2581 import is_ipc2581, read_ipc2581

    path = Path(path)
    if path.is_file() and is_ipc2581(path):
        return read_ipc2581(path, project, limits=limits, progress=progress)
    files = collect(path, limits)
    name = path.stem if path.is_file() else path.resolve().name
    board = board_from_fab_files(files, project, name=name, limits=limits, progress=progress)
    board.source = str(path)
    return board
