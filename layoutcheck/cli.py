"""The command line.  It parses options, calls the library and picks a report; no logic.

Exit codes: 0 no errors found, 1 errors found, 2 bad input or usage.
"""
from __future__ import annotations

import os
import sys
import tempfile
from enum import Enum
from pathlib import Path

import typer

from .errors import LayoutcheckError, UsageError

app = typer.Typer(add_completion=False, no_args_is_help=True,
                  help="Review a power-stage board layout before it is built.")


class Format(str, Enum):
    text = "text"
    json = "json"


def _progress():
    if not sys.stderr.isatty():
        return None

    def show(name: str, i: int, total: int) -> None:
        if i >= total:
            sys.stderr.write("\r" + " " * 78 + "\r")
        else:
            sys.stderr.write(f"\rreading {i + 1}/{total}: {name[:60]:<60}")
        sys.stderr.flush()
    return show


def write_output(text: str, out: Path | None) -> None:
    """Write to ``out`` atomically (temp file + rename), or to stdout."""
    if out is None:
        sys.stdout.write(text)
        sys.stdout.flush()
        return
    out = Path(out)
    folder = out.parent if str(out.parent) else Path(".")
    if not folder.is_dir():
        raise UsageError(f"--out: folder {folder} does not exist")
    fd, tmp = tempfile.mkstemp(prefix=".layoutcheck-", dir=folder)
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as fh:
            fh.write(text)
        os.replace(tmp, out)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


@app.command("review")
def review_cmd(
    path: Path = typer.Argument(..., help="Folder or zip of fab files, a fab file, or a "
                                          "project file (layoutcheck.toml)."),
    project: Path | None = typer.Option(None, "--project", help="Project file to use."),
    format: Format = typer.Option(Format.text, "--format", help="Report format."),
    out: Path | None = typer.Option(None, "--out", help="Write the report to this file."),
):
    """Review a board: spacing, connectivity and the other rules; exit 1 if errors."""
    from .reports import json_report, text_report
    from .review import review

    result = review(path, project, progress=_progress())
    text = (json_report if format is Format.json else text_report).render(result)
    write_output(text, out)
    raise typer.Exit(1 if result.errors else 0)


@app.command("init")
def init_cmd(
    folder: Path = typer.Argument(..., help="Folder (or zip) of fab files."),
    force: bool = typer.Option(False, "--force", help="Overwrite an existing project file."),
):
    """Write a starter layoutcheck.toml listing every net found on the board."""
    from .starter import starter_project_text
    from .project import PROJECT_FILE_NAME, load_project
    from .readers import read_board
    from .netgraph import build_netgraph

    if not folder.is_dir():
        raise UsageError(f"{folder}: init needs a folder of fab files")
    target = folder / PROJECT_FILE_NAME
    if target.exists() and not force:
        raise UsageError(f"{target} exists; use --force to overwrite it")
    board = read_board(folder, load_project(None), progress=_progress())
    graph = build_netgraph(board)
    write_output(starter_project_text(board, graph), target)
    typer.echo(f"wrote {target} ({len(graph.nets)} nets); check every voltage in it")


def main(argv: list[str] | None = None) -> int:
    """Run the command line with ``argv`` (default: sys.argv[1:]); return the exit code."""
    cmd = typer.main.get_command(app)
    try:
        rc = cmd.main(args=argv, prog_name="layoutcheck", standalone_mode=False)
    except LayoutcheckError as e:
        sys.stderr.write(f"layoutcheck: {e}\n")
        return 2
    except Exception as e:  # the CLI framework's own exits and usage errors
        kind = type(e).__name__
        if kind == "Exit" and hasattr(e, "exit_code"):
            return e.exit_code
        if kind == "Abort":
            sys.stderr.write("layoutcheck: aborted\n")
            return 2
        if hasattr(e, "show") and hasattr(e, "exit_code"):
            e.show()
            return 2
        raise
    return rc if isinstance(rc, int) else 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
