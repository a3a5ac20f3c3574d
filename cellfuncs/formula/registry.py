"""The registry of built-ins, filled on first need.

The ``fn_*`` modules register their built-ins as they are imported; importing them all takes longer
than the rest of the engine, and a formula of the pack's functions alone (``cellfuncs eval
'=BOIL_TEMP("water",1,"atm")'``) needs none of them. So they are imported on the first look-up
that could find one: a name Excel knows as a function (``data/excel/functions.toml``, and the
functions the parser writes for ``A1#`` and ``@``), or any listing of the registry. Any other
name is no built-in, loaded or not; a built-in registered by hand (a test's) is found either way.

>>> registry = Registry(lambda: registry.update(ROUND="round"))
>>> registry.get("BOIL_TEMP"), dict.__len__(registry)
(None, 0)
>>> registry.get("ROUND"), len(registry)
('round', 1)
"""

from __future__ import annotations

from functools import lru_cache
from typing import Any, Callable, Iterator

# Excel's functions the parser writes for its operators (A1# and @); the by-category list has neither.
OPERATOR_FUNCTIONS = frozenset({"ANCHORARRAY", "SINGLE"})


@lru_cache(maxsize=1)
def excel_function_names() -> frozenset[str]:
    """Every name a built-in may have: Excel's worksheet functions and its operators' functions."""
    from ..data import load

    listed = load("excel/functions")["categories"].values()
    return frozenset(name for names in listed for name in names) | OPERATOR_FUNCTIONS


class Registry(dict):
    """name -> built-in; ``load`` (which registers every built-in) runs before the first look-up that
    could find a built-in not yet registered, and before any listing."""

    def __init__(self, load: Callable[[], None]):
        super().__init__()
        self._load = load
        self._loaded = False

    def _ensure_loaded(self) -> None:
        if not self._loaded:
            self._loaded = True  # first: a module looking a built-in up while it loads sees those before it
            self._load()

    def _find(self, name: str) -> Any:
        found = dict.get(self, name)
        if found is None and not self._loaded and name in excel_function_names():
            self._ensure_loaded()
            found = dict.get(self, name)
        return found

    def get(self, name: str, default: Any = None) -> Any:
        found = self._find(name)
        return default if found is None else found

    def __getitem__(self, name: str) -> Any:
        found = self._find(name)
        if found is None:
            raise KeyError(name)
        return found

    def __contains__(self, name: object) -> bool:
        return isinstance(name, str) and self._find(name) is not None

    def __iter__(self) -> Iterator[str]:
        self._ensure_loaded()
        return dict.__iter__(self)

    def __len__(self) -> int:
        self._ensure_loaded()
        return dict.__len__(self)

    def keys(self):  # type: ignore[override]
        self._ensure_loaded()
        return dict.keys(self)

    def values(self):  # type: ignore[override]
        self._ensure_loaded()
        return dict.values(self)

    def items(self):  # type: ignore[override]
        self._ensure_loaded()
        return dict.items(self)
