"""Speed benchmarks, measured side by side in one run; prints medians and ratios.

    python3 benchmarks/run.py            # everything
    python3 benchmarks/run.py --quick    # fewer repeats
    python3 benchmarks/run.py --scalar   # only the scalar calls, as multiples of a plain-Python eq. 30 call
    python3 benchmarks/run.py --equations [--before DIR]
        # only the equation-of-state substances' calls, beside those of the code in DIR
        # (an unpacked earlier revision, e.g. `git archive REV | tar -x -C DIR`)
    python3 benchmarks/run.py --memory   # only MOLAR_VOLUME over 1e6 temperatures (in a process of
        # its own: ratio to BOIL_PRESSURE, peak memory) and the cold start (ratio to importing numpy)

Targets (from the project's issues) are printed beside each figure; they are
goals for this machine class, not test assertions, because timings on shared
machines are noisy.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import statistics
import subprocess
import sys
import time
import timeit

import numpy as np


def _median_seconds(fn, number: int, repeat: int) -> float:
    return statistics.median(timeit.repeat(fn, number=number, repeat=repeat)) / number


# IAPWS-IF97 eq. 30 written out by hand (not the pack's code): the baselines the calls are measured against
_EQ30_N = (0.11670521452767e4, -0.72421316703206e6, -0.17073846940092e2, 0.12020824702470e5,
           -0.32325550322333e7, 0.14915108613530e2, -0.48232657361591e4, 0.40511340542057e6,
           -0.23855557567849, 0.65017534844798e3)


def _eq30(T, sqrt):
    n = _EQ30_N
    v = T + n[8] / (T - n[9])
    A = v * v + n[0] * v + n[1]
    B = n[2] * v * v + n[3] * v + n[4]
    C = n[5] * v * v + n[6] * v + n[7]
    return (2 * C / (-B + sqrt(B * B - 4 * A * C))) ** 4 * 1e6


def _plain_saturation_pressure(T: np.ndarray) -> np.ndarray:
    """IAPWS-IF97 eq. 30 as one plain numpy expression (the baseline of the array calls)."""
    return _eq30(T, np.sqrt)


def _plain_python_eq30(T: float) -> float:
    """IAPWS-IF97 eq. 30 in plain Python floats: the unit the scalar-call goals are counted in."""
    return _eq30(T, math.sqrt)


EQUATION_CALLS = {
    # name: (call, goal as a multiple of the plain-Python eq. 30 call, from the speed issue)
    "BOIL_TEMP CO2": ('BOIL_TEMP("CO2", 50, "bar", "degC")', None),
    "STABLE_PHASE CO2": ('STABLE_PHASE("CO2", 40, 100, "degC", "bar")', 80),
    "MOLAR_VOLUME CO2": ('MOLAR_VOLUME("CO2", 40, 100, "", "degC", "bar", "L/mol")', None),
    "MASS_DENSITY CO2": ('MASS_DENSITY("CO2", 40, 100, "", "degC", "bar")', None),
    "BOIL_TEMP propane": ('BOIL_TEMP("propane", 5, "bar", "degC")', 40),
    "STABLE_PHASE propane": ('STABLE_PHASE("propane", 25, 5, "degC", "bar")', None),
    "MOLAR_VOLUME propane": ('MOLAR_VOLUME("propane", 25, 5, "", "degC", "bar", "L/mol")', 200),
    "MASS_DENSITY propane": ('MASS_DENSITY("propane", 25, 15, "liquid", "degC", "bar")', None),
    # substances without their own equation: propane's mapped by corresponding states
    "BOIL_TEMP ammonia": ('BOIL_TEMP("ammonia", 5, "bar", "degC")', None),
    "MOLAR_VOLUME ammonia": ('MOLAR_VOLUME("ammonia", 10, 20, "liquid", "degC", "bar", "L/mol")', None),
    "MASS_DENSITY n-butane": ('MASS_DENSITY("n-butane", 180, 20, "", "degC", "bar")', None),
}


def equation_figures(repeat: int) -> dict[str, float]:
    """Seconds per call (medians) of the equation substances' scalar calls, of the plain-Python
    eq. 30 call and of MOLAR_VOLUME over a 100,000-element array, measured in this process."""
    import cellfuncs

    figures = {"eq. 30": _median_seconds(lambda: _plain_python_eq30(453.15), 20000, repeat)}
    namespace = {name.split()[0]: getattr(cellfuncs, name.split()[0]) for name in EQUATION_CALLS}
    for name, (call, _) in EQUATION_CALLS.items():
        fn = eval(f"lambda: {call}", namespace)  # the benchmark's own fixed texts
        fn()  # first use builds the substance and its saturation table
        figures[name] = _median_seconds(fn, 100, repeat)
    T = np.linspace(230.0, 360.0, 100_000)
    for name, substance, p in (("MOLAR_VOLUME propane x 100,000", "propane", 5e5),
                               ("MOLAR_VOLUME CO2 x 100,000", "CO2", 1e7)):
        figures[name] = _median_seconds(lambda: cellfuncs.MOLAR_VOLUME(substance, T, p), 1, max(repeat // 2, 1))
    return figures


def equations(repeat: int, before: str | None) -> None:
    """The equation substances' figures, as medians and as multiples of the eq. 30 call of the same
    run; with ``before``, the same figures of the code in that folder, measured in a second process
    right after (each figure's multiple is taken against its own process's eq. 30 call)."""
    now = equation_figures(repeat)
    old = None
    if before:
        env = dict(os.environ, PYTHONPATH=os.path.abspath(before))
        code = (f"import sys, json; sys.path.insert(0, {os.path.dirname(os.path.abspath(__file__))!r}); "
                f"import run; print(json.dumps(run.equation_figures({repeat})))")
        old = json.loads(subprocess.run([sys.executable, "-c", code], env=env, check=True, capture_output=True,
                                        text=True, cwd=os.path.abspath(before)).stdout.splitlines()[-1])
    print("Equation-of-state substances: medians, and multiples of a plain-Python IF97 eq. 30 call "
          f"({now['eq. 30'] * 1e6:.2f} us in this run)")
    for name, seconds in now.items():
        if name == "eq. 30":
            continue
        if name not in EQUATION_CALLS:  # an array: per state, not as a multiple
            line = f"  {name:32s} {seconds * 1e3:10.1f} ms {seconds / 1e5 * 1e9:6.0f} ns per state"
            print(line + (f"   before {old[name] * 1e3:10.1f} ms" if old is not None else ""))
            continue
        goal = EQUATION_CALLS[name][1]
        line = f"  {name:32s} {seconds * 1e6:10.1f} us {seconds / now['eq. 30']:8.0f} x"
        if old is not None:
            line += f"   before {old[name] * 1e6:10.1f} us {old[name] / old['eq. 30']:8.0f} x"
        if goal:
            line += f"   goal <= {goal} x: {'ok' if seconds / now['eq. 30'] <= goal else 'OVER'}"
        print(line)


def vectorised(repeat: int) -> None:
    import cellfuncs

    T = np.linspace(280.0, 640.0, 1_000_000)
    ours = _median_seconds(lambda: cellfuncs.BOIL_PRESSURE("water", T), 1, repeat)
    plain = _median_seconds(lambda: _plain_saturation_pressure(T), 1, repeat)
    same = np.allclose(cellfuncs.BOIL_PRESSURE("water", T), _plain_saturation_pressure(T), rtol=1e-12)
    print("BOIL_PRESSURE over 1,000,000 temperatures (target: within 2x of plain numpy)")
    print(f"  cellfuncs   {ours * 1e3:8.1f} ms")
    print(f"  plain numpy {plain * 1e3:8.1f} ms")
    print(f"  ratio       {ours / plain:8.2f} x   (same numbers: {same})")



# Run in a process of its own, so that its peak memory is the call's: the peak of MOLAR_VOLUME over the
# array (ru_maxrss, Linux: kB), then MOLAR_VOLUME and BOIL_PRESSURE on the same array, alternated so
# that both see the same machine load; prints seconds (medians) and the peak as JSON.
_VOLUME_RUN = """
import json, resource, statistics, sys, time
import numpy as np
import cellfuncs
T = np.linspace(280.0, 600.0, 1_000_000)
cellfuncs.MOLAR_VOLUME("water", T, 20e6)
peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
volume, boil = [], []
for _ in range(int(sys.argv[1])):
    start = time.perf_counter(); cellfuncs.MOLAR_VOLUME("water", T, 20e6); volume.append(time.perf_counter() - start)
    start = time.perf_counter(); cellfuncs.BOIL_PRESSURE("water", T); boil.append(time.perf_counter() - start)
print(json.dumps({"volume": statistics.median(volume), "boil": statistics.median(boil), "peak_mb": peak}))
"""
VOLUME_RATIO_TARGET = 8  # MOLAR_VOLUME over the array at most this many times BOIL_PRESSURE on it
VOLUME_PEAK_TARGET = 600  # MB, the process's peak memory


def vectorised_water_volume(repeat: int) -> None:
    """IF97 region 1 volumes over 1,000,000 temperatures against BOIL_PRESSURE on the same array, and
    the peak memory of the process, measured in a fresh process."""
    done = subprocess.run([sys.executable, "-c", _VOLUME_RUN, str(repeat)], check=True, capture_output=True,
                          text=True)
    figures = json.loads(done.stdout.splitlines()[-1])
    v, b, peak = figures["volume"], figures["boil"], figures["peak_mb"]
    print("MOLAR_VOLUME water, 1,000,000 temperatures 280-600 K at 20 MPa, in a process of its own "
          f"(target: <= {VOLUME_RATIO_TARGET}x BOIL_PRESSURE, peak < {VOLUME_PEAK_TARGET} MB)")
    print(f"  MOLAR_VOLUME  {v * 1e3:8.1f} ms")
    print(f"  BOIL_PRESSURE {b * 1e3:8.1f} ms")
    print(f"  ratio         {v / b:8.2f} x   {'ok' if v / b <= VOLUME_RATIO_TARGET else 'OVER'}")
    print(f"  peak memory   {peak:8.0f} MB  {'ok' if peak < VOLUME_PEAK_TARGET else 'OVER'}")


SCALAR_CALLS = {
    # name: (call, goal as a multiple of the plain-Python eq. 30 call, from the speed issue)
    "BOIL_TEMP": ('BOIL_TEMP("water", 10, "barg", "degC")', 20),
    "BOIL_PRESSURE": ('BOIL_PRESSURE("water", 180, "degC", "bar")', None),
    "MELT_TEMP": ('MELT_TEMP("water", 100, "MPa", "degC")', None),
    "MELT_PRESSURE": ('MELT_PRESSURE("water", -10, "degC", "MPa")', None),
    "SUBLIME_TEMP": ('SUBLIME_TEMP("water", 100, "Pa", "degC")', None),
    "SUBLIME_PRESSURE": ('SUBLIME_PRESSURE("water", -20, "degC", "Pa")', None),
    "STABLE_PHASE": ('STABLE_PHASE("water", 25, 1, "degC", "atm")', 40),
    "MOLAR_VOLUME": ('MOLAR_VOLUME("water", 25, 1, "", "degC", "atm", "L/mol")', 60),
    "MASS_DENSITY": ('MASS_DENSITY("water", 25, 1, "liquid", "degC", "atm", "kg/m3")', None),
    "MASS_DENSITY vapour": ('MASS_DENSITY("water", 150, 1, "", "degC", "atm", "kg/m3")', 60),
    "MASS_DENSITY (near critical)": ('MASS_DENSITY("water", 370, 250, "liquid", "degC", "bar")', None),
    "THERMAL_EXPANSIVITY": ('THERMAL_EXPANSIVITY("water", 25, 1, "liquid", "degC", "atm", "1/K")', None),
    "ISOTHERMAL_COMPRESSIBILITY": ('ISOTHERMAL_COMPRESSIBILITY("water", 25, 1, "liquid", "degC", "atm", "1/MPa")', None),
    "CHEM_POTENTIAL": ('CHEM_POTENTIAL("water", 25, 1, "liquid", "degC", "atm", "kJ/mol")', None),
    "EXPANSION_RATIO": ('EXPANSION_RATIO("water", 20, 1, 90, 1, "liquid", "liquid", "degC", "atm")', None),
    "PHASE_CHANGE_RATIO": ('PHASE_CHANGE_RATIO("water", "boil", 1, "atm")', None),
    "LATENT_HEAT": ('LATENT_HEAT("water", "boil", 100, "degC", "kJ/kg")', None),
    "FLASH_FRACTION": ('FLASH_FRACTION("water", 180, 10, 0, "degC", "barg")', None),
    "SUBCOOLING": ('SUBCOOLING("water", 90, 1, "degC", "atm")', None),
    "SUPERHEAT": ('SUPERHEAT("water", 250, 10, "degC", "barg")', None),
    "TRIPLE_POINT": ('TRIPLE_POINT("water", "T", "degC")', None),
    "CRITICAL_POINT": ('CRITICAL_POINT("water", "P", "MPa")', None),
    "PHASE_LINE (100 rows)": ('PHASE_LINE("water", "boil", 0.01, 370, 100, "degC", "bar")', None),
    "SUBSTANCE_INFO": ('SUBSTANCE_INFO("water", "molar_mass")', None),
    "BOIL_TEMP propane": ('BOIL_TEMP("propane", 5, "bar", "degC")', 40),
    "STABLE_PHASE propane": ('STABLE_PHASE("propane", 25, 5, "degC", "bar")', None),
    "MOLAR_VOLUME propane": ('MOLAR_VOLUME("propane", 25, 5, "", "degC", "bar", "L/mol")', 200),
    "MOLAR_VOLUME propane liquid": ('MOLAR_VOLUME("propane", 25, 15, "liquid", "degC", "bar", "L/mol")', None),
    # carbon dioxide: its Span-Wagner equation of state (the same calls on the cubic model follow)
    "BOIL_TEMP CO2": ('BOIL_TEMP("CO2", 50, "bar", "degC")', None),
    "STABLE_PHASE CO2": ('STABLE_PHASE("CO2", 40, 100, "degC", "bar")', 80),
    "MOLAR_VOLUME CO2": ('MOLAR_VOLUME("CO2", 40, 100, "", "degC", "bar", "L/mol")', None),
    "MASS_DENSITY CO2": ('MASS_DENSITY("CO2", 40, 100, "", "degC", "bar")', None),
    "MASS_DENSITY CO2 liquid": ('MASS_DENSITY("CO2", 0, 50, "liquid", "degC", "bar")', None),
}


def vectorised_cubic(repeat: int) -> None:
    import cellfuncs

    n = 100_000
    p = np.linspace(1e4, 4e6, n)
    T = np.linspace(230.0, 360.0, n)
    P = np.full(n, 5e5)
    print(f"Propane (Peng-Robinson / Rackett-Tait model) over {n:,} states")
    for name, fn in (("BOIL_TEMP", lambda: cellfuncs.BOIL_TEMP("propane", p)),
                     ("STABLE_PHASE", lambda: cellfuncs.STABLE_PHASE("propane", T, P)),
                     ("MOLAR_VOLUME", lambda: cellfuncs.MOLAR_VOLUME("propane", T, P))):
        fn()
        seconds = _median_seconds(fn, 1, repeat)
        print(f"  {name:14s} {seconds * 1e3:8.1f} ms  ({seconds / n * 1e9:6.0f} ns per state)")


def scalar(repeat: int) -> None:
    """Each scalar call's median and its multiple of the plain-Python eq. 30 call measured in this run,
    with the goal beside it."""
    import cellfuncs

    eq30 = _median_seconds(lambda: _plain_python_eq30(453.15), 20000, repeat)
    print(f"One scalar call with unit texts (median), and as a multiple of a plain-Python IF97 eq. 30 call "
          f"({eq30 * 1e6:.2f} us in this run)")
    namespace = {name.split()[0]: getattr(cellfuncs, name.split()[0]) for name in SCALAR_CALLS}
    for name, (call, goal) in SCALAR_CALLS.items():
        fn = eval(f"lambda: {call}", namespace)  # the benchmark's own fixed texts
        fn()
        seconds = _median_seconds(fn, 200, repeat)
        line = f"  {name:30s} {seconds * 1e6:9.1f} us {seconds / eq30:8.0f} x"
        if goal:
            line += f"   goal <= {goal} x: {'ok' if seconds / eq30 <= goal else 'OVER'}"
        print(line)


def co2_equation_against_cubic(repeat: int) -> None:
    """Carbon dioxide's scalar calls on its equation of state beside the same calls on the general
    (Peng-Robinson / Rackett-Tait) model, built from the same data file without the equation."""
    import dataclasses

    from cellfuncs.substances.general.definition import load_builtin
    from cellfuncs.substances.general.model import GeneralSubstance
    from cellfuncs.substances import lookup

    equation_model = lookup("CO2")
    cubic_model = GeneralSubstance(dataclasses.replace(load_builtin("carbon-dioxide"), equation=""))
    calls = {
        "boil_temperature": lambda s: s.boil_temperature(np.array(5e6)),
        "stable_phase": lambda s: s.stable_phase(np.array(313.15), np.array(1e7)),
        "molar_volume": lambda s: s.molar_volume(np.array(313.15), np.array(1e7)),
        "molar_volume liquid": lambda s: s.molar_volume(np.array(273.15), np.array(5e6), 1),
    }
    print("Carbon dioxide, one scalar state through the model (median): equation of state against the cubic model")
    for name, call in calls.items():
        call(equation_model), call(cubic_model)  # first use builds the tables
        new = _median_seconds(lambda: call(equation_model), 200, repeat)
        old = _median_seconds(lambda: call(cubic_model), 200, repeat)
        print(f"  {name:22s} equation {new * 1e6:8.1f} us   cubic {old * 1e6:8.1f} us   ratio {new / old:5.2f}")


COLD_START_TARGET = 2.5  # cellfuncs eval, whole process, at most this many times `python -c "import numpy"`


def cold_start(repeat: int) -> None:
    """`cellfuncs eval` of one formula, whole process, against a process that imports numpy and stops,
    alternated so that both see the same machine load."""
    command = [sys.executable, "-m", "cellfuncs", "eval", '=BOIL_TEMP("water",1,"atm")']
    numpy_only = [sys.executable, "-c", "import numpy"]
    times: dict[str, list[float]] = {"eval": [], "numpy": [], "bare": []}
    for _ in range(max(repeat, 5)):
        for name, run in (("eval", command), ("numpy", numpy_only), ("bare", [sys.executable, "-c", "pass"])):
            start = time.perf_counter()
            subprocess.run(run, check=True, capture_output=True)
            times[name].append(time.perf_counter() - start)
    ours, numpy_s, bare = (statistics.median(times[name]) for name in ("eval", "numpy", "bare"))
    print(f"cellfuncs eval '=BOIL_TEMP(\"water\",1,\"atm\")', whole process (target: <= {COLD_START_TARGET}x "
          "python -c 'import numpy')")
    print(f"  cellfuncs eval {ours:.3f} s, import numpy {numpy_s:.3f} s, bare interpreter {bare:.3f} s "
          f"(medians of {len(times['eval'])})")
    print(f"  ratio          {ours / numpy_s:.2f} x   {'ok' if ours / numpy_s <= COLD_START_TARGET else 'OVER'}")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--quick", action="store_true", help="fewer repeats")
    parser.add_argument("--equations", action="store_true", help="only the equation-of-state substances' calls")
    parser.add_argument("--before", metavar="DIR", help="with --equations: also measure the code in DIR")
    parser.add_argument("--scalar", action="store_true", help="only the scalar calls")
    parser.add_argument("--memory", action="store_true",
                        help="only MOLAR_VOLUME over 1,000,000 temperatures (ratio, peak memory) and the cold start")
    args = parser.parse_args()
    repeat = 3 if args.quick else 7
    if args.equations:
        equations(repeat, args.before)
        return
    if args.scalar:
        scalar(repeat)
        return
    if args.memory:
        vectorised_water_volume(repeat)
        print()
        cold_start(repeat)
        return
    vectorised(repeat)
    print()
    vectorised_water_volume(repeat)
    print()
    vectorised_cubic(repeat)
    print()
    scalar(repeat)
    print()
    co2_equation_against_cubic(repeat)
    print()
    equations(repeat, None)
    print()
    cold_start(repeat)
    print()
    import recalc  # benchmarks/recalc.py: workbook recalculation against the formulas library

    recalc.main(1 if args.quick else 3)


if __name__ == "__main__":
    main()
