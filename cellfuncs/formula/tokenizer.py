"""openpyxl's formula tokenizer, without the rest of openpyxl.

Importing ``openpyxl.formula.tokenizer`` runs openpyxl's package import first, which loads its whole
workbook model (about 50 ms); the tokenizer module itself needs only ``re``. So a formula evaluated
outside a workbook (``cellfuncs eval``) loads that one file as a module of its own; where openpyxl
is loaded already (a workbook is being read), its own module serves.

>>> [t.value for t in tokenizer()('=SUM(A1, 2)').items]
['SUM(', 'A1', ',', ' ', '2', ')']
"""

from __future__ import annotations

import sys
from functools import lru_cache
from importlib import util
from pathlib import Path


@lru_cache(maxsize=1)
def tokenizer() -> type:
    """openpyxl's ``Tokenizer`` class."""
    if "openpyxl" in sys.modules:
        from openpyxl.formula.tokenizer import Tokenizer

        return Tokenizer
    package = util.find_spec("openpyxl")  # finds the package without running it
    assert package is not None and package.submodule_search_locations, "openpyxl is a dependency"
    path = Path(next(iter(package.submodule_search_locations)), "formula", "tokenizer.py")
    spec = util.spec_from_file_location(f"{__name__}._openpyxl", path)
    module = util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module.Tokenizer
