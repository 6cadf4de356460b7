"""Safe, streaming XML access for the IPC-2581 reader.

* **Safe.**  lxml parses with ``resolve_entities=False``, ``no_network=True``,
  ``load_dtd=False`` and ``huge_tree=False`` (libxml2's own depth and size caps stay on).
  Before parsing, the prolog is scanned and a document type declaration that declares
  entities or points at an external DTD is refused outright
  (:func:`check_prolog`): IPC-2581 documents are defined by a schema and need no DTD, and
  entity tricks ("billion laughs", external entities naming local files or URLs) are the
  classic XML attacks.
* **Streaming.**  :class:`XmlWalk` drives ``etree.iterparse`` with start and end events and
  frees each element once its end has been handled (``clear()`` plus deleting the earlier
  siblings), so memory grows with the largest element a caller asks to keep whole
  (:meth:`XmlWalk.collect`), not with the file.
* **Located errors.**  The walk keeps the element path
  (``/IPC-2581/Ecad/CadData/Step[board]/LayerFeature[L1]/Set[12]/Pad``) and the line number
  of the current element for messages.

Units: none here (see :data:`UNIT_MM` for the length units IPC-2581 names).
"""
from __future__ import annotations

import math
import re
from pathlib import Path

from lxml import etree

from ..errors import InputFileError

#: Millimetres per unit for the ``units`` values of CadHeader and the dictionaries
#: (IPC-2581 unit names, from memory; see the shared format notes section 3.2).
UNIT_MM = {"MILLIMETER": 1.0, "MICRON": 0.001, "INCH": 25.4}

#: The prolog (everything before the root element) may be at most this long (bytes).
MAX_PROLOG_BYTES = 1 << 20

#: Elements whose path label uses an attribute (others are numbered among their siblings).
_KEY_OF = {"Step": "name", "Layer": "name", "LayerFeature": "layerRef", "Ecad": "name",
           "EntryStandard": "id", "EntryUser": "id", "EntryLineDesc": "id",
           "EntryFillDesc": "id", "Component": "refDes", "Package": "name",
           "PadStackDef": "name", "LogicalNet": "name", "PhyNet": "name", "Bom": "name",
           "RefDes": "name", "StackupLayer": "layerOrGroupRef", "Hole": "name",
           "SlotCavity": "name", "PadstackPadDef": "layerRef", "LayerPad": "layerRef",
           "Stackup": "name", "StackupGroup": "name"}

_ROOT_RE = re.compile(r"<(?:[A-Za-z_][\w.-]*:)?IPC-2581[\s>/]")


_LOCAL: dict[str, str] = {}


def local(tag) -> str:
    """Local name of an lxml tag (namespace dropped)."""
    name = _LOCAL.get(tag)
    if name is None:
        if not isinstance(tag, str):
            return ""
        name = tag.rpartition("}")[2]
        if len(_LOCAL) < 10_000:
            _LOCAL[tag] = name
    return name


#: libxml2 reports line numbers above this as this value; such lines are not trusted.
_LINE_CAP = 65535


def src_line(elem) -> int | None:
    """1-based line of ``elem``'s start tag, or None when unknown (libxml2 caps line
    numbers at 65535 in this parsing mode; the element path still locates the element)."""
    n = getattr(elem, "sourceline", None)
    return n if n is not None and 0 < n < _LINE_CAP else None


def _decode_head(head: bytes) -> str:
    if head.startswith(b"\xef\xbb\xbf"):
        return head[3:].decode("utf-8", "replace")
    if head.startswith((b"\xff\xfe", b"<\x00?\x00", b"<\x00")):
        return head.decode("utf-16-le", "replace").lstrip("\ufeff")
    if head.startswith((b"\xfe\xff", b"\x00<\x00?", b"\x00<")):
        return head.decode("utf-16-be", "replace").lstrip("\ufeff")
    return head.decode("latin-1")


def looks_like_ipc2581(head: bytes) -> bool:
    """True when ``head`` (the first bytes of a file) is XML whose root is ``IPC-2581``.

    Any namespace prefix is accepted.  Only the first 64 KiB are looked at.
    """
    text = _decode_head(head[:65536]).lstrip()
    if not text.startswith("<"):
        return False
    return _ROOT_RE.search(text) is not None


def _line_at(text: str, pos: int) -> int:
    return text.count("\n", 0, pos) + 1


def check_prolog(path: Path, file: str) -> None:
    """Refuse a document whose prolog declares entities or names an external DTD.

    Raises :class:`InputFileError` ("DTD/entity declarations are not accepted") with the
    line of the declaration.  A bare ``<!DOCTYPE IPC-2581>`` is accepted (it declares
    nothing).
    """
    with open(path, "rb") as f:
        head = f.read(MAX_PROLOG_BYTES)
    text = _decode_head(head)
    i, n = 0, len(text)
    while True:
        while i < n and text[i] in " \t\r\n":
            i += 1
        if i >= n:
            if len(head) >= MAX_PROLOG_BYTES:
                raise InputFileError(
                    f"no root element within the first {MAX_PROLOG_BYTES} bytes; expected an "
                    "XML declaration and the IPC-2581 root element", file=file)
            return  # empty or prolog-only: the parser reports it
        if text.startswith("<?", i):
            j = text.find("?>", i + 2)
            if j < 0:
                return
            i = j + 2
        elif text.startswith("<!--", i):
            j = text.find("-->", i + 4)
            if j < 0:
                return
            i = j + 3
        elif text.startswith("<!", i):
            end = _doctype_end(text, i)
            body = text[i:end]
            if ("<!ENTITY" in body or re.search(r"\b(SYSTEM|PUBLIC)\b", body)
                    or "[" in body):
                raise InputFileError(
                    "DTD/entity declarations are not accepted: the document type declaration "
                    f"{_short(body)!r} declares entities or names an external DTD; an IPC-2581 "
                    "document needs neither", file=file, line=_line_at(text, i))
            if end >= n and len(head) >= MAX_PROLOG_BYTES:
                raise InputFileError("document type declaration longer than "
                                     f"{MAX_PROLOG_BYTES} bytes; not accepted", file=file)
            i = end
        else:
            return


def _doctype_end(text: str, i: int) -> int:
    """Index just after the ``>`` closing the declaration at ``i`` (quotes and [..] aware)."""
    depth, quote = 0, None
    n = len(text)
    j = i + 2
    while j < n:
        c = text[j]
        if quote:
            if c == quote:
                quote = None
        elif c in "\"'":
            quote = c
        elif c == "[":
            depth += 1
        elif c == "]":
            depth -= 1
        elif c == ">" and depth <= 0:
            return j + 1
        j += 1
    return n


def _short(s: str, n: int = 60) -> str:
    s = " ".join(s.split())
    return s if len(s) <= n else s[:n] + "..."


def _free(elem) -> None:
    """Clear a handled element and delete the siblings before it (iterparse memory)."""
    elem.clear(keep_tail=False)
    parent = elem.getparent()
    if parent is not None:
        while elem.getprevious() is not None:
            del parent[0]


class XmlWalk:
    """Iterate over ``(event, element)`` pairs of an XML file with bounded memory.

    Usage::

        walk = XmlWalk(path, "board.xml")
        for event, elem in walk:
            if event == "start" and local(elem.tag) == "Features":
                walk.collect()          # keep this subtree whole until its end event
            elif event == "start" and local(elem.tag) == "Bom":
                walk.skip()             # never see it
            elif event == "end" and local(elem.tag) == "Features":
                handle(elem, walk.where())

    After the caller has handled an ``end`` event the element is cleared and its earlier
    siblings are deleted.
    :meth:`where` gives the current element's path, :attr:`line` its line.
    """

    def __init__(self, path: Path | str, file: str):
        self.path = Path(path)
        self.file = file
        self._labels: list[str] = []
        self._counts: list[dict[str, int] | None] = []
        self._lines: list[int] = []
        self._special: str | None = None
        self.root_name: str | None = None

    # ----------------------------------------------------------------- location
    def where(self, extra: str | None = None) -> str:
        """Path of the current element (``/IPC-2581/...``), plus ``extra`` if given."""
        p = "/" + "/".join(self._labels)
        return p + "/" + extra if extra else p

    @property
    def line(self) -> int | None:
        """Line of the current element's start tag, if known."""
        return self._lines[-1] if self._lines else None

    @property
    def depth(self) -> int:
        """Depth of the current element (root = 1)."""
        return len(self._labels)

    def parent_name(self, up: int = 1) -> str:
        """Local name of the ancestor ``up`` levels above the current element ("" if none)."""
        if len(self._labels) <= up:
            return ""
        return self._labels[-1 - up].split("[", 1)[0]

    def error(self, message: str, *, elem=None, extra: str | None = None,
              cls=InputFileError) -> InputFileError:
        """An error located at the current element (or ``elem``'s line)."""
        line = src_line(elem) if elem is not None else self.line
        return cls(message, file=self.file, line=line, element=self.where(extra))

    def collect(self) -> None:
        """Keep the current element's subtree whole: its descendants' events are not
        reported; its end event is, with the complete subtree.  Call on a start event."""
        self._special = "collect"

    def skip(self) -> None:
        """Drop the current element's subtree unseen (freed as it is read).  Call on a
        start event; neither its descendants' events nor its end event are reported."""
        self._special = "skip"

    # ----------------------------------------------------------------- iteration
    def _label(self, elem) -> str:
        name = local(elem.tag)
        key = _KEY_OF.get(name)
        if key is not None:
            v = elem.get(key)
            if v:
                return f"{name}[{_short(v, 40)}]"
        if not self._counts:
            return name
        counts = self._counts[-1]
        if counts is None:
            counts = self._counts[-1] = {}
        k = counts.get(name, 0) + 1
        counts[name] = k
        return f"{name}[{k}]"

    def __iter__(self):
        check_prolog(self.path, self.file)
        ctx = etree.iterparse(str(self.path), events=("start", "end"),
                              resolve_entities=False, no_network=True, load_dtd=False,
                              huge_tree=False, remove_comments=True, remove_pis=True,
                              dtd_validation=False, attribute_defaults=False, recover=False,
                              collect_ids=False)
        labels, counts, lines = self._labels, self._counts, self._lines
        sub = 0   # depth below a collected or skipped element
        try:
            for event, elem in ctx:
                special = self._special
                if special is not None:
                    if event == "start":
                        sub += 1
                        continue
                    if sub > 0:
                        sub -= 1
                        if special == "skip":
                            _free(elem)
                        continue
                    self._special = None
                    if special == "collect":
                        yield event, elem
                    _free(elem)
                    labels.pop()
                    counts.pop()
                    lines.pop()
                    continue
                if event == "start":
                    if not labels:
                        self._check_root(elem)
                    labels.append(self._label(elem))
                    counts.append(None)
                    lines.append(src_line(elem))
                    yield event, elem
                    continue
                yield event, elem
                if len(labels) > 1:
                    _free(elem)
                labels.pop()
                counts.pop()
                lines.pop()
        except etree.XMLSyntaxError as e:
            msg = str(getattr(e, "msg", e) or e)
            low = msg.lower()
            what = "the file ends before the document does (truncated?)" if (
                "premature end" in low or "end of data" in low
                or "extra content" not in low and "eof" in low) else "not well-formed XML"
            raise InputFileError(f"{what}: {msg}; expected a complete, well-formed IPC-2581 "
                                 "XML document", file=self.file,
                                 line=e.lineno if e.lineno and e.lineno < _LINE_CAP else None,
                                 element=self.where() if labels else None) from None
        finally:
            del ctx

    def _check_root(self, elem) -> None:
        name = local(elem.tag)
        self.root_name = name
        docinfo = elem.getroottree().docinfo
        dtd = docinfo.internalDTD
        if dtd is not None and (list(dtd.iterentities()) or list(dtd.elements())):
            raise InputFileError("DTD/entity declarations are not accepted: the document "
                                 "declares a DTD internal subset", file=self.file,
                                 line=src_line(elem))
        if name != "IPC-2581":
            raise InputFileError(f"root element is <{name}>; expected <IPC-2581>",
                                 file=self.file, line=src_line(elem))


# ---------------------------------------------------------------------- attribute values
def number(elem, attr: str, walk_or_where, *, default: float | None = None,
           required: bool = True, file: str | None = None) -> float | None:
    """A finite decimal attribute, or ``default`` when absent and not required.

    ``walk_or_where`` is an :class:`XmlWalk` (for the error location) or a path string
    (then ``file`` names the file).
    """
    v = elem.get(attr)
    if v is None:
        if required and default is None:
            raise _err(walk_or_where, elem, f"<{local(elem.tag)}> has no {attr} attribute; "
                       "expected a number", file)
        return default
    try:
        x = float(v)
    except ValueError:
        raise _err(walk_or_where, elem, f"{local(elem.tag)}@{attr} is {_short(v, 30)!r}; "
                   "expected a decimal number", file) from None
    if not math.isfinite(x):
        raise _err(walk_or_where, elem, f"{local(elem.tag)}@{attr} is {v!r}; expected a "
                   "finite number", file)
    return x


def boolean(elem, attr: str, default: bool = False) -> bool:
    """An XML Schema boolean attribute (``true``/``false``/``1``/``0``)."""
    v = elem.get(attr)
    if v is None:
        return default
    return v.strip().lower() in ("true", "1")


def _err(walk_or_where, elem, message: str, file: str | None) -> InputFileError:
    if isinstance(walk_or_where, XmlWalk):
        return InputFileError(message, file=walk_or_where.file,
                              line=src_line(elem) or walk_or_where.line,
                              element=walk_or_where.where())
    return InputFileError(message, file=file, line=src_line(elem),
                          element=str(walk_or_where))


def unit_factor(value: str | None, where: str, file: str, line: int | None,
                default: float | None = None) -> float:
    """Millimetres per unit for a ``units`` attribute value."""
    if value is None:
        if default is not None:
            return default
        raise InputFileError("no units attribute; expected MILLIMETER, MICRON or INCH",
                             file=file, line=line, element=where)
    f = UNIT_MM.get(value.strip().upper())
    if f is None:
        raise InputFileError(f"units {value!r} unknown; expected one of "
                             f"{', '.join(UNIT_MM)}", file=file, line=line, element=where)
    return f


def rel_path(base: str, root, elem) -> str:
    """Path of ``elem`` inside a collected subtree whose root element ``root`` is at ``base``."""
    parts = []
    e = elem
    while e is not None and e is not root:
        parent = e.getparent()
        name = local(e.tag)
        label = name
        key = _KEY_OF.get(name)
        if key is not None and e.get(key):
            label = f"{name}[{_short(e.get(key), 40)}]"
        else:
            if parent is not None:
                same = [c for c in parent if local(c.tag) == name]
                if len(same) > 1:
                    label = f"{name}[{same.index(e) + 1}]"
        parts.append(label)
        e = parent
    return base + "".join("/" + p for p in reversed(parts))


__all__ = ["UNIT_MM", "XmlWalk", "boolean", "check_prolog", "local", "looks_like_ipc2581",
           "number", "rel_path", "src_line", "unit_factor"]
