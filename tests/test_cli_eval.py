"""`cellfuncs eval`: each formula stands on its own, and formulas pasted from documents work.

The expected values are the pack's own (checked against IF97 elsewhere); what these tests check is
the command's contract: one result per formula, the exit code summarising them.
"""

from __future__ import annotations

import json

from cellfuncs.cli import main


def _records(capsys) -> list[dict]:
    return json.loads(capsys.readouterr().out)


def test_a_formula_that_does_not_parse_spoils_no_other(capsys):
    status = main(["eval", "--json", "=1+1", "=1+", "=2*3"])
    records = _records(capsys)
    assert status == 2  # a formula did not parse
    assert [r["value"] for r in records[::2]] == [2.0, 6.0]
    assert records[1]["error"]["code"] == "#VALUE!" and "does not parse" in records[1]["error"]["reason"]


def test_an_error_value_gives_exit_1_and_the_rest_still_computes(capsys):
    status = main(["eval", "--json", '=BOIL_TEMP("water", 1, "Pa")', "=1+1"])
    records = _records(capsys)
    assert status == 1
    assert records[0]["error"]["code"] == "#NUM!" and records[1]["value"] == 2.0


def test_typographic_quotes_read_as_plain_quotes(capsys):
    # word processors turn "water" into \u201cwater\u201d
    assert main(["eval", "--json", "=BOIL_TEMP(\u201cwater\u201d, 1, \u201catm\u201d)", '=BOIL_TEMP("water", 1, "atm")']) == 0
    first, second = _records(capsys)
    assert first["value"] == second["value"]
