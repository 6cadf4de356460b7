"""Extended commands (``%..%``): FS, MO, AD, AM, AB, SR, LP, LM, LR, LS, TF/TA/TO/TD and
the deprecated image commands IP, MI, OF, SF, AS, IR, IN, LN.

Gerber Layer Format Specification rev. 2024.05, chapters 4 and 5; deprecated commands as
chapter 8 describes them.  The whole-image transforms MI, OF, SF, AS and IR are accepted
only with their identity values; any other value raises UnsupportedFeatureError.
Several parameters in one block (``%FSLAX26Y26*MOMM*%``) run one after the other.
"""
from __future__ import annotations

import re
from typing import TYPE_CHECKING

from ...errors import InputFileError, ResourceLimitError, UnsupportedFeatureError
from .apertures import Aperture, parse_ad
from .coords import parse_decimal, parse_fs, parse_mo, whole_number
from .macros import parse_am
from .tokens import Word

if TYPE_CHECKING:  # pragma: no cover
    from .plot import Plotter

_SR = re.compile(r"^SR(?:X(\d+))?(?:Y(\d+))?(?:I([-+]?[\d.]+))?(?:J([-+]?[\d.]+))?$")
_AB = re.compile(r"^ABD(\d+)$")  # leading zeros go in whole_number (a "0*\d+" is quadratic)
_MI = re.compile(r"^MI(?:A([01]))?(?:B([01]))?$")
_AB_PAIR = re.compile(r"^(?:A([-+]?[\d.]+))?(?:B([-+]?[\d.]+))?$")


def run_extended(p: "Plotter", words: tuple[Word, ...]) -> None:
    """Run the words of one ``%...%`` block."""
    head = words[0]
    if head.text[:2].upper() == "AM":
        if p.region is not None:
            p.note("AM inside a region (not allowed; no effect on it)", head.line)
        macro = parse_am(words, p.name, p.limits)
        if macro.name in p.macros:
            p.note(f"macro {macro.name!r} defined twice; the later definition used", head.line)
        p.macros[macro.name] = macro
        return
    for w in words:
        if w.text:
            _one(p, w)


def _one(p: "Plotter", w: Word) -> None:
    text, line = w.text, w.line
    code = text[:2].upper()
    compact = text.replace(" ", "")
    if code in ("TF", "TA", "TO", "TD"):
        attribute_command(p, text, line)
        return
    if code == "FS":
        if p.fmt is not None:
            p.note("FS given more than once; the later one used", line)
        fmt, notes = parse_fs(compact.upper(), p.name, line)
        for n in notes:
            p.note(n, line)
        p.fmt = fmt
    elif code == "MO":
        p.set_units(parse_mo(compact.upper(), p.name, line), False, line)
    elif code == "AD":
        f = p.unit_factor(line)
        ap = parse_ad(compact, p.macros, f, p.attrs.aperture, p.name, line, p.limits,
                      lambda n: p.charge(n, line))
        _define(p, ap, line)
    elif code == "AB":
        _block(p, compact, line)
    elif code == "SR":
        _step_repeat(p, compact.upper(), line)
    elif code == "LP":
        v = compact[2:].upper()
        if v not in ("D", "C"):
            p.fail(f"saw {text!r}; expected LPD or LPC", line)
        if p.region is not None:
            p.fail(f"LP inside the region opened at line {p.region.line}; expected G37 first",
                   line)
        p.polarity = "dark" if v == "D" else "clear"
    elif code == "LM":
        v = compact[2:].upper()
        if v not in ("N", "X", "Y", "XY"):
            p.fail(f"saw {text!r}; expected LMN, LMX, LMY or LMXY", line)
        p.mirror = "" if v == "N" else v
    elif code == "LR":
        p.rotation = parse_decimal(compact[2:], "the LR rotation (degrees)", p.name, line)
    elif code == "LS":
        s = parse_decimal(compact[2:], "the LS scale factor", p.name, line)
        if s <= 0:
            p.fail(f"saw the scale factor {s:g}; expected a value > 0", line)
        p.scale = s
    else:
        _legacy(p, code, compact.upper(), text, line)


def attribute_command(p: "Plotter", text: str, line: int) -> None:
    """TF/TA/TO/TD, from a ``%...%`` block or a ``G04 #@!`` comment."""
    kind, name, fields = p.attrs.apply(text, p.name, line)
    if kind == "TF":
        if name == ".FilePolarity" and fields and fields[0].lower() == "negative":
            p.gf.image_negative = True
        p.gf.file_attributes[name] = fields


def _define(p: "Plotter", ap: Aperture, line: int) -> None:
    if ap.number in p.apertures:
        p.note(f"aperture D{ap.number} defined twice; the later definition used", line)
    p.apertures[ap.number] = ap


def _block(p: "Plotter", compact: str, line: int) -> None:
    if compact.upper() == "AB":
        if not p.blocks:
            p.fail("%AB*% closes no open block aperture; expected %ABD<n>*% before it", line)
        if p.region is not None:
            p.fail(f"%AB*% inside the region opened at line {p.region.line}; expected G37 "
                   "first", line)
        p.builder.flush()
        blk = p.blocks.pop()
        p.sink = blk.saved_sink
        ap = Aperture(blk.number, "block", None, blk.attributes, blk.line, block=blk.sink)
        _define(p, ap, line)
        p.cur = None
        return
    m = _AB.match(compact.upper())
    if not m:
        p.fail(f"saw {compact!r}; expected %ABD<n>*% to open or %AB*% to close a block", line)
    number = whole_number(m.group(1), "the block aperture number", p.name, line)
    if number < 10:
        p.fail(f"saw block aperture number D{number}; expected 10 or more", line)
    if p.region is not None:
        p.fail(f"AB inside the region opened at line {p.region.line}; expected G37 first", line)
    if len(p.blocks) >= p.limits.max_block_depth:
        p.fail(f"block apertures nested deeper than {p.limits.max_block_depth}; limit "
               "max_block_depth", line, ResourceLimitError)
    from .plot import Block

    blk = Block(number, dict(p.attrs.aperture), line)
    blk.saved_sink = p.sink
    p.sink = blk.sink
    p.blocks.append(blk)


def _step_repeat(p: "Plotter", compact: str, line: int) -> None:
    m = _SR.match(compact)
    if not m:
        p.fail(f"saw {compact!r}; expected e.g. %SRX3Y2I5.0J4.0*% or %SR*%", line)
    if p.blocks:
        p.fail("SR inside a block aperture; expected SR outside AB", line)
    if p.region is not None:
        p.fail(f"SR inside the region opened at line {p.region.line}; expected G37 first", line)
    if compact == "SR":
        if p.sr is None:
            p.note("%SR*% with no open step-and-repeat ignored", line)
        p.close_sr(line)
        return
    for axis, digits in (("X", m.group(1)), ("Y", m.group(2))):
        if digits and len(digits.lstrip("0")) > 9:
            p.fail(f"SR asks for {len(digits.lstrip('0'))}-digit repeat count along {axis}; at "
                   f"most {p.limits.max_step_repeat} copies allowed (limit max_step_repeat)",
                   line, ResourceLimitError)
    nx = int(m.group(1).lstrip("0") or "0") if m.group(1) else 1
    ny = int(m.group(2).lstrip("0") or "0") if m.group(2) else 1
    if nx < 1 or ny < 1:
        p.fail(f"saw {compact!r}; expected X and Y repeat counts of at least 1", line)
    f = p.unit_factor(line)
    dx = parse_decimal(m.group(3) or "0", "the SR step I", p.name, line) * f
    dy = parse_decimal(m.group(4) or "0", "the SR step J", p.name, line) * f
    if nx == 1 and ny == 1 and p.sr is not None:
        p.note("%SRX1Y1...*% used to close a step-and-repeat (deprecated habit)", line)
    p.open_sr(nx, ny, dx, dy, line)


def _legacy(p: "Plotter", code: str, up: str, text: str, line: int) -> None:
    unsupported = UnsupportedFeatureError
    if code == "IP":
        if up == "IPPOS":
            p.note("deprecated IPPOS ignored", line)
        elif up == "IPNEG":
            p.gf.image_negative = True
            p.note("deprecated IPNEG: image marked negative (image_negative=True), not "
                   "inverted", line)
        else:
            p.fail(f"saw {text!r}; expected IPPOS or IPNEG", line)
    elif code in ("IN", "LN"):
        p.note(f"deprecated {code} (name) treated as a comment", line)
    elif code == "MI":
        m = _MI.match(up)
        if not m:
            p.fail(f"saw {text!r}; expected MIA<0|1>B<0|1>", line)
        if (m.group(1) or "0") != "0" or (m.group(2) or "0") != "0":
            p.fail(f"deprecated image mirroring {text!r} is not supported; only MIA0B0",
                   line, unsupported)
        p.note("deprecated MI with identity value ignored", line)
    elif code in ("OF", "SF"):
        m = _AB_PAIR.match(up[2:])
        if not m:
            p.fail(f"saw {text!r}; expected {code}A<value>B<value>", line)
        ident = 0.0 if code == "OF" else 1.0
        vals = [parse_decimal(v, f"the {code} value", p.name, line)
                if v not in (None, "", ".") else ident for v in m.groups()]
        if any(v != ident for v in vals):
            what = "offset" if code == "OF" else "scale"
            p.fail(f"deprecated image {what} {text!r} is not supported; only the identity "
                   f"{code}A{ident:g}B{ident:g}", line, unsupported)
        p.note(f"deprecated {code} with identity value ignored", line)
    elif code == "AS":
        if up not in ("ASAXBY", "AS"):
            if up == "ASAYBX":
                p.fail(f"deprecated axis swap {text!r} is not supported; only ASAXBY", line,
                       unsupported)
            p.fail(f"saw {text!r}; expected ASAXBY or ASAYBX", line)
        p.note("deprecated AS with identity value ignored", line)
    elif code == "IR":
        v = parse_decimal(up[2:] or "0", "the IR rotation", p.name, line)
        if v % 360 != 0:
            p.fail(f"deprecated image rotation {text!r} is not supported; only IR0", line,
                   unsupported)
        p.note("deprecated IR with identity value ignored", line)
    else:
        raise InputFileError(f"saw the extended command {text[:40]!r}; expected a known code "
                             "(FS, MO, AD, AM, AB, SR, LP, LM, LR, LS, TF, TA, TO, TD or a "
                             "deprecated IP, IN, LN, MI, OF, SF, AS, IR)", file=p.name,
                             line=line)
