"""The dependency graph of a workbook's formulas and the order it gives.

:func:`components` and :func:`cycle` work on any "needs" graph: ``adj[u]`` lists what ``u``
needs. A component with more than one member, or one member that needs itself, is a
circular reference.

:class:`Graph` is a workbook's: formula cells, defined names and ranges read as nodes.
:class:`Dependencies`, a part of :class:`~.engine.Recalc`, builds it, notes the references
found while evaluating, and evaluates its loops: on demand first (a loop of the references
written in the formulas may be no circular reference), else by Excel's iterative
calculation when the workbook asks for it, else as ``#CALC!``.

>>> components([[1], [], [0]])
[[1], [0], [2]]
>>> sorted(map(sorted, components([[1], [0], [0]])))
[[0, 1], [2]]
>>> cycle([[1], [2], [0]], 0, {0, 1, 2})
[0, 1, 2, 0]
"""

from __future__ import annotations

import bisect
import math
from collections import deque
from typing import TYPE_CHECKING, Iterator, NamedTuple

from ..errors import CALC, CellError
from .areas import AreaIndex
from .blocks import RECTANGLE
from .contexts import Context
from .limits import option
from .package import Refused
from .refs import Area, quoted, shifted

if TYPE_CHECKING:
    from .engine import Recalc

RESOLVED_LOOP_CELLS = 1000  # larger loops of written references are taken as circular without a try
RESOLVED_DEPTH = 40  # cells of a loop waiting for one another at once; deeper is taken as circular



def components(adj: list[list[int]]) -> list[list[int]]:
    """Tarjan's algorithm without recursion; every component comes after the ones it needs."""
    n = len(adj)
    index = [-1] * n
    low = [0] * n
    on_stack = [False] * n
    stack: list[int] = []
    out: list[list[int]] = []
    counter = 0
    for root in range(n):
        if index[root] != -1:
            continue
        index[root] = low[root] = counter
        counter += 1
        stack.append(root)
        on_stack[root] = True
        work = [(root, 0)]
        while work:
            v, i = work[-1]
            edges = adj[v]
            if i < len(edges):
                work[-1] = (v, i + 1)
                w = edges[i]
                if index[w] == -1:
                    index[w] = low[w] = counter
                    counter += 1
                    stack.append(w)
                    on_stack[w] = True
                    work.append((w, 0))
                elif on_stack[w] and index[w] < low[v]:
                    low[v] = index[w]
                continue
            work.pop()
            if work:
                u = work[-1][0]
                if low[v] < low[u]:
                    low[u] = low[v]
            if low[v] == index[v]:
                comp = []
                while True:
                    w = stack.pop()
                    on_stack[w] = False
                    comp.append(w)
                    if w == v:
                        break
                out.append(comp)
    return out


def cycle(adj: list[list[int]], start: int, members: set[int]) -> list[int]:
    """A shortest loop from ``start`` back to itself through ``members`` (breadth first)."""
    previous = {start: -1}
    queue = deque([start])
    while queue:
        v = queue.popleft()
        for w in adj[v]:
            if w == start:
                path = [v]
                while previous[path[-1]] != -1:
                    path.append(previous[path[-1]])
                return path[::-1] + [start]
            if w in members and w not in previous:
                previous[w] = v
                queue.append(w)
    return [start, start]


class Graph(NamedTuple):
    """The dependency graph. Nodes: the units (formula cells evaluated together, a column
    group, or alone), then ``extras[k]`` as node ``len(units) + k``: a defined name seen from
    a sheet, ``("name", key, sheet)``, or a range that formulas read, ``("area", sheet, (r1, c1,
    r2, c2))``, which stands between the formulas that read it and those inside it, so a range read by a
    thousand formulas costs a thousand edges and not a thousand times its contents."""

    units: list[tuple[int, ...]]
    extras: list[tuple]
    adj: list[list[int]]  # what each node needs
    comps: list[list[int]]  # strongly connected components, dependencies first


class _Links:
    """The dependency count of one graph build, against its limit."""

    def __init__(self, limit: int, engine: Recalc, graph: Graph):
        self.left, self.limit = limit, limit
        self.engine, self.graph = engine, graph
        self.owner = 0  # the node whose references are being followed

    def spend(self, n: int) -> None:
        self.left -= n
        if self.left < 0:
            who = self.engine.node_text(self.graph, self.owner)
            raise Refused(f"{who}: its references bring the dependencies between formulas over the limit of "
                          f"{self.limit:,} ({option('dependencies')})")


class Dependencies:
    """The dependency graph of :class:`~.engine.Recalc`'s formula cells, and its loops."""

    def found_read(self, s: int, a: Area) -> None:
        """Note that the formula cell being evaluated read area ``a`` of sheet ``s`` through a
        reference found while evaluating. If the area holds formula cells the order did not
        put first, the next pass orders them (see :meth:`run`)."""
        if self.current is None:
            return
        key = (s, a[:4])
        seen = self.found.setdefault(self.current, set())
        if key in seen:
            return
        seen.add(key)
        if self._has_formulas(s, a):
            self.found_new = True

    def _has_formulas(self, s: int, a: Area) -> bool:
        for c, (rows, _) in self._columns[s].items():
            if a.c1 <= c <= a.c2 and bisect.bisect_left(rows, a.r1) < bisect.bisect_right(rows, a.r2):
                return True
        return False

    def _targets(self, unit: tuple[int, ...]) -> Iterator[tuple[int, Area]]:
        """(sheet, area) of every reference of a unit (a block: from its first cell to its last)."""
        first, last = self.cells[unit[0]], self.cells[unit[-1]]
        t = first.template
        for name, a in t.refs:
            sheets = self.sheet_numbers(name, first.sheet)
            if type(sheets) is CellError:
                continue
            top = shifted(a, first.row - t.row, first.col - t.col)
            bottom = shifted(a, last.row - t.row, last.col - t.col) if len(unit) > 1 else top
            if top is None or bottom is None:
                continue
            for s in sorted(sheets):
                yield s, Area(top.r1, top.c1, max(top.r2, bottom.r2), max(top.c2, bottom.c2))

    def _graph(self, assumed: dict[int, Area]) -> Graph:
        """The dependency graph (see :class:`Graph`), components in evaluation order."""
        spills = [AreaIndex() for _ in self.book.sheets]
        for fi, a in assumed.items():
            spills[self.cells[fi].sheet].add(a, fi)
        for index in spills:
            index.freeze()  # stored ranges were checked on reading; placed spills never overlap
        floors: dict[int, int] = {}
        while True:
            units, levels = self._units(floors)
            unit_of = [0] * len(self.cells)
            for u, members in enumerate(units):
                for fi in members:
                    unit_of[fi] = u
            graph = Graph(units, [], [], [])
            node_of: dict[tuple, int] = {}
            links = _Links(self.limits.dependencies, self, graph)

            def node(extra: tuple) -> int:
                n = node_of.get(extra)
                if n is None:
                    n = node_of[extra] = len(units) + len(graph.extras)
                    graph.extras.append(extra)
                return n

            def refer(s: int, a: Area, needs: set[int]) -> None:
                """What a reference to area ``a`` of sheet ``s`` needs."""
                if a.single:
                    self._formulas_in(s, a, unit_of, needs, links)
                    anchor = spills[s].at(a.r1, a.c1)
                    if anchor is not None:
                        needs.add(unit_of[anchor])
                else:
                    links.spend(1)
                    needs.add(node(("area", s, a[:4])))

            def refer_names(names: tuple[str, ...], sheet: int, needs: set[int]) -> None:
                for text in names:
                    key = self.resolve_name(sheet, text)
                    if key is not None:
                        links.spend(1)
                        needs.add(node(("name", key, sheet)))

            for u, members in enumerate(units):
                needs: set[int] = set()
                links.owner = u
                for s, a in self._targets(members):
                    refer(s, a, needs)
                for fi in members:
                    for s, corners in self.found.get(fi, ()):
                        refer(s, Area(*corners), needs)
                fc = self.cells[members[0]]
                refer_names(fc.template.names, fc.sheet, needs)
                graph.adj.append(sorted(needs))
            for k, extra in enumerate(graph.extras):  # grows while it runs: names and ranges met on the way
                needs = set()
                links.owner = len(units) + k
                if extra[0] == "area":
                    _, s, corners = extra
                    a = Area(*corners)
                    self._formulas_in(s, a, unit_of, needs, links)
                    for anchor in spills[s].meeting(a):
                        links.spend(1)
                        needs.add(unit_of[anchor])
                else:
                    _, key, sheet = extra
                    t = self.name_template(key)
                    for ref_sheet, a in t.refs:
                        sheets = self.sheet_numbers(ref_sheet, sheet)
                        for s in sheets if type(sheets) is list else ():
                            refer(s, a, needs)
                    refer_names(t.names, sheet, needs)
                graph.adj.append(sorted(needs))
            graph.comps.extend(components(graph.adj))
            looped = [u for comp in graph.comps if len(comp) > 1 or comp[0] in graph.adj[comp[0]]
                      for u in comp if u < len(units) and len(units[u]) > 1]
            if not looped:
                return graph
            for u in looped:  # a block evaluated at once cannot be part of a loop: cut it finer
                for fi in units[u]:
                    floors[fi] = max(floors.get(fi, RECTANGLE), levels[u] + 1)

    def _formulas_in(self, s: int, a: Area, unit_of: list[int], needs: set[int], links: _Links) -> None:
        """Add the units of the formula cells in area ``a`` of sheet ``s``."""
        cols = self._columns[s]
        if a.c2 - a.c1 + 1 <= len(cols):
            candidates = (cols[c] for c in range(a.c1, a.c2 + 1) if c in cols)
        else:
            candidates = (v for c, v in cols.items() if a.c1 <= c <= a.c2)
        for rows, fis in candidates:
            lo, hi = bisect.bisect_left(rows, a.r1), bisect.bisect_right(rows, a.r2)
            links.spend(hi - lo)  # counted before they are visited
            needs.update(map(unit_of.__getitem__, fis[lo:hi]))

    @property
    def graph(self) -> tuple[list[tuple[int, ...]], list[list[int]], list[list[int]]]:
        """(units, the units each needs, components) of the last pass, for tools that trace
        results back: what a unit needs through ranges and names is listed as the units
        behind them, so every node of this view is a unit. Blocks evaluated at once are
        traced cell by cell: each formula cell is a unit of its own."""
        graph = self._graph_used
        if any(len(members) > 1 for members in graph.units):
            batched, self.batched = self.batched, False  # the same order constraints, between single cells
            try:
                graph = self._graph(dict(self.spills))
            finally:
                self.batched = batched
        n = len(graph.units)
        needs = []
        for u in range(n):
            found, seen, todo = set(), set(), list(graph.adj[u])
            while todo:
                v = todo.pop()
                if v < n:
                    found.add(v)
                elif v not in seen:
                    seen.add(v)
                    todo += graph.adj[v]
            needs.append(sorted(found))
        comps = [[u for u in comp if u < n] for comp in graph.comps]
        return graph.units, needs, [comp for comp in comps if comp]

    def _iterate(self, graph: Graph, comp: list[int]) -> None:
        """Excel's iterative calculation, as the workbook asks for it: the loop's cells are
        evaluated in turn, in sheet order, from their stored values, until none changes by
        more than the maximum change or the maximum count is reached."""
        count, delta = self.book.iteration
        units = graph.units
        cells = sorted((fi for u in comp if u < len(units) for fi in units[u]), key=self._sort_key)
        names = [(extra[1], extra[2]) for u in comp if u >= len(units)
                 for extra in (graph.extras[u - len(units)],) if extra[0] == "name"]
        for fi in cells:
            fc = self.cells[fi]
            cached = self.book.sheets[fc.sheet].scan.formulas[(fc.row, fc.col)].cached
            self.values[fc.sheet][(fc.row, fc.col)] = cached if type(cached) is float else 0.0
        for _ in range(count):
            for key in names:  # the loop's names and ranges read the values of this sweep
                self.name_values.pop(key, None)
            self._blocks.clear()
            self._kept = 0
            change = 0.0
            for fi in cells:
                fc = self.cells[fi]
                before = self.values[fc.sheet].get((fc.row, fc.col))
                self._cell(fi)
                after = self.values[fc.sheet].get((fc.row, fc.col))
                if type(before) is float and type(after) is float:
                    change = max(change, abs(after - before))
                elif before != after:
                    change = math.inf
            if change <= delta:
                return

    def _loop(self, graph: Graph, comp: list[int]) -> None:
        """Every cell of a loop holds #CALC! naming it; so does every name on it (unless the
        workbook asks for iterative calculation: :meth:`_iterate`)."""
        if self.book.iteration is not None:
            self._iterate(graph, comp)
            return
        if self._resolve(graph, comp):
            return
        self._blocks.clear()  # ranges read while resolving it may hold values the loop's errors replace
        self._kept = 0
        units = graph.units
        members = set(comp)
        shared = None
        for u in sorted(comp, key=lambda u: self._node_key(graph, u)):
            if u >= len(units) and graph.extras[u - len(units)][0] == "area":
                continue
            if shared is None or len(comp) <= 200:  # beyond that, one loop names them all
                path = [v for v in cycle(graph.adj, u, members)
                        if v < len(units) or graph.extras[v - len(units)][0] == "name"]
                shared = "circular reference: " + " -> ".join(self.node_text(graph, v) for v in path)
            if u < len(units):
                self._store(units[u][0], CellError(CALC, shared))
            else:
                _, key, sheet = graph.extras[u - len(units)]
                self.name_values[(key, sheet)] = CellError(CALC, shared)

    def _resolve(self, graph: Graph, comp: list[int]) -> bool:
        """Evaluate a loop of plain formula cells on demand, in sheet order, a cell reading a cell of
        the loop that is not evaluated yet evaluating it first (:meth:`wait_for`). True when every cell
        got its value so; False when one read a cell still being evaluated (a real circular
        reference), or the loop holds names, array formulas or too many cells to try."""
        units = graph.units
        if any(u >= len(units) and graph.extras[u - len(units)][0] == "name" for u in comp):
            return False
        cells = sorted((fi for u in comp if u < len(units) for fi in units[u]), key=self._sort_key)
        if len(cells) > RESOLVED_LOOP_CELLS or any(self.cells[fi].kind != "normal" for fi in cells):
            return False
        for fi in cells:
            fc = self.cells[fi]
            self.pending.setdefault(fc.sheet, {})[(fc.row, fc.col)] = fi
        self._circular = False
        try:
            for fi in cells:
                fc = self.cells[fi]
                if (fc.row, fc.col) in self.pending[fc.sheet]:
                    self._evaluate_waited(fi)
        finally:
            self.pending = {}
        return not self._circular

    def wait_for(self, s: int, a: Area) -> None:
        """Before a formula reads area ``a`` of sheet ``s`` while a loop is resolved: the loop's cells
        there that are not evaluated yet, evaluated first."""
        pending = self.pending.get(s)
        if not pending:
            return
        if a.single:
            fi = pending.get((a.r1, a.c1))
            waited = [] if fi is None else [fi]
        else:
            waited = [fi for (r, c), fi in pending.items() if a.contains(r, c)]
        for fi in waited:
            self._evaluate_waited(fi)

    def _evaluate_waited(self, fi: int) -> None:
        """Formula cell ``fi`` of the loop being resolved, evaluated in the middle of another's
        evaluation (whose context, cell and budget are put back after)."""
        if self._circular:
            return
        if fi in self._waiting or len(self._waiting) >= RESOLVED_DEPTH:
            self._circular = True
            return
        fc = self.cells[fi]
        saved = self._context, self.current, self.budget.left
        self._context = Context(self)
        self._waiting.append(fi)
        try:
            self._cell(fi)
        finally:
            self._waiting.pop()
            self._context, self.current, self.budget.left = saved
            self.pending[fc.sheet].pop((fc.row, fc.col), None)

    def _node_key(self, graph: Graph, u: int) -> tuple:
        """Cells in sheet order, then names, then ranges."""
        if u < len(graph.units):
            return (0,) + self._sort_key(graph.units[u][0])
        extra = graph.extras[u - len(graph.units)]
        return (1, extra[1][1], extra[2]) if extra[0] == "name" else (2, extra[1], extra[2])

    def node_text(self, graph: Graph, u: int) -> str:
        """A graph node as people name it: ``Sheet!A1``, ``the name Rate`` or ``Sheet!A1:B9``."""
        if u < len(graph.units):
            return self.where(graph.units[u][0])
        extra = graph.extras[u - len(graph.units)]
        if extra[0] == "name":
            return f"the name {extra[1][1]}"
        return f"{quoted(self.book.sheets[extra[1]].name)}!{Area(*extra[2]).text()}"
