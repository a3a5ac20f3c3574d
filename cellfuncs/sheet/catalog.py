"""The sheet functions as the README's table shows them, from the registry (a test keeps the
README equal to :func:`function_table`, so each function's signature and summary are written
once, in its definition).

>>> function_table().splitlines()[2]
'| `BOIL_TEMP(substance, pressure, [p_unit], [t_unit])` | Boiling (liquid-vapour saturation) temperature at a pressure. |'
"""

from __future__ import annotations

from . import functions  # noqa: F401  (registers the sheet functions)
from .registry import FUNCTIONS


def function_table() -> str:
    """A Markdown table of every registered sheet function: signature, then its docstring's summary."""
    rows = [f"| `{f.signature}` | {f.summary} |" for f in FUNCTIONS.values()]
    return "\n".join(["| function | returns |", "|---|---|", *rows]) + "\n"


if __name__ == "__main__":
    print(function_table(), end="")
