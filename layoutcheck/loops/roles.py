"""Part roles: which parts are switches or capacitors, and which pad is gate, drain, source.

Units: volts, farads, henries, millimetres.

A switch's terminals are kept under MOSFET letters: ``G`` gate, ``D`` the terminal the
current enters when it conducts (drain, or an IGBT's collector), ``S`` the one it leaves
by (source, or emitter); :attr:`PartRole.letters` keeps the letters to show (``C``/``E``
for an IGBT).

Where each fact comes from, best first:

kind
    1. ``[parts.<ref>] kind`` in the project file;
    2. a ``kind`` property the board files carry;
    3. pin names: drain and source -> MOSFET, collector and emitter -> IGBT;
    4. the reference designator's class letter, ``Q`` transistor and ``C`` capacitor
       (IEEE 315 / ASME Y14.44 class letters, common practice) -- an assumption.
pins (switches)
    1. ``[parts.<ref>] pins``;
    2. pin names in the files (``G``/``GATE``, ``D``/``DRAIN``, ``S``/``SOURCE``, ``C``/
       ``COLLECTOR``, ``E``/``EMITTER``);
    3. the common numbering of the part's package from ``rules/packages.toml`` (common
       practice, an assumption);
    4. a three-pad part numbered 1, 2, 3 with no package known: the common three-lead
       through-hole numbering 1 G, 2 D, 3 S (TO-220 / TO-247, common practice) -- an
       assumption.
internal inductance
    ``[parts.<ref>] internal_nh``, else the package table, else none (an assumption).
rating, C_oss
    ``[parts.<ref>] vds_max_v`` / ``coss_pf``, else a property in the board files
    (``vds_max_v``, ``vds_v``, ``vces_v``, ``rating_v``; ``coss_pf``, ``coss_f``).
"""
from __future__ import annotations

import re
from dataclasses import dataclass, field

from ..errors import ProjectFileError
from ..model import Assumption, Board
from ..project import PART_KINDS, PartSpec, Project
from .packages import PackageInfo, find_package
from .pads import PadIndex

SWITCH_KINDS = ("mosfet", "igbt")
#: Role letters as written for each switch kind: gate, current in, current out.
LETTERS = {"mosfet": ("G", "D", "S"), "igbt": ("G", "C", "E")}
#: Pin names (upper case, letters only) that mean each internal role.
PIN_NAMES = {"G": ("G", "GATE"), "D": ("D", "DRAIN"), "S": ("S", "SOURCE"),
             "C": ("C", "COLLECTOR"), "E": ("E", "EMITTER")}
#: Default conductor size of a part's straight piece when no package says (mm).
DEFAULT_LEAD_MM = 0.8
_RATING_KEYS = ("vds_max_v", "vds_v", "vces_v", "vces_max_v", "rating_v", "v_rating")
_CLASS_LETTER = {"Q": "switch", "C": "capacitor"}


@dataclass
class PartRole:
    """What one part is and how it takes part in a power loop.

    kind:        mosfet | igbt | capacitor | resistor | diode | driver | other | unknown.
    pins:        internal role (``G``, ``D``, ``S``) -> pads (switches only).
    letters:     internal role -> letter to show (``D`` -> ``C`` for an IGBT).
    internal_h:  series inductance inside the part beyond its pad-to-pad piece (H).
    lead_mm:     conductor size of its straight piece and leads (mm).
    rating_v:    voltage rating (V) for switches, if known.
    coss_f:      output capacitance (F) for switches, if known.
    basis:       how kind and pins were found (one phrase each, joined).
    """

    ref: str
    kind: str
    pins: dict[str, tuple[str, ...]] = field(default_factory=dict)
    letters: dict[str, str] = field(default_factory=dict)
    package: PackageInfo | None = None
    internal_h: float = 0.0
    internal_basis: str = ""
    lead_mm: float = DEFAULT_LEAD_MM
    rating_v: float | None = None
    rating_basis: str = ""
    coss_f: float | None = None
    basis: str = ""
    notes: list[Assumption] = field(default_factory=list)

    @property
    def is_switch(self) -> bool:
        return self.kind in SWITCH_KINDS

    @property
    def has_terminals(self) -> bool:
        """A switch whose current-carrying pads (D and S) are both known."""
        return self.is_switch and bool(self.pins.get("D")) and bool(self.pins.get("S"))

    def pad(self, role: str) -> str | None:
        """The first pad of ``role`` (``G``, ``D``, ``S``), or ``None``."""
        pads = self.pins.get(role)
        return pads[0] if pads else None

    def letter(self, role: str) -> str:
        return self.letters.get(role, role)


def _letters_only(name: str) -> str:
    return re.sub(r"[^A-Z]", "", name.upper())


def _class_letter(ref: str) -> str | None:
    m = re.match(r"^([A-Za-z]+)\d", ref)
    return _CLASS_LETTER.get(m.group(1).upper()) if m else None


def part_roles(board: Board, graph, project: Project,
               index: PadIndex | None = None) -> tuple[dict[str, PartRole], list[Assumption]]:
    """Roles of every part on ``board``, and notes about the project file's parts.

    Each role keeps the assumptions made to find it in :attr:`PartRole.notes` (reported
    only for the parts that matter).  ``graph`` is the board's net graph.  Raises
    :class:`ProjectFileError` (with the line) when a ``[parts.<ref>]`` table names pads
    the part does not have.
    """
    index = index or PadIndex(board, graph)
    refs = sorted(board.components)
    out: dict[str, PartRole] = {}
    notes: list[Assumption] = []
    for ref in refs:
        role, more = _one_part(board, project, index, ref)
        role.notes = more
        out[ref] = role
    for ref in sorted(set(project.parts) - set(board.components)):
        notes.append(Assumption("part-role", (
            f"the project file describes part {ref} ([parts.{ref}]), which is not on this "
            "board; ignored")))
    return out, notes


def _one_part(board, project, index, ref):
    comp = board.components[ref]
    spec: PartSpec = project.parts.get(ref) or PartSpec(ref)
    pads = index.pins_of(ref) or sorted(comp.pins)
    names = {p: _letters_only(comp.pins[p].name) for p in comp.pins if comp.pins[p].name}
    notes: list[Assumption] = []

    # kind
    named_roles = {r for n in names.values() for r, words in PIN_NAMES.items() if n in words}
    prop_kind = str(comp.properties.get("kind", "")).lower()
    guessed = None
    if spec.kind:
        kind, basis = spec.kind, "kind from the project file"
    elif spec.pins and {"C", "E"} & set(spec.pins):
        kind, basis = "igbt", "IGBT from its pin roles in the project file"
    elif spec.pins and {"D", "S"} & set(spec.pins):
        kind, basis = "mosfet", "MOSFET from its pin roles in the project file"
    elif spec.pins and {"+", "-"} & set(spec.pins):
        kind, basis = "capacitor", "capacitor from its pin roles in the project file"
    elif prop_kind in PART_KINDS:
        kind, basis = prop_kind, "kind from the board files"
    elif {"D", "S"} <= named_roles:
        kind, basis = "mosfet", "MOSFET from its pin names (drain, source)"
    elif {"C", "E"} <= named_roles:
        kind, basis = "igbt", "IGBT from its pin names (collector, emitter)"
    elif (guessed := _class_letter(ref)) is not None:
        kind = "mosfet" if guessed == "switch" else guessed
        basis = f"{guessed} from its reference designator"
        if guessed == "switch":
            notes.append(Assumption("part-role", (
                f"{ref}: taken as a switching transistor from its reference designator "
                "(class letter Q, common practice); treated as a MOSFET (an IGBT is "
                "handled the same way, collector as drain and emitter as source); set "
                f"[parts.{ref}] kind if it is not")))
        else:
            notes.append(Assumption("part-role", (
                f"{ref}: taken as a capacitor from its reference designator (class letter "
                f"C, common practice); set [parts.{ref}] kind if it is not")))
    else:
        kind, basis = "unknown", "kind unknown"

    package_name = spec.package or comp.package
    package = find_package(package_name)
    role = PartRole(ref, kind, package=package, basis=basis)
    unknown = (f"package {package_name!r} is not in rules/packages.toml" if package_name
               else "package unknown")
    if package is not None:
        role.lead_mm = package.lead_mm

    # internal inductance
    if spec.internal_nh is not None:
        role.internal_h = spec.internal_nh * 1e-9
        role.internal_basis = "project file"
    elif package is not None:
        role.internal_h = package.internal_h
        role.internal_basis = f"package table, {package.name}: {package.internal_source}"
    else:
        role.internal_basis = f"none: {unknown}"

    if role.is_switch:
        letters = LETTERS[kind]
        role.letters = dict(zip(("G", "D", "S"), letters))
        _switch_pins(project, role, spec, names, pads, package, comp, notes)
        _ratings(role, spec, comp)
        if spec.internal_nh is None and package is None and role.pins:
            notes.append(Assumption("package", (
                f"{ref}: {unknown}, so no internal (lead and bond-wire) inductance "
                f"is added; set [parts.{ref}] package or internal_nh")))
    elif kind == "capacitor":
        if spec.internal_nh is None and package is None:
            notes.append(Assumption("package", (
                f"{ref}: {unknown}, so no internal (equivalent series) inductance "
                f"is added; set [parts.{ref}] package or internal_nh")))
        _check_spec_pads(project, spec, pads, ref)
    else:
        _check_spec_pads(project, spec, pads, ref)
    return role, notes


def _spec_error(project: Project, spec: PartSpec, msg: str) -> ProjectFileError:
    return ProjectFileError(msg, file=str(project.path or "<project>"), line=spec.line)


def _check_spec_pads(project, spec: PartSpec, pads, ref):
    for r, p in spec.pins.items():
        if p not in pads:
            raise _spec_error(project, spec, (
                f"[parts.{ref}] pins: {r} = {p!r}, but {ref} has no pad {p!r} (its pads: "
                f"{', '.join(pads) or 'none'})"))


def _switch_pins(project, role, spec, names, pads, package, comp, notes):
    ref = role.ref
    letters = LETTERS[role.kind]
    to_internal = dict(zip(letters, ("G", "D", "S")))
    if spec.pins:
        _check_spec_pads(project, spec, pads, ref)
        pins = {}
        for r, p in spec.pins.items():
            key = to_internal.get(r)
            if key is None:
                key = {"D": "D", "S": "S", "C": "D", "E": "S", "G": "G"}.get(r)
            if key is None:
                raise _spec_error(project, spec, (
                    f"[parts.{ref}] pins: role {r!r} does not apply to a {role.kind}; "
                    f"expected {', '.join(letters)}"))
            pins[key] = (p,)
        role.pins = pins
        role.basis += "; pins from the project file"
        return
    by_name: dict[str, list[str]] = {}
    for p in pads:
        n = names.get(p)
        for r, words in PIN_NAMES.items():
            if n and n in words and r in letters:
                by_name.setdefault(to_internal[r], []).append(p)
    if "D" in by_name and "S" in by_name:
        role.pins = {k: tuple(v) for k, v in by_name.items()}
        role.basis += "; pins from their names in the files"
        return
    if package is not None and package.pins.get(role.kind):
        pins = {}
        for r, cands in package.pins[role.kind].items():
            have = [c for c in cands if c in pads]
            if have:
                pins[to_internal.get(r, r)] = tuple(have)
        if "D" in pins and "S" in pins:
            role.pins = pins
            role.basis += f"; pins from the common numbering of {package.name}"
            shown = ", ".join(f"{p[0]} {role.letter(k)}" for k, p in
                              sorted(pins.items(), key=lambda kv: kv[1][0]))
            notes.append(Assumption("pin-role", (
                f"{ref}: pin roles from the common numbering of the {package.name} package "
                f"({shown}; {package.pins_source}); set [parts.{ref}] pins if the part "
                "differs")))
            return
    if set(pads) == {"1", "2", "3"} and package is None:
        role.pins = {"G": ("1",), "D": ("2",), "S": ("3",)}
        role.basis += "; pins from the common three-lead numbering"
        g, d, s = letters
        notes.append(Assumption("pin-role", (
            f"{ref}: no pin names and no known package numbering; assumed the common "
            f"three-lead through-hole numbering 1 {g}, 2 {d}, 3 {s} (TO-220 / TO-247, "
            f"common practice); set [parts.{ref}] pins or package if it differs")))
        return
    notes.append(Assumption("pin-role", (
        f"{ref}: a {role.kind} whose gate, drain and source pads are unknown (no pin names, "
        f"no package numbering); it is left out of the power loops; set [parts.{ref}] pins")))


def _ratings(role, spec, comp):
    if spec.vds_max_v is not None:
        role.rating_v, role.rating_basis = spec.vds_max_v, "project file"
    else:
        for key in _RATING_KEYS:
            v = comp.properties.get(key)
            if isinstance(v, (int, float)) and not isinstance(v, bool) and v > 0:
                role.rating_v, role.rating_basis = float(v), f"board files ({key})"
                break
    if spec.coss_pf is not None:
        role.coss_f = spec.coss_pf * 1e-12
    else:
        v = comp.properties.get("coss_pf")
        if isinstance(v, (int, float)) and not isinstance(v, bool) and v > 0:
            role.coss_f = float(v) * 1e-12
        v = comp.properties.get("coss_f")
        if role.coss_f is None and isinstance(v, (int, float)) and not isinstance(v, bool) \
                and v > 0:
            role.coss_f = float(v)
