"""Untrusted archives: no escaping paths, limits on members and expansion."""
import zipfile

import pytest

from layoutcheck.errors import InputFileError, ResourceLimitError
from layoutcheck.limits import Limits
from layoutcheck.readers.fabset import collect


def make_zip(path, members):
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as zf:
        for name, data in members:
            zf.writestr(name, data)
    return path


def test_reads_members_in_memory_sorted(tmp_path):
    z = make_zip(tmp_path / "b.zip", [("b.gbr", b"B"), ("a.gbr", b"A"), ("notes.md", b"x")])
    files = collect(z)
    assert [f.name for f in files] == ["a.gbr", "b.gbr"]
    assert files[0].data == b"A"


@pytest.mark.parametrize("bad", ["../evil.gbr", "/abs/evil.gbr", "a/../../evil.gbr"])
def test_refuses_escaping_member_names(tmp_path, bad):
    z = make_zip(tmp_path / "b.zip", [(bad, b"X")])
    with pytest.raises(InputFileError) as e:
        collect(z)
    assert "b.zip" in str(e.value)
    assert not (tmp_path.parent / "evil.gbr").exists()


def test_member_count_limit(tmp_path):
    z = make_zip(tmp_path / "b.zip", [(f"f{i}.gbr", b"x") for i in range(5)])
    with pytest.raises(ResourceLimitError):
        collect(z, Limits(max_zip_members=4))


def test_expansion_ratio_limit(tmp_path):
    z = make_zip(tmp_path / "bomb.zip", [("big.gbr", b"0" * 2_000_000)])
    with pytest.raises(ResourceLimitError) as e:
        collect(z, Limits(max_zip_ratio=50))
    assert "ratio" in str(e.value)


def test_total_size_limit(tmp_path):
    z = make_zip(tmp_path / "b.zip", [("a.gbr", b"1" * 1000), ("b.gbr", b"2" * 1000)])
    with pytest.raises(ResourceLimitError):
        collect(z, Limits(max_zip_total_bytes=1500, max_zip_ratio=1e9))


def test_missing_path(tmp_path):
    with pytest.raises(InputFileError):
        collect(tmp_path / "nope")
