"""Plated versus non-plated, span and hole function from NC drill clues.

Sources named beside each check:
* "common practice" (format notes section 2.5, [O] marks): X2 attribute comments
  ``; #@! TF.FileFunction,Plated,1,2,PTH`` / ``NonPlated,1,2,NPTH`` / ``MixedPlating,1,2``
  and per-tool ``; #@! TA.AperFunction,Plated,PTH,ViaDrill``; ``;TYPE=PLATED`` comments
  ([M]); PTH / NPTH in file names ([M]).
* Gerber Layer Format Specification rev. 2024.05, .FileFunction values for drill layers
  (``Plated,<from>,<to>,<type>``), as summarised in our format notes section 1.10 / 2.6.
The order of precedence (tool comment, file function, TYPE comment, name) is the
project's reading of the clue strength listed in the format notes.
"""
import pytest

from layoutcheck.errors import InputFileError
from layoutcheck.readers.drill import parse_drill


def _file(header_lines, body="T1\nX1.0Y1.0\nT2\nX2.0Y2.0", name="board.drl"):
    return parse_drill("M48\nMETRIC\n" + "\n".join(header_lines) + "\n%\n" + body + "\nM30\n",
                       name)


def test_file_function_plated_sets_span_and_every_hole():
    """Gerber spec (.FileFunction Plated,1,2,PTH) / common practice as a drill comment."""
    df = _file(["; #@! TF.FileFunction,Plated,1,2,PTH", "T1C0.3", "T2C1.0"])
    assert df.plated is True and df.span == (1, 2)
    assert "TF.FileFunction Plated,1,2,PTH" in df.plating_basis
    assert [h.plated for h in df.holes] == [True, True]
    assert all("TF.FileFunction" in h.plating_basis for h in df.holes)


def test_file_function_nonplated_with_layers_in_any_order():
    """Gerber spec: NonPlated,<from>,<to>,NPTH; the span is (first, last) copper layer."""
    df = _file(["; #@! TF.FileFunction,NonPlated,4,1,NPTH", "T1C3.2", "T2C1.0"])
    assert df.plated is False and df.span == (1, 4)
    assert [h.plated for h in df.holes] == [False, False]


def test_tool_comment_beats_file_function_and_gives_function():
    """Common practice: a TA.AperFunction comment before a tool applies to that tool only
    and is the strongest clue; a mixed file says MixedPlating,1,2 (span, no plating)."""
    df = _file(["; #@! TF.FileFunction,MixedPlating,1,2",
                "; #@! TA.AperFunction,Plated,PTH,ViaDrill", "T1C0.3",
                "; #@! TA.AperFunction,NonPlated,NPTH,ComponentDrill", "T2C1.0"])
    assert df.plated is None and df.span == (1, 2)
    v, c = df.holes
    assert (v.plated, v.function) == (True, "ViaDrill")
    assert (c.plated, c.function) == (False, "ComponentDrill")
    assert v.plating_basis.startswith("TA.AperFunction Plated,PTH,ViaDrill")


def test_tool_comment_applies_only_to_next_tool():
    """Common practice: the TA comment applies to the next tool definition, not later ones;
    T2 then falls back to the file function."""
    df = _file(["; #@! TF.FileFunction,Plated,1,2,PTH",
                "; #@! TA.AperFunction,NonPlated,NPTH,MechanicalDrill", "T1C3.0", "T2C0.4"])
    assert [h.plated for h in df.holes] == [False, True]
    assert [h.function for h in df.holes] == ["MechanicalDrill", None]


def test_type_comments_per_tool_section():
    """Common practice ([M] in the notes): ;TYPE=PLATED / ;TYPE=NON_PLATED before groups of
    tool definitions; both kinds present, so the file as a whole stays undecided."""
    df = _file([";TYPE=PLATED", "T1C0.3", ";TYPE=NON_PLATED", "T2C3.0"])
    assert [h.plated for h in df.holes] == [True, False]
    assert df.holes[1].plating_basis == ";TYPE=NON_PLATED comment"
    assert df.plated is None


def test_single_type_comment_marks_the_file():
    """Common practice ([M]): one ;TYPE=NON_PLATED comment for the whole file."""
    df = _file([";TYPE=NON_PLATED", "T1C3.0", "T2C1.0"])
    assert [h.plated for h in df.holes] == [False, False]
    assert df.plated is False and df.span is None


@pytest.mark.parametrize("name, plated", [
    ("board-NPTH.drl", False),
    ("board_npth.xln", False),
    ("Board-non-plated.drl", False),
    ("board_nonplated.drl", False),
    ("board-unplated.txt", False),
    ("board-PTH.drl", True),
    ("out/board_pth.drl", True),
    ("board.drl", None),
    ("depth-map.drl", None),     # "pth" inside a word is not the word PTH
])
def test_file_name_clue(name, plated):
    """Common practice ([M]): PTH / NPTH (non-plated, unplated) in the file name mark the
    whole file; holes keep None (the caller decides from names / project file)."""
    df = _file(["T1C0.3", "T2C1.0"], name=name)
    assert df.plated is plated
    assert df.plating_basis == ("file name" if plated is not None else "")
    assert [h.plated for h in df.holes] == [None, None]


def test_file_function_beats_file_name():
    """Common practice: the file's own function comment is a stronger clue than its name."""
    df = _file(["; #@! TF.FileFunction,Plated,1,2,PTH", "T1C0.3", "T2C1.0"],
               name="board-NPTH.drl")
    assert df.plated is True


def test_no_clue_leaves_everything_undecided():
    """Format notes 2.5: NC drill has no native plating flag; without a clue the reader must
    not guess."""
    df = _file(["T1C0.3", "T2C1.0"])
    assert df.plated is None and df.span is None
    assert [(h.plated, h.plating_basis) for h in df.holes] == [(None, ""), (None, "")]


def test_malformed_file_function_layers_are_an_error():
    """Gerber spec: the span fields are layer numbers; 'top' is not one."""
    with pytest.raises(InputFileError) as exc:
        _file(["; #@! TF.FileFunction,Plated,top,2,PTH", "T1C0.3", "T2C1.0"])
    assert exc.value.line == 3
