"""Sheet functions: the pack's interface in cells, from Python and on the command line.

Importing this package registers every function in :data:`FUNCTIONS`.
"""

from . import functions  # noqa: F401  (registers the functions)
from .registry import FUNCTIONS, SheetFunction

__all__ = ["FUNCTIONS", "SheetFunction"]
