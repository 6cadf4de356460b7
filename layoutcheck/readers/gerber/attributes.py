"""X2 attributes: TF (file), TA (aperture), TO (object) and TD (delete).

Gerber Layer Format Specification rev. 2024.05, chapter 5.  An attribute command is
``T<kind><name>[,<field>,<field>...]``.  Fields are comma-separated; ``\\uXXXX`` and
``\\UXXXXXXXX`` escapes are decoded, stray blanks around names and fields are removed.
Attribute commands written as comments (``G04 #@! TO.N,GND*``) are handled the same way.
"""
from __future__ import annotations

import re
from dataclasses import dataclass, field

from ...errors import InputFileError

_ESC = re.compile(r"\\u([0-9A-Fa-f]{4})|\\U([0-9A-Fa-f]{8})")
_NAME = re.compile(r"^[._$a-zA-Z][._$a-zA-Z0-9]{0,126}$")

#: Comment prefix that carries an attribute command.
ATTRIBUTE_COMMENT = "#@!"


def decode_escapes(text: str) -> str:
    """Decode ``\\uXXXX`` / ``\\UXXXXXXXX`` escapes (Gerber spec rev. 2024.05, "Strings")."""
    if "\\" not in text:
        return text

    def repl(m: re.Match) -> str:
        code = int(m.group(1) or m.group(2), 16)
        try:
            return chr(code)
        except (ValueError, OverflowError):
            return m.group(0)

    return _ESC.sub(repl, text)


@dataclass
class AttributeState:
    """The attribute dictionary of the graphics state plus the file attributes."""

    file: dict[str, tuple[str, ...]] = field(default_factory=dict)
    aperture: dict[str, tuple[str, ...]] = field(default_factory=dict)
    object: dict[str, tuple[str, ...]] = field(default_factory=dict)

    def apply(self, word: str, name: str, line: int) -> tuple[str, str, tuple[str, ...]]:
        """Apply one ``TF``/``TA``/``TO``/``TD`` word; return (kind, name, fields)."""
        kind = word[:2].upper()
        body = word[2:]
        if kind == "TD":
            target = body.strip()
            if not target:
                self.aperture.clear()
                self.object.clear()
            else:
                self.aperture.pop(target, None)
                self.object.pop(target, None)
            return kind, target, ()
        parts = body.split(",")
        attr = decode_escapes(parts[0].strip())
        if not _NAME.match(attr):
            raise InputFileError(f"saw the attribute name {attr!r} in {word[:60]!r}; expected a "
                                 "name like '.FileFunction' or 'MyAttribute'",
                                 file=name, line=line)
        fields = tuple(decode_escapes(p.strip()) for p in parts[1:])
        if attr == ".N" and not fields:
            fields = ("",)
        if kind == "TF":
            self.file[attr] = fields
        elif kind == "TA":
            self.aperture[attr] = fields
        elif kind == "TO":
            self.object[attr] = fields
        else:  # pragma: no cover - callers only pass T? words
            raise InputFileError(f"saw {word[:40]!r}; expected TF, TA, TO or TD",
                                 file=name, line=line)
        return kind, attr, fields


def attribute_from_comment(comment: str) -> str | None:
    """The attribute command inside a ``G04 #@! T...`` comment, else ``None``."""
    text = comment.strip()
    if not text.startswith(ATTRIBUTE_COMMENT):
        return None
    cmd = text[len(ATTRIBUTE_COMMENT):].strip()
    if len(cmd) >= 2 and cmd[:2].upper() in ("TF", "TA", "TO", "TD"):
        return cmd
    return None
