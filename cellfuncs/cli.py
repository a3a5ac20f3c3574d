"""The ``cellfuncs`` command: evaluate formulas, list the functions, recalculate workbooks, set up Excel
and LibreOffice.

Exit status: 0 clean; 1 an error value in a result; 2 a usage problem or a
formula that does not parse (``eval`` still evaluates the others; ``recalc``: a
refused file); 3 an internal failure; 4 (``recalc``) an output that could not be written.
"""

from __future__ import annotations

import argparse
import json
import sys
from typing import Any, Sequence

CAUTION = (
    "Results are engineering estimates. Pressure equipment, relief and cryogenic systems are designed\n"
    "to the local codes and checked by a licensed professional engineer."
)


def _parser(command: str | None) -> argparse.ArgumentParser:
    """The command line's parser; the options of ``recalc`` only when ``command`` is recalc."""
    from . import __version__

    parser = argparse.ArgumentParser(
        prog="cellfuncs",
        description="Phase equilibrium of pure substances as spreadsheet functions.",
        epilog="Exit status: 0 clean; 1 an error value in a result; 2 a usage problem, a formula that does not "
               "parse or a refused workbook; 3 an internal failure; 4 an output that could not be written "
               "(cellfuncs recalc --help says more).\n\n" + CAUTION,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    parser.add_argument("--version", action="version", version=f"cellfuncs {__version__}")
    commands = parser.add_subparsers(dest="command", required=True)
    evaluate = commands.add_parser(
        "eval",
        help="evaluate formulas without a workbook",
        description="Evaluate formulas in Excel's en-US syntax (leading '=' optional): literals, array "
        "constants such as {300,500,600}, arithmetic, comparison, &, the pack's functions and the "
        "built-ins (IF, IFERROR, ROUND, ...). One block of output per formula.",
        epilog=CAUTION,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    evaluate.add_argument("formulas", nargs="+", metavar="FORMULA")
    evaluate.add_argument("--json", action="store_true", help="print a JSON list of {formula, value, error}")
    commands.add_parser("functions", help="list the sheet functions with their signatures")
    commands.add_parser(
        "units",
        help="list the unit names by quantity",
        description="List the units the functions accept, by quantity. Any unit takes the SI prefixes and "
        "combines with * / ** (kg/m3, kJ/(kg*K)); case does not matter where it is unambiguous; a gauge unit "
        "may state its atmosphere as a pressure or a standard-atmosphere altitude: barg@83kPa, psig@1600m.",
    )
    recalc = commands.add_parser("recalc", help="recalculate workbooks (.xlsx/.xlsm) without Excel",
                                 formatter_class=argparse.RawDescriptionHelpFormatter)
    if command == "recalc":  # its options come with the workbook engine, imported for it alone
        from .workbook import command as recalc_command

        recalc.description = recalc_command.DESCRIPTION
        recalc.epilog = recalc_command.LIMITS + "\n\n" + CAUTION
        recalc_command.add_arguments(recalc)
    setup = commands.add_parser(
        "excel-setup",
        help="print (and on Windows with Excel, take) the steps that make the functions appear in Excel",
        description="Print the steps that make the pack's functions appear in Excel through xlwings: the "
        "add-in, the UDF Modules setting (ribbon or the workbook's xlwings.conf sheet), importing the "
        "functions, and how a shipped workbook reaches them. On Windows with Excel, install the add-in and "
        "write the setting; elsewhere say that nothing can be done here.",
        epilog=CAUTION,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    setup.add_argument("--print-only", action="store_true", help="print the steps, change nothing")
    office = commands.add_parser(
        "libreoffice",
        help="install or remove the LibreOffice Calc extension that makes the functions live there",
        description="Build the Calc add-in extension from the pack's functions and install it into LibreOffice "
        "(the user's profile, or --profile DIR), or remove it. LibreOffice's own Python runs the pack from this "
        "environment.",
        epilog=CAUTION,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    office.add_argument("action", choices=("install", "uninstall"))
    office.add_argument("--profile", metavar="DIR", help="a LibreOffice user-profile folder (default: your own)")
    office.add_argument("--soffice", metavar="PATH", help="the soffice program (default: the one on PATH)")
    return parser


def _cell_text(value: Any) -> str:
    from .errors import CellError
    from .formula.coerce import format_number

    if isinstance(value, CellError):
        return str(value)
    if isinstance(value, bool):
        return "TRUE" if value else "FALSE"
    if isinstance(value, float):
        return repr(value)
    if value is None:
        return ""
    return str(value) if not isinstance(value, (int,)) else format_number(float(value))


def _cell_json(value: Any) -> Any:
    from .errors import CellError

    if isinstance(value, CellError):
        return {"error": {"code": value.code, "reason": value.reason}}
    if isinstance(value, float) and value != value:
        return None
    return value


def _errors(value: Any) -> list:
    import numpy as np

    from .errors import CellError

    cells = value.flat if isinstance(value, np.ndarray) else (value,)
    return [c for c in cells if isinstance(c, CellError)]


# quotes that word processors and chat tools put in place of the ones a formula needs
_TYPOGRAPHIC_QUOTES = str.maketrans({"\u201c": '"', "\u201d": '"', "\u201e": '"', "\u201f": '"', "\u2033": '"',
                                     "\u2018": "'", "\u2019": "'", "\u201a": "'", "\u201b": "'"})


def _evaluate(formulas: Sequence[str], as_json: bool) -> int:
    """Each formula on its own: its value, or its error; one that does not parse spoils no other."""
    import numpy as np

    from .errors import CellError
    from .formula import FormulaSyntaxError, compute
    from .formula.evaluate import SimpleContext
    from .sheet import FUNCTIONS

    context = SimpleContext({name: entry.call for name, entry in FUNCTIONS.items()})
    results: list[Any] = []
    unparsed = False
    for formula in formulas:
        try:
            results.append(compute(formula.translate(_TYPOGRAPHIC_QUOTES), context))
        except FormulaSyntaxError as exc:
            unparsed = True
            results.append(CellError("#VALUE!", f"does not parse: {exc}"))
            print(f"cellfuncs eval: {formula!r} does not parse: {exc}", file=sys.stderr)
    status = 2 if unparsed else 1 if any(_errors(value) for value in results) else 0
    if as_json:
        records = []
        for formula, value in zip(formulas, results):
            errors = _errors(value)
            shown = [[_cell_json(c) for c in row] for row in value.tolist()] if isinstance(value, np.ndarray) else (
                None if errors and not isinstance(value, np.ndarray) else _cell_json(value))
            first = {"code": errors[0].code, "reason": errors[0].reason} if errors else None
            records.append({"formula": formula, "value": shown, "error": first})
        print(json.dumps(records, indent=2))
        return status
    blocks = []
    for value in results:
        if isinstance(value, np.ndarray):
            rows = value.reshape(value.shape[0], -1) if value.ndim == 2 else value.reshape(1, -1)
            blocks.append("\n".join("\t".join(_cell_text(c) for c in row) for row in rows))
        else:
            blocks.append(_cell_text(value))
    print("\n\n".join(blocks))
    return status


def _functions() -> int:
    from .sheet import FUNCTIONS

    width = max(len(entry.signature) for entry in FUNCTIONS.values())
    for entry in FUNCTIONS.values():
        print(f"{entry.signature:<{width}}  {entry.summary}")
    print()
    print(CAUTION)
    return 0


def _units() -> int:
    from .data import constant
    from .units import catalogue

    for quantity, names in catalogue().items():
        print(f"{quantity}:")
        for name in names:
            print(f"  {name}")
    print()
    print("Prefixes combine with every unit (kPa, MPa, mbar, cm3); units combine with * / ** (kg/m3, kJ/(kg*K)).")
    atmosphere = constant("atmosphere", "sea_level_pressure").value / 1e3
    print(f"Gauge units (barg, psig, kPag, MPag, atg) refer to {atmosphere:g} kPa unless the text states the site's")
    print("atmosphere: barg@83kPa, psig@12.1psia, or an altitude in the ISO 2533 standard atmosphere: barg@1600m.")
    return 0


def main(argv: Sequence[str] | None = None) -> int:
    argv = sys.argv[1:] if argv is None else list(argv)
    # the first word that is no option names the command (the top level has no option taking a value)
    args = _parser(next((word for word in argv if not word.startswith("-")), None)).parse_args(argv)
    try:
        if args.command == "eval":
            return _evaluate(args.formulas, args.json)
        if args.command == "recalc":
            from .workbook.command import limits_of, run, volatility_of

            return run(args.workbooks, args.out, args.in_place, args.check, args.tolerance, limits_of(args),
                       args.split_hard_links, args.jobs, args.shard, volatility_of(args))
        if args.command == "units":
            return _units()
        if args.command == "excel-setup":
            from .excel_setup import run as excel_setup

            return excel_setup(args.print_only)
        if args.command == "libreoffice":
            from .hosts.libreoffice import extension

            try:
                run = extension.install if args.action == "install" else extension.uninstall
                print(run(args.profile, args.soffice))
                return 0
            except extension.Setup as exc:
                print(f"cellfuncs libreoffice: {exc}", file=sys.stderr)
                return 2
        return _functions()
    except BrokenPipeError:  # the reader stopped early (| head): nothing more to say
        sys.stderr.close()
        return 0
    except Exception as exc:  # an internal failure, not a cell error
        print(f"cellfuncs: internal error: {type(exc).__name__}: {exc}", file=sys.stderr)
        return 3


if __name__ == "__main__":
    sys.exit(main())
