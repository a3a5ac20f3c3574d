"""Dependency order: strongly connected components of the "needs" graph, dependencies first.

``adj[u]`` lists what ``u`` needs. A component with more than one member, or one
member that needs itself, is a circular reference.

>>> components([[1], [], [0]])
[[1], [0], [2]]
>>> sorted(map(sorted, components([[1], [0], [0]])))
[[0, 1], [2]]
>>> cycle([[1], [2], [0]], 0, {0, 1, 2})
[0, 1, 2, 0]
"""

from __future__ import annotations

from collections import deque


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
