"""IPC-2221B Table 6-1 electrical conductor spacing: the table, the lookup and the column.

Units: volts in, millimetres out.

The table lives in ``rules/ipc2221b.toml`` (installed as ``layoutcheck/_rules/``) with the
provenance of every value.  **All values are from memory** (the standard was not at hand;
its structure, the per-volt factors and the A5/A7 difference at 251-300 V were cross-checked
second-hand, see the TOML file).  Every :class:`Requirement` says so in its ``basis``.

Row selection
    A voltage ``V`` selects the first row whose upper bound is >= ``V``.  The table's rows
    are whole volts (0-15, 16-30, ...); a voltage falling between two rows (15.5 V) takes
    the higher row, which is the conservative choice.  Above 500 V the spacing is
    ``s(500) + (V - 500) * k`` with the column's per-volt value ``k`` (the "add-to-500"
    reading; the TOML file says why it was chosen).

Column choice (:func:`ipc2221b_column`) -- our reading of the column headings
    * internal layer -> **B1**.
    * external, conformal coating -> **A7** where a component termination is involved,
      else **A5**.
    * external, solder mask -> conductors are coated: **B4**.  Solder-mask openings leave
      pads bare, so where a termination is involved the pair is treated as uncoated:
      **A6** up to 3050 m; above 3050 m **B3**, because A6 is only defined up to 3050 m and
      B3 is the uncoated-above-3050 m column.
    * external, no coating -> **A6** where a termination is involved (up to 3050 m), else
      **B2** up to 3050 m; above 3050 m **B3** for both.

    The headings do not say how to combine "termination" with "above 3050 m" or with a
    mask that covers the tracks but not the pads; the choices above are ours, made to err
    on the side of the larger spacing where the headings leave a gap.
"""
from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path

import layoutcheck

from ..errors import LayoutcheckError, UsageError

#: Column letters of Table 6-1, in table order.
COLUMNS = ("B1", "B2", "B3", "B4", "A5", "A6", "A7")
#: Altitude (m) up to which B2 and A6 apply (the table's "sea level to 3050 m").
ALTITUDE_LIMIT_M = 3050.0
#: Coatings understood by :func:`ipc2221b_column` (same words as the project file).
COATINGS = ("none", "solder-mask", "conformal")


@dataclass(frozen=True)
class Requirement:
    """A required spacing.

    mm:     the minimum spacing in millimetres.
    basis:  where it comes from (standard, table, column, row, value, provenance).
    row:    the row label (``"301-500 V"``, or ``"above 500 V"``).
    column: the column letter (``"B2"``).
    """

    mm: float
    basis: str
    row: str
    column: str


@dataclass(frozen=True)
class TableRow:
    """One voltage row: ``upper_v`` (V) is its highest voltage; ``values`` mm per column."""

    label: str
    upper_v: float
    values: dict
    source: str


@dataclass(frozen=True)
class SpacingTable:
    """A loaded spacing table (see ``rules/ipc2221b.toml`` for the meaning of each field).

    rows are sorted by ``upper_v``; ``per_volt_mm`` (mm per volt) applies above ``above_v``
    volts by adding to the last row's value.
    """

    name: str
    title: str
    verified: bool
    source: str
    columns: tuple
    column_short: dict
    column_meaning: dict
    rows: tuple
    above_v: float
    per_volt_mm: dict
    above_source: str
    above_why: str
    path: Path

    @property
    def reference(self) -> str:
        """Short citation, e.g. ``"IPC-2221B Table 6-1"`` (the title up to its comma)."""
        return self.title.split(",")[0].strip()

    def provenance_word(self) -> str:
        """``"table value from memory"`` or ``"table value"`` once verified."""
        return "table value" if self.verified else "table value from memory"


def rules_dir() -> Path:
    """The folder holding the rule tables: the installed ``_rules`` or the repo's ``rules``."""
    pkg = Path(layoutcheck.__file__).parent
    installed = pkg / "_rules"
    if installed.is_dir():
        return installed
    return pkg.parent / "rules"


@lru_cache(maxsize=None)
def load_table(name: str = "ipc2221b") -> SpacingTable:
    """Load and check the spacing table ``<name>.toml`` (cached).

    Raises :class:`layoutcheck.errors.LayoutcheckError` naming the file when the table is
    missing or malformed (a broken installation, not a user input).
    """
    path = rules_dir() / f"{name}.toml"
    try:
        data = tomllib.loads(path.read_text(encoding="utf-8"))
    except OSError as e:
        raise LayoutcheckError(f"cannot read the spacing table: {e.strerror}",
                               file=str(path)) from e
    except tomllib.TOMLDecodeError as e:
        raise LayoutcheckError(f"the spacing table is not valid TOML: {e}",
                               file=str(path)) from e

    def bad(msg: str):
        raise LayoutcheckError(f"malformed spacing table: {msg}", file=str(path))

    try:
        t = data["table"]
        columns = tuple(t["columns"])
        meaning = data["columns_meaning"]
        rows = []
        for r in data["rows"]:
            vals = {c: float(r[c]) for c in columns}
            rows.append(TableRow(str(r["label"]), float(r["upper_v"]), vals, str(r["source"])))
        above = data["above_500"]
        per_volt = {c: float(above["per_volt_mm"][c]) for c in columns}
    except (KeyError, TypeError, ValueError) as e:
        bad(f"missing or wrong entry ({e!s})")
    rows.sort(key=lambda r: r.upper_v)
    if not rows:
        bad("no rows")
    for c in columns:
        seq = [r.values[c] for r in rows]
        if any(v <= 0 for v in seq) or any(b < a for a, b in zip(seq, seq[1:])):
            bad(f"column {c} must be positive and never decrease with voltage")
        if per_volt[c] <= 0:
            bad(f"per-volt value of column {c} must be positive")
    if float(above["from_v"]) != rows[-1].upper_v:
        bad("above_500.from_v must equal the last row's upper_v")
    return SpacingTable(
        name=str(t["name"]), title=str(t["title"]), verified=bool(t.get("verified", False)),
        source=str(t.get("source", "")), columns=columns,
        column_short={c: str(meaning[c]["short"]) for c in columns},
        column_meaning={c: str(meaning[c]["meaning"]) for c in columns},
        rows=tuple(rows), above_v=float(above["from_v"]), per_volt_mm=per_volt,
        above_source=str(above.get("source", "")), above_why=str(above.get("why", "")),
        path=path)


def _fmt_mm(x: float) -> str:
    return f"{x:g}"


def ipc2221b_spacing(voltage_v: float, column: str) -> Requirement:
    """Minimum spacing (mm) for ``voltage_v`` volts between conductors, column ``column``.

    Parameters
    ----------
    voltage_v:
        Voltage between the two conductors in volts (DC or AC peak); negative values are
        taken by magnitude.
    column:
        One of ``B1 B2 B3 B4 A5 A6 A7`` (see :func:`ipc2221b_column`).

    Returns
    -------
    Requirement
        ``mm`` from IPC-2221B Table 6-1 (values from memory, see the module docstring),
        with the row chosen as the first whose upper bound is >= the voltage; above
        500 V, ``s(500) + (V - 500) * k``.
    """
    table = load_table("ipc2221b")
    if column not in table.columns:
        raise UsageError(f"unknown IPC-2221B Table 6-1 column {column!r}; expected one of "
                         f"{', '.join(table.columns)}")
    v = abs(float(voltage_v))
    if not math.isfinite(v):
        raise UsageError(f"voltage must be a finite number of volts, got {voltage_v!r}")
    desc = f"column {column} ({table.column_short[column]})"
    prov = table.provenance_word()
    for row in table.rows:
        if v <= row.upper_v:
            mm = row.values[column]
            basis = f"{table.reference}, {desc}, row {row.label}: {_fmt_mm(mm)} mm ({prov})"
            return Requirement(mm, basis, row.label, column)
    base = table.rows[-1].values[column]
    k = table.per_volt_mm[column]
    mm = round(base + (v - table.above_v) * k, 6)
    word = "rule and values from memory" if not table.verified else "table rule"
    basis = (f"{table.reference}, {desc}, above {table.above_v:g} V: "
             f"{_fmt_mm(base)} mm + {_fmt_mm(k)} mm/V x ({v:g} - {table.above_v:g}) V = "
             f"{_fmt_mm(mm)} mm ({word})")
    return Requirement(mm, basis, f"above {table.above_v:g} V", column)


def ipc2221b_column(outer: bool, coating: str, altitude_m: float,
                    termination: bool) -> tuple[str, str]:
    """Choose the IPC-2221B Table 6-1 column and say why.

    Parameters
    ----------
    outer:
        True for an external (top or bottom) copper layer.
    coating:
        ``"none"``, ``"solder-mask"`` or ``"conformal"`` (project ``[environment]``).
    altitude_m:
        Highest operating altitude in metres above sea level.
    termination:
        True when a component lead or termination (a pad) is one of the two features.

    Returns
    -------
    (column, reason)
        The column letter and a sentence saying why (see the module docstring for the
        reading of the column headings this follows).
    """
    if coating not in COATINGS:
        raise UsageError(f"coating must be one of {', '.join(COATINGS)}; got {coating!r}")
    high = altitude_m > ALTITUDE_LIMIT_M
    alt = f"above {ALTITUDE_LIMIT_M:g} m" if high else f"at or below {ALTITUDE_LIMIT_M:g} m"
    if not outer:
        return "B1", "internal layer: B1 (internal conductors)"
    if coating == "conformal":
        if termination:
            return "A7", ("external layer, conformal coating, component termination "
                          "involved: A7")
        return "A5", "external layer, conformal coating over the assembly: A5"
    if termination:
        bare = ("solder mask leaves pads bare, so a termination counts as uncoated"
                if coating == "solder-mask" else "uncoated")
        if high:
            return "B3", (f"external layer, component termination involved, {bare}, "
                          f"altitude {altitude_m:g} m {alt}: B3 (A6 is only defined up to "
                          f"{ALTITUDE_LIMIT_M:g} m; our reading)")
        return "A6", (f"external layer, component termination involved, {bare}, altitude "
                      f"{altitude_m:g} m {alt}: A6")
    if coating == "solder-mask":
        return "B4", "external layer, conductors under solder mask (permanent polymer " \
                     "coating): B4"
    if high:
        return "B3", f"external layer, uncoated, altitude {altitude_m:g} m {alt}: B3"
    return "B2", f"external layer, uncoated, altitude {altitude_m:g} m {alt}: B2"
