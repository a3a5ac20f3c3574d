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

from ..errors import CALC, VALUE, CellError, internal_error, strict
from .cells import CallError, as_array, cell_value

CATEGORY = "cellfuncs"


class SheetFunction(NamedTuple):
    name: str
    call: Callable[..., Any]
    signature: str
    summary: str
    arguments: dict[str, str]
    cell: Callable[..., Any]  # the cell path (xlwings): 2-D lists in and out, error values as text


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


def _arity_error(name: str, signature: inspect.Signature, args: tuple, kwargs: dict) -> CellError | None:
    """The error for a call whose arguments do not fit the signature, or None when they fit."""
    try:
        signature.bind(*args, **kwargs)
    except TypeError as exc:
        params = list(signature.parameters.values())
        required = sum(p.default is inspect.Parameter.empty for p in params)
        wanted = str(required) if required == len(params) else f"{required} to {len(params)}"
        names = ", ".join(p.name if p.default is inspect.Parameter.empty else f"[{p.name}]" for p in params)
        return CellError(VALUE, f"{name} takes {wanted} argument{'s' * (wanted != '1')} ({names}); "
                                f"got {len(args) + len(kwargs)}" + (f" ({exc})" if kwargs else ""))
    return None


def sheet_function(fn: Callable[..., Any]) -> Callable[..., Any]:
    """Register ``fn`` as a sheet function; failures come back as error values, never exceptions.

    A result is a cell value (cells.cell_value): a number that is not finite becomes #NUM!. An
    unexpected exception is a bug: ``#VALUE! internal error: ...``, or raised in strict mode.
    """
    signature_ = inspect.signature(fn)

    @functools.wraps(fn)
    def call(*args: Any, **kwargs: Any) -> Any:
        try:
            with np.errstate(all="ignore"):
                return cell_value(fn(*args, **kwargs))
        except CallError as exc:
            return exc.error
        except Exception as exc:
            if isinstance(exc, TypeError):  # the arguments may not fit the signature: the caller's slip
                wrong = _arity_error(fn.__name__, signature_, args, kwargs)
                if wrong is not None:
                    return wrong
            if strict():
                raise
            return internal_error(exc, fn.__name__)

    doc = inspect.getdoc(fn) or ""
    params = signature_.parameters.values()
    signature = f"{fn.__name__}(" + ", ".join(
        p.name if p.default is inspect.Parameter.empty else f"[{p.name}]" for p in params
    ) + ")"
    FUNCTIONS[fn.__name__] = SheetFunction(fn.__name__, call, signature, doc.split("\n")[0], _argument_docs(doc),
                                           cell_call(call))
    if sys.platform == "win32":  # pragma: no cover - Excel only
        return _for_excel(call)
    return call


def cell_call(call: Callable[..., Any]) -> Callable[..., Any]:
    """The function as a cell path calls it (xlwings in Excel): ranges arrive as 2-D lists, and the result is
    a number, a text or a 2-D list of them, an error value given as its text (``#NUM! reason``), no text
    longer than Excel takes.

    An argument or a result of more than two dimensions is #VALUE!: a range has rows and columns only
    (the Python API keeps numpy's n-dimensional broadcasting).
    """
    names = list(inspect.signature(call).parameters)

    @functools.wraps(call)
    def cell(*args: Any) -> Any:
        try:
            arrays = [as_array(a) if isinstance(a, (list, tuple)) and not isinstance(a, CellError) else a for a in args]
        except CallError as exc:
            return str(exc.error)
        for position, a in enumerate(arrays):
            if isinstance(a, np.ndarray) and a.ndim > 2:
                name = names[position] if position < len(names) else f"argument {position + 1}"
                return str(CellError(VALUE, f"{name} has {a.ndim} dimensions; a range has rows and columns only"))
        value = call(*arrays)
        if isinstance(value, np.ndarray):
            if value.ndim > 2:
                return str(CellError(VALUE, f"the result has {value.ndim} dimensions; a range has rows and columns "
                                            "only"))
            if value.size == 0:
                return str(CellError(CALC, "the result is an empty array"))
            if value.ndim < 2:
                value = value.reshape((1, -1) if value.ndim else (1, 1))
            return [[_fitted(v) for v in row] for row in value.tolist()]
        return _fitted(value)

    return cell


EXCEL_TEXT_LIMIT = 255  # characters: xlwings hands Excel a longer text from a function as #VALUE!


def _fitted(value: Any) -> Any:
    """A cell value as the cell path hands it on: an error as its text, a text cut to what Excel takes
    (the whole text stays with the Python function and the command line)."""
    if isinstance(value, CellError):
        value = str(value)
    if isinstance(value, str) and len(value) > EXCEL_TEXT_LIMIT:
        return value[: EXCEL_TEXT_LIMIT - 1] + "…"
    return value


def _for_excel(call: Callable[..., Any]) -> Callable[..., Any]:
    """xlwings' decorators over the cell path: a category, the docstring and one line per argument."""
    import xlwings as xw

    entry = FUNCTIONS[call.__name__]
    excel = xw.func(category=CATEGORY)(entry.cell)
    for name, text in entry.arguments.items():
        excel = xw.arg(name, ndim=2, doc=text)(excel) if not name.endswith("unit") else xw.arg(name, doc=text)(excel)
    return excel
