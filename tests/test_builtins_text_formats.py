"""TEXT(value, format_text) across Excel's number format codes.

Each case names its source: "MS TEXT" is Microsoft Support's TEXT function page, "MS codes"
its "Number format codes" page and "MS guidelines" its "Review guidelines for customizing a
number format" page (from memory of those pages), or a named book; "workbook <name>" is a value Excel stored
in that reference workbook of ../shared/excel-reference (the POI and IronCalc test sheets),
which tests/test_conformance.py scores in full; "engine contract" marks a choice of the
engine where Excel shows a cell rather than a text.
"""

from __future__ import annotations

import pytest

from cellfuncs.formula import compute


def text(value: str, fmt: str) -> object:
    """TEXT of a formula operand and a format code, quotes in the code doubled."""
    return compute(f'=TEXT({value}, "{fmt.replace(chr(34), chr(34) * 2)}")')


CASES = [
    # digits, separators, scaling, percent
    ("1234.567", "$#,##0.00", "$1,234.57", "MS TEXT"),
    ("0.285", "0.0%", "28.5%", "MS TEXT"),
    ("1234", "0000000", "0001234", "MS TEXT"),
    ("123456", "##0° 00' 00''", "12° 34' 56''", "MS TEXT"),
    ("8.9", "#.000", "8.900", "MS codes"),
    ("0.631", "0.#", "0.6", "MS codes"),
    ("12", "#.0#", "12.0", "MS codes"),
    ("1234.568", "#.0#", "1234.57", "MS codes"),
    ("12000", "#,###", "12,000", "MS codes"),
    ("12000", "#,", "12", "MS codes"),
    ("12200000", "0.0,,", "12.2", "MS codes"),
    ("1234567", "?,?????????", "    1,234,567", "workbook NumberFormatTests"),
    ("1234567", "0,000000000", "0,001,234,567", "workbook NumberFormatTests"),
    ("1234567", ",#", ",1234567", "workbook NumberFormatTests"),
    ("1234567", "#,.#,", "1.2", "workbook NumberFormatTests"),
    ("-1.1", "|??.??|", "-| 1.1 |", "workbook NumberFormatTests"),
    ("123.45", "0,0.00%%", "1,234,500.00%%", "workbook NumberFormatTests"),
    ("-12.3", '"before "¥#.00', "-before ¥12.30", "workbook NumberFormatTests"),
    ("12345.6789", "00-00-00-00", "00-01-23-46", "workbook TEXT_TEXT"),
    ("1/3", "#.#", ".3", "workbook TEXT_TEXT"),
    ("-1/3", "#,##0", "0", "workbook TEXT_TEXT: a number rounding to 0 shows no minus sign"),
    ("-1/3", "#,##0_);(#,##0)", "(0)", "workbook TEXT_TEXT"),
    ("12", '#,#.00 "Millions!"', "12.00 Millions!", "workbook TEXT_TEXT"),
    # sections, conditions, colours, locales
    ("-125.74", '$0.00" Surplus";$-0.00" Shortage"', "$-125.74 Shortage", "MS guidelines"),
    ("0", '[Blue]#,##0.00_);[Red](#,##0.00);0.00;"sales "@', "0.00", "MS guidelines"),
    ("-5", "[Red]0.00;[Color10](0.00)", "(5.00)", "MS codes: colours change no character"),
    ("1234.567", "[$€-407] #,##0.00", "€ 1,234.57", "MS codes: the currency of a locale tag shows"),
    ("1234.567", "[$-409]0.0", "1234.6", "MS codes: a locale alone shows nothing"),
    ("1234567898", "[<=9999999]###-####;(###) ###-####", "(123) 456-7898", "MS TEXT"),
    ("1.5", '[<10]#" Wow"', "2 Wow", "workbook FormatChoiceTests"),
    ("10", '[<10]#" Wow"', "10", "workbook FormatChoiceTests: no section applies, General shows"),
    ("-9", '[>-10]#" Big"', "-9 Big", "workbook FormatConditionTests"),
    ("1", '[<      10]#" Wow"', "1 Wow", "workbook FormatConditionTests"),
    ("5", "0.00_);(0.00)*-", "5.00 ", "engine contract: _x pads one space, *x fills no cell"),
    # scientific
    ("12200000", "0.00E+00", "1.22E+07", "MS TEXT"),
    ("12", "0.00E+0", "1.20E+1", "workbook TEXT_TEXT"),
    ("0.000123456789", "|###.####|e+|#|", "|123.4568|e|-6|", "workbook NumberFormatApproxTests"),
    ("123456.789", "|0,000000.0000|e+|0|", "|0,123,456.7890|e|+0|", "workbook NumberFormatApproxTests"),
    ("0", "|?,??????.????|e-|?|", "|0,000,000.    |e|0|", "workbook NumberFormatApproxTests"),
    ("1.2345678E-142", "|#.#|e+|????|", "|1.2|e|- 142|", "workbook NumberFormatApproxTests"),
    ("123456.789", "|#%e-#|", "|1%e5|", "workbook NumberFormatApproxTests: % does not scale an exponent"),
    # fractions
    ("4.34", "# ?/?", "4 1/3", "MS TEXT"),
    ("1.5", "# ?/?", "1 1/2", "MS codes"),
    ("2.5", "?/?", "5/2", "Walkenbach, Excel 2010 Bible, custom number formats: an improper fraction"),
    ("154.87", '0 "and "??/100 "Dollars"', "154 and 87/100 Dollars",
     "Walkenbach, Excel 2010 Bible, custom number formats: a fixed denominator"),
    ("23.75", "|#\\:#/#|", "|23:3/4|", "workbook NumberFormatTests"),
    ("0.75", "|#-#-#\\:#/#|", "|--3/4|", "workbook NumberFormatTests"),
    ("0", "|#\\:? ?=/=#|", "|:0      |", "workbook NumberFormatTests: a zero fraction leaves spaces"),
    ("23.75", "|#\\:? ?0#/000", "|2:3  03/004", "workbook NumberFormatTests"),
    ("0.75", "|?\\:?0=/=#|", "|   3=/=4|", "workbook NumberFormatTests"),
    ("0", "|?\\:0=/=#|", "|0:0=/=1|", "workbook NumberFormatTests"),
    ("3.75", "|#_#/#|", "|15 /4|", "workbook NumberFormatTests"),
    # dates and times
    ("45293", "MM/DD/YY", "01/02/24", "MS TEXT"),
    ("45293", "dddd", "Tuesday", "MS TEXT"),
    ("0.75", "H:MM AM/PM", "6:00 PM", "MS TEXT"),
    ("45293", "mmmmm", "J", "MS codes"),
    ("45293", "yy", "24", "MS codes"),
    ("60", "d mmmm yyyy ddd", "29 February 1900 Wed", "MS codes: Excel's 29 February 1900"),
    ("1.5", "[h]:mm", "36:00", "MS codes"),
    ("0.0625", "[mm]:ss", "90:00", "MS codes"),
    ("0.001", "[ss]", "86", "MS codes"),
    ("0.75", "h:mm:ss A/P", "6:00:00 P", "MS codes"),
    ("41181", "ddddd/mmmmm/yyyyy", "Saturday/S/2012", "workbook TEXT_TEXT"),
    ("41181", "ddd--/--mmm--/++yyy", "Sat--/--Sep--/++2012", "workbook TEXT_TEXT"),
    ("3.14159", '"It was "[h]" [yes, "h"] hours and "mm:ss', "It was 75 [yes, 75] hours and 23:53",
     "workbook ElapsedFormatTests"),
    ("3.14159", 's:m" @ hour "[hh]', "53:23 @ hour 75", "workbook ElapsedFormatTests: m after s is minutes"),
    ("-3.14159", "[h]:m:s.000", "-75:23:53.376", "workbook ElapsedFormatTests"),
    ("DATE(1952,10,11)+TIME(14,35,27)", "hh:mm:ss.000 am/pm", "02:35:27.000 PM", "workbook DateFormatTests"),
    ("DATE(2003,2,1)+TIME(4,5,6)+0.009/86400", "h:m:s.00 A/P", "4:5:6.01 A", "workbook DateFormatTests"),
    ("1.0032134017094", "hh:mm:ss", "00:04:38", "workbook DateFormatNumberTests: seconds round"),
    # General, @ and text values
    ("1/3", "General", "0.333333333", "workbook GeneralFormatTests"),
    ("112345900000", "General", "1.12346E+11", "workbook GeneralFormatTests"),
    ("1.123451E-10", "General", "1.12345E-10", "workbook GeneralFormatTests"),
    ("5", 'General" kg"', "5 kg", "engine contract: General among literals"),
    ('"jello"', ';;;"h""I"', "hI", "workbook TextFormatTests"),
    ('"jello"', ";;;-@-@-", "-jello-jello-", "workbook TextFormatTests"),
    ("TRUE", ";;;\\@@\\@", "@TRUE@", "workbook TextFormatTests: TRUE formats as the text TRUE"),
    ('"abc"', "0.00", "abc", "MS TEXT: a text passes a number format unchanged"),
]


@pytest.mark.parametrize("value, fmt, expected, source", CASES)
def test_text_format(value, fmt, expected, source):
    assert text(value, fmt) == expected, source


@pytest.mark.parametrize("value, fmt, source", [
    ("41181", "mm###", "workbook TEXT_TEXT: date codes mixed with digit placeholders"),
    ("1", "0;0;0;@;0", "MS guidelines: at most four sections"),
    ("-1", "dd/mm/yyyy", "MS codes: a negative number is no date"),
    ("2958466", "yyyy", "MS codes: no date after 31 December 9999"),
])
def test_text_format_errors(value, fmt, source):
    assert text(value, fmt).code == "#VALUE!", source
