"""The pack's own registry of sheet functions, and their xlwings decoration for Excel.

The command line, the formula engine and the tests find functions here. On
Windows (where Excel calls Python through xlwings) the same functions also get
xlwings' decorators: a category, the docstring and one line per argument for
Excel's function dialog. Elsewhere xlwings is not imported at all.
"""

from __future__ import annotations

import functools
import inspect
import sys
from typing import Any, Callable, NamedTuple

import numpy as np

from ..errors import VALUE, CellError
from .cells import CallError

CATEGORY = "cellfuncs"


class SheetFunction(NamedTuple):
    name: str
    call: Callable[..., Any]
    signature: str
    summary: str
    arguments: dict[str, str]


FUNCTIONS: dict[str, SheetFunction] = {}


def _argument_docs(doc: str) -> dict[str, str]:
    """Lines ``name: text`` under an ``Arguments:`` heading of a docstring."""
    docs: dict[str, str] = {}
    inside = False
    for line in doc.splitlines():
        stripped = line.strip()
        if stripped == "Arguments:":
            inside = True
        elif inside and not stripped:
            break
        elif inside and ":" in stripped:
            name, text = stripped.split(":", 1)
            docs[name.strip()] = text.strip()
    return docs


def sheet_function(fn: Callable[..., Any]) -> Callable[..., Any]:
    """Register ``fn`` as a sheet function; failures come back as error values, never exceptions."""

    @functools.wraps(fn)
    def call(*args: Any, **kwargs: Any) -> Any:
        try:
            with np.errstate(all="ignore"):
                return fn(*args, **kwargs)
        except CallError as exc:
            return exc.error
        except TypeError as exc:
            return CellError(VALUE, f"{fn.__name__}: {exc}")

    doc = inspect.getdoc(fn) or ""
    params = inspect.signature(fn).parameters.values()
    signature = f"{fn.__name__}(" + ", ".join(
        p.name if p.default is inspect.Parameter.empty else f"[{p.name}]" for p in params
    ) + ")"
    FUNCTIONS[fn.__name__] = SheetFunction(fn.__name__, call, signature, doc.split("\n")[0], _argument_docs(doc))
    if sys.platform == "win32":  # pragma: no cover - Excel only
        return _for_excel(call)
    return call


def _for_excel(call: Callable[..., Any]) -> Callable[..., Any]:  # pragma: no cover - Excel only
    """xlwings' decorators: ranges arrive as 2-D lists and error values go back as their text."""
    import xlwings as xw

    entry = FUNCTIONS[call.__name__]

    @functools.wraps(call)
    def excel(*args: Any) -> Any:
        value = call(*(np.array(a, dtype=object) if isinstance(a, list) else a for a in args))
        if isinstance(value, np.ndarray):
            if value.ndim < 2:
                value = value.reshape((1, -1) if value.ndim else (1, 1))
            return [[str(v) if isinstance(v, CellError) else v for v in row] for row in value.tolist()]
        return str(value) if isinstance(value, CellError) else value

    excel = xw.func(category=CATEGORY)(excel)
    for name, text in entry.arguments.items():
        excel = xw.arg(name, ndim=2, doc=text)(excel) if not name.endswith("unit") else xw.arg(name, doc=text)(excel)
    return excel
