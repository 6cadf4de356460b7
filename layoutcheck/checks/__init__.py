"""Rules: one module per rule, found automatically.

A rule module defines

* ``RULE_IDS``: the rule ids its findings carry (the first is the module's own id),
* ``SUMMARY``: one line saying what it checks,
* ``ORDER``: an integer; lower runs first (default 100),
* ``run(ctx: CheckContext) -> list[Finding]``,
* optionally ``applies(ctx) -> str | None``: ``None`` when the rule applies to this board
  and project, else the reason it does not (reported as an assumption; the rule is not run).

It receives the board, its net graph and the project through :class:`CheckContext`, returns
findings and appends any assumption it had to make to ``ctx.assumptions``.  It never reads
files and never prints or formats.
"""
from __future__ import annotations

import importlib
import pkgutil
from dataclasses import dataclass, field
from types import ModuleType

from ..findings import Finding
from ..model import Assumption, Board
from ..project import Project


@dataclass
class CheckContext:
    board: Board
    graph: object          # layoutcheck.netgraph.NetGraph (kept loose to avoid a cycle)
    project: Project
    assumptions: list[Assumption] = field(default_factory=list)

    def assume(self, topic: str, text: str) -> None:
        a = Assumption(topic, text)
        if a not in self.assumptions:
            self.assumptions.append(a)


def rule_modules() -> list[ModuleType]:
    """Every rule module in this package, in run order (ORDER, then name)."""
    mods = []
    for info in pkgutil.iter_modules(__path__):
        if info.name.startswith("_"):
            continue
        mod = importlib.import_module(f"{__name__}.{info.name}")
        if hasattr(mod, "run") and hasattr(mod, "RULE_IDS"):
            mods.append(mod)
    mods.sort(key=lambda m: (getattr(m, "ORDER", 100), m.__name__))
    return mods


def applicable_modules(ctx: CheckContext, ignore: list[str] | None = None) -> list[ModuleType]:
    """The rule modules to run: not ignored, and applying to this board and project.

    Each rule that does not apply leaves an assumption saying why.
    """
    ignore = set(ignore or [])
    mods = []
    for mod in rule_modules():
        if mod.RULE_IDS[0] in ignore:
            continue
        why = mod.applies(ctx) if hasattr(mod, "applies") else None
        if why:
            ctx.assume("rules", f"{mod.RULE_IDS[0]} not run: {why}")
            continue
        mods.append(mod)
    return mods


def run_checks(ctx: CheckContext, ignore: list[str] | None = None,
               modules: list[ModuleType] | None = None) -> list[Finding]:
    """Run the rules (``modules``, default every applicable one not in ``ignore``) and
    return all findings, sorted worst first."""
    ignore = set(ignore or [])
    if modules is None:
        modules = applicable_modules(ctx, list(ignore))
    out: list[Finding] = []
    for mod in modules:
        out.extend(f for f in mod.run(ctx) if f.rule not in ignore)
    out.sort(key=Finding.sort_key)
    return out
