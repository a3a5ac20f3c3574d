"""Every workbook of the Excel reference set recalculates under the default limits.

The reference set (../shared/excel-reference/: 400 workbooks last saved by Excel, from the
public test suites of Apache POI, IronCalc and xlcalculator; see its README.md) is read
where it lies, never copied here, found as the conformance score finds it
(cellfuncs/workbook/conformance.py). Absent, the test is skipped with the reason, except
under CI=true, where its absence is a failure.

A dry run (nothing written) of all of them, split over a few processes each under the same
1 GiB address-space limit as the hostile corpus (tests/test_hostile_workbooks.py): no file
may be refused, fail internally or run out of memory because of the limits. Error cells
(functions the engine lacks) are fine here; their values are another test's business.
"""

from __future__ import annotations

import os
import subprocess
import sys


from reference_set import reference_folder
from hostile_workbooks import ENV, WATCHDOG, limit_memory


def test_every_reference_workbook_recalculates_under_the_default_limits():
    folder = reference_folder()
    files = sorted(str(p) for p in folder.glob("*/*.xls[xm]"))
    assert len(files) >= 400, f"{folder} holds only {len(files)} workbooks"
    parts = max(1, min(4, os.cpu_count() or 1))
    # each process one share of the list (--shard), one workbook at a time (--jobs 1) under the memory limit
    runs = [subprocess.Popen([sys.executable, "-m", "cellfuncs", "recalc", "--jobs", "1", "--shard", f"{k + 1}/{parts}",
                              *files], stdout=subprocess.DEVNULL,
                             stderr=subprocess.PIPE, text=True, env=ENV, preexec_fn=limit_memory)
            for k in range(parts)]
    for run in runs:
        _, err = run.communicate(timeout=WATCHDOG)
        problems = [line for line in err.splitlines() if ": refused: " in line or "internal error" in line]
        assert run.returncode in (0, 1) and not problems, "\n".join(problems) or err[-2000:]
        assert f"recalc: {len(files[runs.index(run)::parts])} files, " in err.splitlines()[-1]
