"""The review pipeline: inputs -> board -> net graph -> checks -> a :class:`Review`.

``review(path)`` accepts a folder or zip of fab files, a single fab file, or a project file
(``layoutcheck.toml``).  Units in everything it returns: mm, V, A, H.
"""
from __future__ import annotations

import tomllib
import zipfile
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path

from .checks import CheckContext, applicable_modules, run_checks
from .errors import InputFileError, ProjectFileError
from .findings import Finding
from .limits import DEFAULT_LIMITS, Limits
from .model import Assumption, Board
from .netgraph import NetGraph, build_netgraph
from .project import PROJECT_FILE_NAME, Project, find_project_file, load_project, project_from_data
from .readers import read_board


@dataclass
class Review:
    """The result of one review: the board read, its nets, the findings and assumptions."""

    board: Board
    graph: NetGraph
    project: Project
    findings: list[Finding] = field(default_factory=list)
    assumptions: list[Assumption] = field(default_factory=list)
    rules_run: list[str] = field(default_factory=list)

    @property
    def errors(self) -> int:
        return sum(f.severity == "error" for f in self.findings)


def resolve_inputs(path: Path | str, project_path: Path | str | None = None,
                   limits: Limits = DEFAULT_LIMITS) -> tuple[Path, Project]:
    """Decide which fab files and which project file a review uses.

    * ``project_path`` given: that project file; fab files from its ``[board] files``
      unless ``path`` is itself a folder, zip or fab file.
    * ``path`` is a ``.toml`` file with a ``[stripboard]`` table: a stripboard plan, which
      is also its own project file (unless ``project_path`` names another).
    * ``path`` is another ``.toml`` file: it is the project file.
    * ``path`` is a folder: ``layoutcheck.toml`` inside it, if any.
    * ``path`` is a zip: a ``layoutcheck.toml`` member at its top level, if any.
    """
    path = Path(path)
    if not path.exists():
        raise InputFileError("no such file or folder", file=str(path))
    plan = "stripboard" in _toml_tables(path)
    if project_path is not None:
        project = load_project(Path(project_path))
        if plan:
            return path, project
        if path.suffix.lower() == ".toml" and path.resolve() == Path(project_path).resolve():
            return (project.board_files or path.parent), project
        return path, project
    if path.is_file() and path.suffix.lower() == ".toml":
        project = load_project(path)
        if plan:
            return path, project
        return (project.board_files or path.parent), project
    if path.is_dir():
        pf = find_project_file(path)
        project = load_project(pf)
        return path, project
    if zipfile.is_zipfile(path):
        proj = project_from_zip(path)
        if proj is not None:
            return path, proj
    return path, load_project(None)


def _toml_tables(path: Path) -> set[str]:
    """Top-level table names of a ``.toml`` file (empty for anything else or bad TOML)."""
    if not (path.is_file() and path.suffix.lower() == ".toml"):
        return set()
    try:
        return set(tomllib.loads(path.read_text("utf-8")))
    except (OSError, UnicodeDecodeError, tomllib.TOMLDecodeError):
        return set()


def project_from_zip(path: Path) -> Project | None:
    """The ``layoutcheck.toml`` at the top level of a zip archive, if there is one."""
    with zipfile.ZipFile(path) as zf:
        names = [n for n in zf.namelist() if n == PROJECT_FILE_NAME]
        if not names:
            return None
        info = zf.getinfo(names[0])
        if info.file_size > 1 << 20:
            raise ProjectFileError("project file in the archive is over 1 MiB",
                                   file=f"{path.name}:{PROJECT_FILE_NAME}")
        text = zf.read(info).decode("utf-8", "replace")
    where = Path(f"{path}:{PROJECT_FILE_NAME}")
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as e:
        raise ProjectFileError(f"not valid TOML: {e}", file=str(where)) from e
    proj = project_from_data(data, None, text)
    proj.path = where
    return proj


def review(path: Path | str, project_path: Path | str | None = None, *,
           limits: Limits = DEFAULT_LIMITS,
           progress: Callable[[str, int, int], None] | None = None) -> Review:
    """Read a board and run every rule.  Raises LayoutcheckError on bad input."""
    fab_path, project = resolve_inputs(path, project_path, limits)
    board = read_board(fab_path, project, limits=limits, progress=progress)
    graph = build_netgraph(board)
    ctx = CheckContext(board, graph, project)
    modules = applicable_modules(ctx, project.ignore_rules)
    findings = run_checks(ctx, project.ignore_rules, modules)
    assumptions: list[Assumption] = []
    for a in (*project.assumptions, *board.assumptions, *ctx.assumptions,
              *project.voltage_assumptions(graph.nets)):
        if a not in assumptions:
            assumptions.append(a)
    if project.ignore_rules:
        assumptions.append(Assumption("rules", "not run, as the project file says: " +
                                      ", ".join(project.ignore_rules)))
    ran = [rid for mod in modules for rid in mod.RULE_IDS if rid not in project.ignore_rules]
    return Review(board, graph, project, findings, assumptions, ran)
