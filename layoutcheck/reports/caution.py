"""The safety caution every report carries (text shared by all report formats)."""

import textwrap

CAUTION = (
    "CAUTION: the circuits reviewed here carry lethal voltages and store dangerous energy. "
    "This review is an aid to a person's judgement, not a certification. It checks only what "
    "it could read and only the rules it lists; its tables are reproduced from secondary "
    "sources and some values are marked as recalled from memory. The end-product safety "
    "standard, local electrical codes and licensed practice govern: confirm every spacing "
    "and rating against them before building, and never work on a live or charged board."
)


def closing_lines(assumptions, width: int) -> list[str]:
    """The end of every text report: the assumptions, then the caution, wrapped."""
    lines = [f"Assumptions ({len(assumptions)})"]
    for a in assumptions:
        lines.extend(textwrap.wrap(f"[{a.topic}] {a.text}", width, initial_indent="  - ",
                                   subsequent_indent="    "))
    lines.append("")
    lines.extend(textwrap.wrap(CAUTION, width))
    return lines
