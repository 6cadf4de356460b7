"""Commutation loops of half-bridge legs: part roles, leg finding, loop geometry and what
its inductance means.

Units: millimetres, volts, henries inside (see each module).

* :mod:`~layoutcheck.loops.packages` -- the package table (pin numbering, internal L).
* :mod:`~layoutcheck.loops.roles` -- switches and capacitors and their pads.
* :mod:`~layoutcheck.loops.finder` -- half-bridge legs and the capacitors across them.
* :mod:`~layoutcheck.loops.assemble` -- a closed conductor chain from a pad sequence.
* :mod:`~layoutcheck.loops.consequences` -- overshoot, derating, ringing.
* :mod:`~layoutcheck.loops.evaluate` -- putting it together for the rule and the command.
"""
from .consequences import Consequences, consequences, grade
from .evaluate import (DEFAULT_DI_DT_A_PER_NS, LegLoops, LoopContext, LoopResult,
                       ThroughResult, evaluate_legs, evaluate_through)
from .finder import Leg, find_legs
from .pads import PadIndex, PadRef, parse_pad_list
from .roles import PartRole, part_roles

__all__ = ["Consequences", "consequences", "grade", "DEFAULT_DI_DT_A_PER_NS", "LegLoops",
           "LoopContext", "LoopResult", "ThroughResult", "evaluate_legs", "evaluate_through",
           "Leg", "find_legs", "PadIndex", "PadRef", "parse_pad_list", "PartRole",
           "part_roles"]
