"""The test suite runs in strict mode: an unexpected exception inside the pack is raised, not shown as
``#VALUE! internal error``, so that a bug fails the tests loudly (cellfuncs/errors.py)."""

import os

from cellfuncs.errors import STRICT_VARIABLE

os.environ[STRICT_VARIABLE] = "1"  # subprocesses (the command-line tests) inherit it
