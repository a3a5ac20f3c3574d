"""The README's promises: its set-up commands are what CI runs, and its example runs clean."""

from __future__ import annotations

import re
import shlex
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def _commands() -> list[str]:
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    return re.findall(r"```sh\n(.+?)\n```", text, flags=re.S)[:2]


def test_ci_runs_the_readme_test_command():
    test_command = _commands()[1]
    assert test_command in (ROOT / ".ci" / "run").read_text(encoding="utf-8")


def test_readme_example_formulas_evaluate_without_errors():
    main_command = _commands()[0]
    formulas = shlex.split(main_command.split("cellfuncs eval", 1)[1])
    done = subprocess.run([sys.executable, "-m", "cellfuncs", "eval", *formulas], capture_output=True, text=True,
                          cwd=ROOT)
    assert done.returncode == 0, done.stdout + done.stderr
    assert "#" not in done.stdout
