"""Formula engine: Excel formulas parsed into immutable trees and evaluated against a context.

The context (see :class:`Context`) resolves cell references, defined names and the
pack's functions, so the same engine serves ``cellfuncs eval`` (a :class:`SimpleContext`)
and workbook recalculation. Values are scalars (float, bool, str, CellError, None) or
2-D numpy object arrays; errors are values, never exceptions.

>>> compute("=IFERROR(1/0, 0) + {1,2}").tolist()
[[1.0, 2.0]]
>>> format_number(2.0)
'2'
"""

from importlib import import_module

from .arrays import Value, as_value
from .coerce import format_number, to_bool, to_number, to_text
from .evaluate import BUILTINS, Builtin, Context, SimpleContext, builtin, collect, compute, evaluate, value_of
from .nodes import Array, Binary, Call, Literal, Missing, Name, Node, Ref, Unary, walk
from .parser import FormulaSyntaxError, parse

__all__ = [
    "Array", "Binary", "BUILTINS", "Builtin", "Call", "Context", "FormulaSyntaxError", "Literal",
    "Missing", "Name", "Node", "Ref", "SimpleContext", "Unary", "Value", "as_value", "builtin",
    "collect", "compute", "evaluate", "format_number", "parse", "to_bool", "to_number", "to_text", "value_of",
    "walk",
]

# The built-in families, each a module whose built-ins register as it is imported: all of them on the
# first look-up that could find one (see registry.py), so a formula of the pack's functions alone
# starts without them.
BUILTIN_MODULES = (
    "fn_bases", "fn_bessel", "fn_cashflow", "fn_cells", "fn_complex", "fn_convert", "fn_count", "fn_database",
    "fn_date", "fn_distributions", "fn_distributions_more", "fn_finance", "fn_hyperlink", "fn_hypothesis",
    "fn_info", "fn_integers", "fn_lambda", "fn_logic", "fn_lookup", "fn_math", "fn_matrix", "fn_pivot", "fn_ranks",
    "fn_reference", "fn_regex", "fn_regression", "fn_roman", "fn_rounding", "fn_securities", "fn_shape",
    "fn_sort", "fn_stats", "fn_strings", "fn_subtotal", "fn_sums", "fn_text", "fn_trig", "fn_trimrange",
    "fn_value_text", "fn_volatile", "fn_workdays",
)


def load_builtins() -> None:
    """Import every built-in module (each registers its built-ins in ``BUILTINS``)."""
    for module in BUILTIN_MODULES:
        import_module(f"{__name__}.{module}")
