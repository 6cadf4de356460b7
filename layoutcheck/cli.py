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
    svg: Path | None = typer.Option(None, "--svg", help="Write a drawing of a stripboard "
                                    "plan (copper and part side, findings marked) here."),
):
    """Review a board: spacing, connectivity and the other rules; exit 1 if errors."""
    from .reports import json_report, text_report
    from .review import review

    result = review(path, project, progress=_progress())
    if svg is not None:
        if getattr(result.board, "plan", None) is None:
            sys.stderr.write("layoutcheck: --svg: a drawing is only available for "
                             "stripboard plans; none written\n")
        else:
            from .reports import plan_svg
            write_output(plan_svg.render(result), svg)
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


@app.command("spacing")
def spacing_cmd(
    volts: float = typer.Option(..., "--volts", help="Working voltage between the two "
                                "conductors, V (DC or peak)."),
    rms: float | None = typer.Option(None, "--rms", help="RMS working voltage for creepage, "
                                     "V (default: --volts; DC counts as RMS)."),
    impulse: float | None = typer.Option(None, "--impulse", help="Impulse voltage across "
                                         "the gap, V peak (default: IEC Table F.1)."),
    standard: str | None = typer.Option(None, "--standard",
                                        help="iec60664-1 (default), ipc2221b or both."),
    pollution_degree: str | None = typer.Option(None, "--pollution-degree",
                                                help="1, 2 (default) or 3."),
    material_group: str | None = typer.Option(None, "--material-group",
                                              help="I, II, IIIa (default) or IIIb."),
    overvoltage_category: str | None = typer.Option(None, "--overvoltage-category",
                                                    help="I, II (default), III or IV."),
    insulation: str | None = typer.Option(None, "--insulation", help="functional, basic "
                                          "(default), supplementary or reinforced."),
    altitude: float | None = typer.Option(None, "--altitude",
                                          help="Altitude in metres (default 0)."),
    coating: str | None = typer.Option(None, "--coating", help="none (default), "
                                       "solder-mask or conformal (IPC-2221B column)."),
    inner: bool = typer.Option(False, "--inner", help="Conductors on an internal layer."),
    termination: bool = typer.Option(False, "--termination", help="A component "
                                     "termination is one of the two features (IPC-2221B)."),
    interpolate: bool = typer.Option(False, "--interpolate", help="Interpolate between "
                                     "table rows instead of taking the next row up."),
    creepage_columns: str | None = typer.Option(
        None, "--creepage-columns", help="material-group (default) or printed-wiring: "
        "which columns of IEC 60664-1 Table F.4 give creepage on a printed board."),
    format: Format = typer.Option(Format.text, "--format", help="Output format."),
):
    """Required clearance and creepage for a voltage, without a board."""
    from .physics.requirements import SpacingProfile, required_spacing
    from .reports import spacing_report

    given = {"standard": standard, "pollution_degree": pollution_degree,
             "material_group": material_group, "overvoltage_category": overvoltage_category,
             "insulation": insulation, "altitude_m": altitude, "coating": coating,
             "creepage_columns": creepage_columns}
    profile = SpacingProfile(**{k: v for k, v in given.items() if v is not None},
                             interpolate=interpolate)
    req = required_spacing(profile, volts, rms_v=rms, impulse_v=impulse,
                           layer_outer=not inner, termination=termination)
    defaults = sorted(k for k, v in given.items() if v is None)
    inputs = {"volts": volts, "rms_v": rms, "impulse_v": impulse, "interpolate": interpolate,
              "inner": inner, "termination": termination}
    render = spacing_report.render_json if format is Format.json else spacing_report.render_text
    typer.echo(render(profile, req, inputs, defaults, list(given)), nl=False)


@app.command("loop")
def loop_cmd(
    path: Path = typer.Argument(..., help="Folder or zip of fab files, a fab file, or a "
                                          "project file (layoutcheck.toml)."),
    through: str = typer.Option(..., "--through", help="The loop as pads REF.PIN in order, "
                                "comma-separated, e.g. C3.1,Q1.2,Q1.3,Q2.2,Q2.3,C3.2; the "
                                "last pad joins the first."),
    project: Path | None = typer.Option(None, "--project", help="Project file to use."),
    format: Format = typer.Option(Format.text, "--format", help="Output format."),
    out: Path | None = typer.Option(None, "--out", help="Write the output to this file."),
):
    """Inductance, overshoot and ringing of one current loop given as a pad sequence;
    exit 1 if its peak exceeds the derated switch rating."""
    from .loops import evaluate_through
    from .netgraph import build_netgraph
    from .readers import read_board
    from .reports import loop_report
    from .review import resolve_inputs

    fab_path, proj = resolve_inputs(path, project)
    board = read_board(fab_path, proj, progress=_progress())
    graph = build_netgraph(board)
    result = evaluate_through(board, graph, proj, through)
    for a in reversed([*proj.assumptions, *board.assumptions]):
        if a not in result.assumptions:
            result.assumptions.insert(0, a)
    render = loop_report.render_json if format is Format.json else loop_report.render_text
    write_output(render(result), out)
    raise typer.Exit(1 if result.errors else 0)


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
