"""Readers: files in, a :class:`~layoutcheck.model.Board` out.  They never print.

``read_board(path, project)`` dispatches on what ``path`` holds: a single IPC-2581 XML file
(root element ``IPC-2581``, any namespace; :mod:`.ipc2581`), or a folder or zip of Gerber +
NC drill files, or a single such file, or a stripboard plan (a ``.toml`` file with a
``[stripboard]`` table; :mod:`.plan`).

Netlists (:mod:`.ipc356`, applied by :mod:`.netlist_apply`): the project file's
``[board] netlist`` names an IPC-D-356(A) file; without it, a folder or zip holding exactly
one file that reads as IPC-D-356 uses that one (said so in the assumptions).  Netlist files
are taken out of the Gerber set before it is read.  Several netlists and no project key is
an error (which one?), as is a single file that is only a netlist (it has no copper).
"""
from __future__ import annotations

from pathlib import Path

from ..errors import InputFileError, ProjectFileError
from ..limits import DEFAULT_LIMITS, Limits
from ..model import Assumption, Board
from ..project import Project
from .fabset import FabFile, collect


def read_board(path: Path | str, project: Project, *, limits: Limits = DEFAULT_LIMITS,
               progress=None) -> Board:
    """Read the board at ``path`` (IPC-2581 file, folder, zip or single fab file).  Units: mm.

    An IPC-D-356 netlist (from ``project.netlist`` or found among the files) names the copper
    and is checked against it (``board.netlist_problems``).
    """
    from .gerber_board import board_from_fab_files
    from .ipc2581 import is_ipc2581, read_ipc2581
    from .ipc356 import looks_like_ipc356

    from .plan import is_plan, read_plan

    path = Path(path)
    if is_plan(path):
        return read_plan(path)
    if path.is_file() and is_ipc2581(path):
        board = read_ipc2581(path, project, limits=limits, progress=progress)
        _apply(board, _choose_netlist(project, [], limits))
        return board
    files = collect(path, limits)
    netlists = [f for f in files if looks_like_ipc356(f.head())]
    if path.is_file() and netlists and len(files) == 1:
        raise InputFileError(
            "this is an IPC-D-356 netlist: it names nets but has no copper; review the "
            "folder or zip with the Gerber and NC drill files (the netlist beside them is "
            "picked up) or name it in [board] netlist of the project file", file=str(path))
    chosen = _choose_netlist(project, netlists, limits, files)
    used = chosen[2] if chosen is not None else None
    fab = [f for f in files if f not in netlists and f.name != used]
    name = path.stem if path.is_file() else path.resolve().name
    board = board_from_fab_files(fab, project, name=name, limits=limits, progress=progress)
    board.source = str(path)
    _apply(board, chosen)
    return board


def _apply(board: Board, chosen) -> None:
    from .netlist_apply import apply_netlist

    if chosen is None:
        return
    netlist, notes, _ = chosen
    board.assumptions.extend(a for a in notes if a not in board.assumptions)
    apply_netlist(board, netlist)


def _choose_netlist(project: Project, found: list[FabFile], limits: Limits,
                    files: list[FabFile] = ()):
    """(Netlist, assumptions, member name or ``None``) to apply, or ``None``.

    ``found`` are the files that read as IPC-D-356, ``files`` every board file (the
    project file may name a member of a zip that is not on disk).  See the module
    docstring.
    """
    from .ipc356 import decode, parse_ipc356, read_ipc356

    notes: list[Assumption] = []
    if project.netlist is not None:
        target = Path(project.netlist)
        others = [f.name for f in found if _base_name(f.name) != target.name]
        if others:
            notes.append(Assumption("input", "IPC-D-356 file(s) not read, the project file "
                                    "names another netlist: " + ", ".join(others)))
        member = next((f for f in (*found, *files) if _base_name(f.name) == target.name),
                      None)
        if target.is_file():
            return (read_ipc356(target, limits=limits), notes,
                    member.name if member is not None else None)
        if member is not None:
            return parse_ipc356(decode(member.data), member.name), notes, member.name
        raise ProjectFileError(
            f"[board] netlist names {target.name}, which is not there (looked for "
            f"{target} and among the board files)",
            file=str(project.path) if project.path else None, element="[board] netlist")
    if not found:
        return None
    if len(found) > 1:
        raise InputFileError(
            "several IPC-D-356 netlists among the board files (" +
            ", ".join(f.name for f in found) + "); name the one to use with [board] "
            "netlist in the project file", file=found[0].name)
    f = found[0]
    notes.append(Assumption("input", f"{f.name}: read as the board's IPC-D-356 netlist (the "
                            "only one among the files; no [board] netlist in a project file)"))
    return parse_ipc356(decode(f.data), f.name), notes, f.name


def _base_name(name: str) -> str:
    """The last part of a file or archive member name."""
    return name.replace("\\", "/").rsplit("/", 1)[-1]
