"""IPC-D-356A netlist writer for sample boards and reader tests.

:func:`ipc356_text` / :func:`write_ipc356` turn a
:class:`~layoutcheck.writers.design.Design` (the data the Gerber, NC drill and IPC-2581
writers use) into a bare-board test netlist, in the fixed columns of the shared format
notes, section 4 (IPC-D-356A record layout):

* header: a ``C`` comment, ``P  JOB``, ``P  UNITS CUST 1`` (millimetres, 0.001 mm per unit)
  or ``CUST 0`` (inches, 0.0001 in per unit), ``P  VER IPC-D-356A``, ``P  IMAGE PRIMARY``;
* ``P  NNAME<k>`` aliases (alias in columns 4-14, full name from column 15) for every net
  name that does not fit the 14-column net field or holds a blank, numbered in name order;
* one ``317`` record per plated through-hole pad (``D`` + hole + ``P``, access ``A00``),
  one ``317`` per via (reference ``VIA``, no pin), one ``327`` per surface pad (``A01`` on
  the top, ``A<n>`` on the bottom, n = the number of copper layers), one ``367`` per
  non-plated hole (no net, ``U``); pads, then vias, then holes, in design order;
* feature size ``X``/``Y`` (round pads with ``Y0000``) and rotation ``R`` when they fit
  their 4 and 3 digits;
* ``999``.

A net of ``""`` ("no net") is written as ``N/C``, ``None`` as a blank field.  Routed slots,
tracks and zones have no test point and are not written (the copper comes from the Gerber
files).  Same design, same bytes.  Units: the design is in millimetres.
"""
from __future__ import annotations

from pathlib import Path

from ..errors import UsageError
from .design import Design, Pad

#: Unit name -> (UNITS value, file units per millimetre).
UNIT_CHOICES = {"mm": ("CUST 1", 1000.0), "inch": ("CUST 0", 1.0 / 0.00254)}
NET_FIELD = 14
FULL_NAME_MAX = 58     # columns 15..72
REF_FIELD = 6
PIN_FIELD = 4


def _num(value_mm: float, per_mm: float) -> int:
    return int(round(value_mm * per_mm))


def _coord(letter: str, value_mm: float, per_mm: float, what: str) -> str:
    v = _num(value_mm, per_mm)
    if abs(v) > 999_999:
        raise UsageError(f"{what}: coordinate {value_mm} mm does not fit the 6 digits of an "
                         "IPC-D-356A record in these units")
    return f"{letter}{'-' if v < 0 else '+'}{abs(v):06d}"


def _aliases(design: Design) -> dict[str, str]:
    """Full net name -> alias for names that do not fit the net field."""
    out: dict[str, str] = {}
    names = sorted({p.net for p in design.pads if p.net} | {v.net for v in design.vias if v.net})
    for name in names:
        if len(name) > NET_FIELD or " " in name or name.upper().startswith("NNAME"):
            if len(name) > FULL_NAME_MAX:
                raise UsageError(f"net name {name!r} is longer than {FULL_NAME_MAX} "
                                 "characters; IPC-D-356A cannot carry it")
            out[name] = f"NNAME{len(out) + 1}"
    return out


def _net_field(net: str | None, aliases: dict[str, str]) -> str:
    if net is None:
        return ""
    if net == "":
        return "N/C"
    return aliases.get(net, net)


def _record(code: str, net: str, ref: str, pin: str, hole: int | None, plated: bool | None,
            access: int, x: str, y: str, sizes: str = "", what: str = "") -> str:
    if len(ref) > REF_FIELD or " " in ref:
        raise UsageError(f"{what}: reference {ref!r} does not fit the {REF_FIELD}-column "
                         "reference field")
    if len(pin) > PIN_FIELD or " " in pin:
        raise UsageError(f"{what}: pin {pin!r} does not fit the {PIN_FIELD}-column pin field")
    dash = "-" if (ref or pin) else " "
    drill = f"D{hole:04d}{'P' if plated else 'U'}" if hole is not None else " " * 6
    line = (f"{code}{net:<{NET_FIELD}}   {ref:<{REF_FIELD}}{dash}{pin:<{PIN_FIELD}} "
            f"{drill}A{access:02d}{x}{y}{sizes}")
    return line.rstrip()


def _hole(d_mm: float, per_mm: float, what: str) -> int:
    v = _num(d_mm, per_mm)
    if not 0 < v <= 9999:
        raise UsageError(f"{what}: hole {d_mm} mm does not fit the 4 digits of an "
                         "IPC-D-356A hole field in these units")
    return v


def _sizes(w: float, h: float, round_pad: bool, rotation: float, per_mm: float) -> str:
    sx, sy = _num(w, per_mm), 0 if round_pad else _num(h, per_mm)
    if not (0 < sx <= 9999 and 0 <= sy <= 9999):
        return ""
    rot = int(round(rotation)) % 360
    return f"X{sx:04d}Y{sy:04d}R{rot:03d}"


def ipc356_text(design: Design, units: str = "mm") -> str:
    """The IPC-D-356A netlist of ``design`` as text (see the module docstring).

    Parameters
    ----------
    design:
        The board (millimetres).
    units:
        ``"mm"`` (``CUST 1``, 0.001 mm resolution) or ``"inch"`` (``CUST 0``, 0.0001 in).

    Raises
    ------
    UsageError
        For an unknown unit, or a value that does not fit its field (coordinates over 6
        digits, holes over 4, references over 6 characters, pins over 4, net names over 58).
    """
    if units not in UNIT_CHOICES:
        raise UsageError(f"units must be one of {sorted(UNIT_CHOICES)}, got {units!r}")
    design.validate()
    unit_name, per_mm = UNIT_CHOICES[units]
    aliases = _aliases(design)
    bottom = design.copper_layers
    lines = [f"C  IPC-D-356A netlist of {design.name} (layoutcheck sample writer)",
             f"P  JOB   {design.name}",
             f"P  UNITS {unit_name}",
             "P  VER   IPC-D-356A",
             "P  IMAGE PRIMARY"]
    for name, alias in aliases.items():
        lines.append(f"P  {alias:<11}{name}")
    for pad in design.pads:
        lines.append(_pad_record(pad, aliases, per_mm, bottom))
    for k, v in enumerate(design.vias, start=1):
        what = f"via {k}"
        lines.append(_record("317", _net_field(v.net, aliases), "VIA", "",
                             _hole(v.drill, per_mm, what), True, 0,
                             _coord("X", v.x, per_mm, what), _coord("Y", v.y, per_mm, what),
                             _sizes(v.pad, v.pad, True, 0.0, per_mm), what))
    for k, h in enumerate(design.holes, start=1):
        what = f"non-plated hole {k}"
        lines.append(_record("367", "", "", "", _hole(h.d, per_mm, what), False, 0,
                             _coord("X", h.x, per_mm, what), _coord("Y", h.y, per_mm, what),
                             "", what))
    lines.append("999")
    text = "\n".join(lines) + "\n"
    bad = next((ln for ln in lines if not ln.isascii()), None)
    if bad is not None:
        raise UsageError(f"IPC-D-356A is ASCII; this record is not: {bad!r}")
    return text


def _pad_record(pad: Pad, aliases, per_mm: float, bottom: int) -> str:
    what = f"pad {pad.ref or '(free)'}-{pad.pin}"
    x = _coord("X", pad.x, per_mm, what)
    y = _coord("Y", pad.y, per_mm, what)
    sizes = _sizes(pad.w, pad.height, pad.shape == "circle", pad.rotation, per_mm)
    net = _net_field(pad.net, aliases)
    if pad.through_hole:
        return _record("317", net, pad.ref, pad.pin, _hole(pad.drill, per_mm, what), True, 0,
                       x, y, sizes, what)
    access = 1 if pad.layers == "top" else bottom
    return _record("327", net, pad.ref, pad.pin, None, None, access, x, y, sizes, what)


def ipc356_file_name(design: Design) -> str:
    """``<name>.ipc``."""
    return f"{design.name}.ipc"


def write_ipc356(design: Design, path, units: str = "mm") -> Path:
    """Write ``design``'s netlist at ``path`` (a file, or a folder to put
    ``<design.name>.ipc`` in).  Returns the path written.  Units: see :func:`ipc356_text`.
    """
    p = Path(path)
    if p.is_dir():
        p = p / ipc356_file_name(design)
    p.parent.mkdir(parents=True, exist_ok=True)
    p.write_text(ipc356_text(design, units), encoding="ascii", newline="\n")
    return p


__all__ = ["ipc356_text", "write_ipc356", "ipc356_file_name", "UNIT_CHOICES"]
