"""Excel's built-in functions of securities, day counts and dated cash flows
(cellfuncs/formula/fn_securities.py and fn_cashflow.py), one or more documented examples each.

Expected values are the examples of Microsoft's function reference pages, from memory of
those pages ("Microsoft Support, <NAME> function"), each check naming its page; the edge
cases are scored in full against Excel's own values by tests/test_conformance.py.
"""

from __future__ import annotations

import math

import pytest

from cellfuncs.formula import compute

# (formula, expected, source)
EXAMPLES = [
    ("=DAYS360(DATE(2011,1,30), DATE(2011,12,31))", 330.0, "from memory of Microsoft's DAYS360 page"),
    ("=DAYS360(DATE(2011,1,1), DATE(2011,1,30))", 29.0, "from memory of Microsoft's DAYS360 page"),
    ("=YEARFRAC(DATE(2012,1,1), DATE(2012,7,30))", 0.58055556, "from memory of Microsoft's YEARFRAC page"),
    ("=YEARFRAC(DATE(2012,1,1), DATE(2012,7,30), 1)", 0.57650273, "from memory of Microsoft's YEARFRAC page"),
    ("=YEARFRAC(DATE(2012,1,1), DATE(2012,7,30), 3)", 0.57808219, "from memory of Microsoft's YEARFRAC page"),
    ("=COUPDAYBS(DATE(2011,1,25), DATE(2011,11,15), 2, 1)", 71.0, "from memory of Microsoft's COUPDAYBS page"),
    ("=COUPDAYS(DATE(2011,1,25), DATE(2011,11,15), 2, 1)", 181.0, "from memory of Microsoft's COUPDAYS page"),
    ("=COUPDAYSNC(DATE(2011,1,25), DATE(2011,11,15), 2, 1)", 110.0, "from memory of Microsoft's COUPDAYSNC page"),
    ("=COUPNCD(DATE(2011,1,25), DATE(2011,11,15), 2, 1)", 40678.0, "from memory of Microsoft's COUPNCD page"),
    ("=COUPNUM(DATE(2007,1,25), DATE(2008,11,15), 2, 1)", 4.0, "from memory of Microsoft's COUPNUM page"),
    ("=COUPPCD(DATE(2011,1,25), DATE(2011,11,15), 2, 1)", 40497.0, "from memory of Microsoft's COUPPCD page"),
    ("=ACCRINT(DATE(2008,3,1), DATE(2008,8,31), DATE(2008,5,1), 0.1, 1000, 2, 0)", 16.666667,
     "from memory of Microsoft's ACCRINT page"),
    ("=ACCRINT(DATE(2008,3,5), DATE(2008,8,31), DATE(2008,5,1), 0.1, 1000, 2, 0, FALSE)", 15.555556,
     "from memory of Microsoft's ACCRINT page"),
    ("=ACCRINT(DATE(2008,4,5), DATE(2008,8,31), DATE(2008,5,1), 0.1, 1000, 2, 0, TRUE)", 7.2222222,
     "from memory of Microsoft's ACCRINT page"),
    ("=ACCRINTM(DATE(2008,4,1), DATE(2008,6,15), 0.1, 1000, 3)", 20.547945, "from memory of Microsoft's ACCRINTM page"),
    ("=PRICE(DATE(2008,2,15), DATE(2017,11,15), 0.0575, 0.065, 100, 2, 0)", 94.634362,
     "from memory of Microsoft's PRICE page"),
    ("=YIELD(DATE(2008,2,15), DATE(2016,11,15), 0.0575, 95.04287, 100, 2, 0)", 0.065,
     "from memory of Microsoft's YIELD page"),
    ("=DURATION(DATE(2018,7,1), DATE(2048,1,1), 0.08, 0.09, 2, 1)", 10.9191453, "from memory of Microsoft's DURATION page"),
    ("=MDURATION(DATE(2008,1,1), DATE(2016,1,1), 0.08, 0.09, 2, 1)", 5.73567, "from memory of Microsoft's MDURATION page"),
    ("=ODDFPRICE(DATE(2008,11,11), DATE(2021,3,1), DATE(2008,10,15), DATE(2009,3,1), 0.0785, 0.0625, 100, 2, 1)",
     113.597717, "from memory of Microsoft's ODDFPRICE page"),
    ("=ODDFYIELD(DATE(2008,11,11), DATE(2021,3,1), DATE(2008,10,15), DATE(2009,3,1), 0.0575, 84.5, 100, 2, 0)",
     0.0772, "from memory of Microsoft's ODDFYIELD page"),
    ("=ODDLPRICE(DATE(2008,2,7), DATE(2008,6,15), DATE(2007,10,15), 0.0375, 0.0405, 100, 2, 0)", 99.8782860,
     "from memory of Microsoft's ODDLPRICE page"),
    ("=ODDLYIELD(DATE(2008,4,20), DATE(2008,6,15), DATE(2007,12,24), 0.0375, 99.875, 100, 2, 0)", 0.0451922,
     "from memory of Microsoft's ODDLYIELD page"),
    ("=TBILLPRICE(DATE(2008,3,31), DATE(2008,6,1), 0.09)", 98.45, "from memory of Microsoft's TBILLPRICE page"),
    ("=TBILLYIELD(DATE(2008,3,31), DATE(2008,6,1), 98.45)", 0.0914, "from memory of Microsoft's TBILLYIELD page"),
    ("=TBILLEQ(DATE(2008,3,31), DATE(2008,6,1), 0.0914)", 0.094151, "from memory of Microsoft's TBILLEQ page"),
    ("=DISC(DATE(2018,1,25), DATE(2018,6,15), 97.975, 100, 1)", 0.052420213, "from memory of Microsoft's DISC page"),
    ("=INTRATE(DATE(2008,2,15), DATE(2008,5,15), 1000000, 1014420, 2)", 0.05768, "from memory of Microsoft's INTRATE page"),
    ("=RECEIVED(DATE(2008,2,15), DATE(2008,5,15), 1000000, 0.0575, 2)", 1014584.654,
     "from memory of Microsoft's RECEIVED page"),
    ("=PRICEDISC(DATE(2008,2,16), DATE(2008,3,1), 0.0525, 100, 2)", 99.79583, "from memory of Microsoft's PRICEDISC page"),
    ("=YIELDDISC(DATE(2008,2,16), DATE(2008,3,1), 99.795, 100, 2)", 0.052823, "from memory of Microsoft's YIELDDISC page"),
    ("=PRICEMAT(DATE(2008,2,15), DATE(2008,4,13), DATE(2007,11,11), 0.061, 0.061, 0)", 99.98449888,
     "from memory of Microsoft's PRICEMAT page"),
    ("=YIELDMAT(DATE(2008,3,15), DATE(2008,11,3), DATE(2007,11,8), 0.0625, 100.0123, 0)", 0.060954,
     "from memory of Microsoft's YIELDMAT page"),
    ("=XNPV(0.09, {-10000,2750,4250,3250,2750}, {39448,39508,39751,39859,39904})", 2086.65,
     "from memory of Microsoft's XNPV page"),
    ("=XIRR({-10000,2750,4250,3250,2750}, {39448,39508,39751,39859,39904}, 0.1)", 0.373362535,
     "from memory of Microsoft's XIRR page"),
    ("=CUMIPMT(0.09/12, 30*12, 125000, 13, 24, 0)", -11135.23213, "from memory of Microsoft's CUMIPMT page"),
    ("=CUMIPMT(0.09/12, 30*12, 125000, 1, 1, 0)", -937.5, "from memory of Microsoft's CUMIPMT page"),
    ("=CUMPRINC(0.09/12, 30*12, 125000, 13, 24, 0)", -934.1071234, "from memory of Microsoft's CUMPRINC page"),
    ("=CUMPRINC(0.09/12, 30*12, 125000, 1, 1, 0)", -68.27827118, "from memory of Microsoft's CUMPRINC page"),
    ("=VDB(2400, 300, 10*365, 0, 1)", 1.32, "from memory of Microsoft's VDB page"),
    ("=VDB(2400, 300, 10*12, 0, 1)", 40.0, "from memory of Microsoft's VDB page"),
    ("=VDB(2400, 300, 10, 0, 1)", 480.0, "from memory of Microsoft's VDB page"),
    ("=VDB(2400, 300, 10*12, 6, 18)", 396.31, "from memory of Microsoft's VDB page"),
    ("=VDB(2400, 300, 10, 0, 0.875, 1.5)", 315.0, "from memory of Microsoft's VDB page"),
    ("=PDURATION(0.025, 2000, 2200)", 3.86, "from memory of Microsoft's PDURATION page"),
    ("=PDURATION(0.025/12, 1000, 1200)", 87.6, "from memory of Microsoft's PDURATION page"),
    ("=RRI(96, 10000, 11000)", 0.0009933, "from memory of Microsoft's RRI page"),
    ("=ISPMT(0.1/12, 1, 3*12, 8000000)", -64814.8148, "from memory of Microsoft's ISPMT page"),
    ("=ISPMT(0.1, 1, 3, 8000000)", -533333.333, "from memory of Microsoft's ISPMT page"),
    ("=FVSCHEDULE(1, {0.09,0.11,0.1})", 1.3308900, "from memory of Microsoft's FVSCHEDULE page"),
    ("=DOLLARDE(1.02, 16)", 1.125, "from memory of Microsoft's DOLLARDE page"),
    ("=DOLLARDE(1.1, 32)", 1.3125, "from memory of Microsoft's DOLLARDE page"),
    ("=DOLLARFR(1.125, 16)", 1.02, "from memory of Microsoft's DOLLARFR page"),
    ("=DOLLARFR(1.125, 32)", 1.04, "from memory of Microsoft's DOLLARFR page"),
]


def _digits(expected: float) -> float:
    """The tolerance of a value Microsoft prints rounded: half a unit of its last digit."""
    text = repr(expected)
    decimals = len(text.split(".")[1]) if "." in text and "e" not in text else 0
    return 0.5 * 10.0 ** -decimals


@pytest.mark.parametrize("formula, expected, source", EXAMPLES, ids=[e[0] for e in EXAMPLES])
def test_documented_example(formula: str, expected: float, source: str) -> None:
    got = compute(formula)
    assert isinstance(got, float), (source, got)
    assert math.isclose(got, expected, rel_tol=1e-6, abs_tol=_digits(expected)), (source, got)


# (formula, error code, source)
ERRORS = [
    ("=ACCRINT(DATE(2008,5,1), DATE(2008,9,1), DATE(2008,5,1), 0.1, 1000, 2, 0)", "#NUM!",
     "Microsoft's ACCRINT page: issue >= settlement is #NUM!"),
    ("=ACCRINT(DATE(2008,3,1), DATE(2008,9,1), DATE(2008,5,1), 0.1, 1000, 3, 0)", "#NUM!",
     "Microsoft's ACCRINT page: a frequency other than 1, 2 or 4 is #NUM!"),
    ("=COUPDAYS(DATE(2011,11,15), DATE(2011,1,25), 2, 1)", "#NUM!", "Microsoft's COUPDAYS page: settlement >= maturity"),
    ("=COUPNUM(DATE(2011,1,25), DATE(2011,11,15), 2, 5)", "#NUM!", "Microsoft's COUPNUM page: basis outside 0 to 4"),
    ('=PRICE("x", DATE(2017,11,15), 0.0575, 0.065, 100, 2, 0)', "#VALUE!", "Microsoft's PRICE page: a date that is not valid"),
    ("=TBILLPRICE(DATE(2008,3,31), DATE(2009,6,1), 0.09)", "#NUM!",
     "Microsoft's TBILLPRICE page: maturity more than a year after settlement"),
    ("=DOLLARDE(1.02, 0)", "#DIV/0!", "Microsoft's DOLLARDE page: a fraction of 0"),
    ("=DOLLARFR(1.02, -1)", "#NUM!", "Microsoft's DOLLARFR page: a negative fraction"),
    ("=PDURATION(0, 2000, 2200)", "#NUM!", "Microsoft's PDURATION page: arguments must be positive"),
    ("=XNPV(0.09, {-10000,2750}, {39448})", "#NUM!", "Microsoft's XNPV page: values and dates differ in number"),
    ("=CUMIPMT(0.09/12, 30*12, 125000, 0, 24, 0)", "#NUM!", "Microsoft's CUMIPMT page: start period below 1"),
]


@pytest.mark.parametrize("formula, code, source", ERRORS, ids=[e[0] for e in ERRORS])
def test_documented_error(formula: str, code: str, source: str) -> None:
    got = compute(formula)
    assert getattr(got, "code", None) == code, (source, got)
