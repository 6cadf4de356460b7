"""Collect the fab files of one board from a folder, a zip or a single file.

Zip archives are read in memory, member by member; nothing is ever written to disk, so a
member named ``../x`` or ``/etc/x`` cannot escape anywhere.  Such names are refused anyway,
as are archives over the limits on member count, expanded size and compression ratio
(:class:`layoutcheck.limits.Limits`).
"""
from __future__ import annotations

import stat
import zipfile
from dataclasses import dataclass
from pathlib import Path, PurePosixPath

from ..errors import InputFileError, ResourceLimitError
from ..limits import DEFAULT_LIMITS, Limits

#: Files we never treat as fab data (documentation, images, archives inside archives...).
IGNORED_SUFFIXES = {".md", ".pdf", ".png", ".jpg", ".jpeg", ".svg", ".html", ".json",
                    ".toml", ".zip", ".py", ".csv", ".xlsx", ".ods", ".rpt", ".pos"}


@dataclass
class FabFile:
    """One candidate input file: its display name (relative) and its bytes."""

    name: str
    data: bytes

    def text(self) -> str:
        try:
            return self.data.decode("utf-8")
        except UnicodeDecodeError:
            return self.data.decode("latin-1")

    def head(self, n: int = 4096) -> str:
        return self.data[:n].decode("latin-1")


def collect(path: Path, limits: Limits = DEFAULT_LIMITS) -> list[FabFile]:
    """Every file that may be fab data under ``path`` (folder, zip or single file).

    Sorted by name so that reading is deterministic.
    """
    path = Path(path)
    if not path.exists():
        raise InputFileError("no such file or folder", file=str(path))
    if path.is_dir():
        out = []
        for p in sorted(path.rglob("*")):
            if not p.is_file() or p.is_symlink():
                continue
            rel = p.relative_to(path).as_posix()
            if any(part.startswith(".") for part in PurePosixPath(rel).parts):
                continue
            if p.suffix.lower() in IGNORED_SUFFIXES:
                continue
            out.append(FabFile(rel, _read_file(p, limits)))
        return out
    if zipfile.is_zipfile(path):
        return read_zip(path, limits)
    return [FabFile(path.name, _read_file(path, limits))]


def _read_file(p: Path, limits: Limits) -> bytes:
    size = p.stat().st_size
    if size > limits.max_file_bytes:
        raise ResourceLimitError(
            f"file is {size} bytes; the limit for one fab file is {limits.max_file_bytes}",
            file=str(p))
    return p.read_bytes()


def read_zip(path: Path, limits: Limits = DEFAULT_LIMITS) -> list[FabFile]:
    """Read the members of a zip archive in memory, refusing unsafe or oversized ones."""
    try:
        zf = zipfile.ZipFile(path)
    except (zipfile.BadZipFile, OSError) as e:
        raise InputFileError(f"not a readable zip archive: {e}", file=str(path)) from e
    with zf:
        infos = [i for i in zf.infolist() if not i.is_dir()]
        if len(infos) > limits.max_zip_members:
            raise ResourceLimitError(
                f"archive has {len(infos)} members; the limit is {limits.max_zip_members}",
                file=str(path))
        total = 0
        out = []
        for info in sorted(infos, key=lambda i: i.filename):
            name = info.filename.replace("\\", "/")
            member = f"{path.name}:{name}"
            pp = PurePosixPath(name)
            if pp.is_absolute() or ".." in pp.parts or (len(name) > 1 and name[1] == ":"):
                raise InputFileError(
                    "archive member has an absolute or parent-relative path; refusing it",
                    file=member)
            mode = info.external_attr >> 16
            if mode and stat.S_ISLNK(mode):
                raise InputFileError("archive member is a symbolic link; refusing it",
                                     file=member)
            if any(part.startswith(".") or part == "__MACOSX" for part in pp.parts):
                continue
            if pp.suffix.lower() in IGNORED_SUFFIXES:
                continue
            if info.file_size > limits.max_file_bytes:
                raise ResourceLimitError(
                    f"member expands to {info.file_size} bytes; the limit is "
                    f"{limits.max_file_bytes}", file=member)
            total += info.file_size
            if total > limits.max_zip_total_bytes:
                raise ResourceLimitError(
                    f"archive expands to more than {limits.max_zip_total_bytes} bytes",
                    file=str(path))
            if info.compress_size and info.file_size / info.compress_size > limits.max_zip_ratio:
                raise ResourceLimitError(
                    f"member compression ratio {info.file_size / info.compress_size:.0f}:1 "
                    f"exceeds {limits.max_zip_ratio:.0f}:1 (possible zip bomb)", file=member)
            data = _read_member(zf, info, member, limits)
            out.append(FabFile(name, data))
        return out


def _read_member(zf: zipfile.ZipFile, info: zipfile.ZipInfo, member: str,
                 limits: Limits) -> bytes:
    # Read in chunks and stop at the declared size: a lying header cannot make us
    # expand more than the limit.
    cap = min(info.file_size, limits.max_file_bytes)
    chunks, got = [], 0
    try:
        with zf.open(info) as fh:
            while True:
                chunk = fh.read(1 << 20)
                if not chunk:
                    break
                got += len(chunk)
                if got > cap:
                    raise ResourceLimitError(
                        "member expands beyond its declared size; refusing it", file=member)
                chunks.append(chunk)
    except (zipfile.BadZipFile, OSError, EOFError, NotImplementedError) as e:
        raise InputFileError(f"cannot read archive member: {e}", file=member) from e
    return b"".join(chunks)
