"""Which formula cells are volatile: they call a function whose value changes from one
recalculation to the next (NOW, TODAY, RAND, ... — the list in
``cellfuncs/data/excel/functions.toml``), directly or through defined names, or they need
such a cell. The conformance runner leaves them out of its scores, and ``cellfuncs recalc
--check --ignore-volatile`` out of its comparison.
"""

from __future__ import annotations

import re
from functools import lru_cache

from ..formula import Call, walk
from .engine import Recalc

_PREFIXES = ("_XLFN.", "_XLWS.", "_XLUDF.")
_CALLED = re.compile(r"([A-Za-z_][A-Za-z0-9_.]*)\s*\(")
_STRING = re.compile(r'"(?:[^"]|"")*"')


@lru_cache(maxsize=1)
def volatile_functions() -> frozenset[str]:
    """The functions Excel recalculates every time (upper case)."""
    from ..data import load

    return frozenset(load("excel/functions")["volatile"])


def called_in_text(formula_text: str) -> list[str]:
    """Function names in a formula text the parser could not read (strings left out)."""
    names = []
    for m in _CALLED.finditer(_STRING.sub('""', formula_text)):
        name = m.group(1).upper()
        while name.startswith(_PREFIXES):
            name = name.split(".", 1)[1]
        names.append(name)
    return names


def functions_called(engine: Recalc, fi: int, text: str) -> list[str]:
    """The functions cell ``fi`` calls, in formula order without repeats."""
    ast = engine.cells[fi].template.ast
    if ast is None:
        names = called_in_text(text)
    else:
        names = []
        for n in walk(ast):
            if isinstance(n, Call):
                name = n.name
                while name.startswith(_PREFIXES):
                    name = name.split(".", 1)[1]
                names.append(name)
    return list(dict.fromkeys(names))


def _names_call_volatile(engine: Recalc, fi: int, volatile: frozenset[str]) -> bool:
    """Whether a defined name the cell uses (or a name those use) calls a volatile function."""
    fc = engine.cells[fi]
    todo, seen = list(fc.template.names), set()
    while todo:
        key = engine.resolve_name(fc.sheet, todo.pop())
        if key is None or key in seen:
            continue
        seen.add(key)
        t = engine.name_template(key)
        if t.ast is None:
            if any(n in volatile for n in called_in_text(engine.book.names[key])):
                return True
            continue
        if any(isinstance(n, Call) and n.name in volatile for n in walk(t.ast)):
            return True
        todo += t.names
    return False


def _downstream(adj: list[list[int]], seeds: set[int]) -> set[int]:
    """Units that need any of ``seeds``, directly or through others (seeds included)."""
    users: list[list[int]] = [[] for _ in adj]
    for u, needs in enumerate(adj):
        for v in needs:
            users[v].append(u)
    out, todo = set(seeds), list(seeds)
    while todo:
        for w in users[todo.pop()]:
            if w not in out:
                out.add(w)
                todo.append(w)
    return out


def volatile_cells(engine: Recalc, volatile: frozenset[str] | None = None) -> set[int]:
    """The formula cells (indices into ``engine.cells``) that call a volatile function,
    directly or through defined names, and every cell that needs one of them; after
    :meth:`Recalc.run`, whose dependency graph it follows."""
    volatile = volatile_functions() if volatile is None else volatile
    units, adj, _ = engine.graph
    unit_of = {fi: u for u, members in enumerate(units) for fi in members}
    seeds = set()
    for fi, fc in enumerate(engine.cells):
        f = engine.book.sheets[fc.sheet].scan.formulas[(fc.row, fc.col)]
        if any(n in volatile for n in functions_called(engine, fi, f.text)) or _names_call_volatile(engine, fi, volatile):
            seeds.add(unit_of[fi])
    return {fi for u in _downstream(adj, seeds) for fi in units[u]}
