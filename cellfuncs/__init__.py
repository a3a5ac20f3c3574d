"""cellfuncs: phase equilibrium of pure substances as spreadsheet functions.

The sheet functions are importable from here and behave as they do in a cell:
scalar or array in, scalar or array out, failures returned as :class:`CellError`
values rather than raised.

>>> import cellfuncs
>>> round(cellfuncs.BOIL_TEMP("water", 101325), 3)
373.124
"""

from __future__ import annotations

from typing import Any

from .errors import CellError

__version__ = "0.1.0"
__all__ = ["CellError", "__version__"]


def __getattr__(name: str) -> Any:
    # the sheet functions load numpy and the models: only on first use
    if name.isupper():
        from .sheet import functions

        if hasattr(functions, name):
            globals()[name] = getattr(functions, name)
            return globals()[name]
    raise AttributeError(f"module 'cellfuncs' has no attribute '{name}'")
