"""The UNO component that LibreOffice runs: the sheet functions as a Calc add-in.

Imported only inside LibreOffice (it needs ``uno``), through the extension's loader, which
first puts the pack's environment on ``sys.path``. Two implementations:

- ``Functions``: every registry function as an add-in method (arguments and results
  through :mod:`.adapt`), its wizard texts from the docstrings, plus ``ERROR_REASON``.
- ``PlainNames``: a job run when a document has loaded. LibreOffice before 24.x reads
  ``BOIL_TEMP(...)`` in an .xlsx as an unknown name (it knows add-ins there only by the
  programmatic name); the job compiles each formula that calls a pack function by its plain
  name again, which Calc resolves through the add-in's display names.
"""

from __future__ import annotations

import unohelper
from com.sun.star.lang import Locale, XLocalizable, XServiceInfo, XServiceName
from com.sun.star.sheet import LocalizedName, XAddIn, XCompatibilityNames
from com.sun.star.task import XJob

from CellFuncsCalc import XFunctions  # the type library shipped in the extension

from ...sheet import FUNCTIONS
from . import adapt, reasons
from .interface import (IMPLEMENTATION, PLAIN_NAMES_JOB, REASON_ARGUMENT, REASON_FUNCTION, SCALAR_FUNCTIONS, SERVICE,
                        parameters, plain_call)
from .recompile import recompile

CATEGORY = "Add-In"  # Calc's own category for add-ins: its wizard has no place for new ones
DISPLAY_CATEGORY = "cellfuncs"
_ENGLISH = Locale("en", "US", "")


def _method(name: str):
    call = FUNCTIONS[name].call
    texts = [adapt.is_text_argument(p) for p in parameters(name)]
    out = adapt.cell if name in SCALAR_FUNCTIONS else adapt.result

    def method(self, *args):
        return out(call(*(adapt.argument(a, t) for a, t in zip(args, texts))))

    method.__name__ = name
    return method


class Functions(unohelper.Base, XFunctions, XAddIn, XCompatibilityNames, XServiceName, XLocalizable, XServiceInfo):
    def __init__(self, context):
        self.context = context
        self.locale = _ENGLISH

    # XServiceName, XServiceInfo, XLocalizable
    def getServiceName(self):
        return SERVICE

    def getImplementationName(self):
        return IMPLEMENTATION

    def supportsService(self, name):
        return name in self.getSupportedServiceNames()

    def getSupportedServiceNames(self):
        return (SERVICE, "com.sun.star.sheet.AddIn")

    def setLocale(self, locale):
        self.locale = locale

    def getLocale(self):
        return self.locale

    # XAddIn: the function wizard's texts
    def getProgrammaticFuntionName(self, display):  # sic: the UNO method's own spelling
        return display if display in FUNCTIONS or display == REASON_FUNCTION else ""

    def getDisplayFunctionName(self, name):
        return name

    def getFunctionDescription(self, name):
        if name == REASON_FUNCTION:
            return "The reason behind the error value a cell shows (pack functions only)"
        return FUNCTIONS[name].summary if name in FUNCTIONS else ""

    def _argument(self, name, index):
        if name == REASON_FUNCTION:
            return REASON_ARGUMENT  # its one visible argument (the document before it is Calc's)
        if name not in FUNCTIONS:
            return ("", "")
        names = parameters(name)
        if not 0 <= index < len(names):
            return ("", "")
        return names[index], FUNCTIONS[name].arguments.get(names[index], "")

    def getDisplayArgumentName(self, name, index):
        return self._argument(name, index)[0]

    def getArgumentDescription(self, name, index):
        return self._argument(name, index)[1]

    def getProgrammaticCategoryName(self, name):
        return CATEGORY

    def getDisplayCategoryName(self, name):
        return DISPLAY_CATEGORY

    # XCompatibilityNames: the name Excel writes, which LibreOffice 24.x and later map on import
    def getCompatibilityNames(self, name):
        return (LocalizedName(_ENGLISH, name),)

    def ERROR_REASON(self, document, cell):
        return reasons.reason(document, cell)


for _name in FUNCTIONS:
    setattr(Functions, _name, _method(_name))


class PlainNames(unohelper.Base, XJob, XServiceInfo):
    def __init__(self, context):
        self.context = context

    def getImplementationName(self):
        return PLAIN_NAMES_JOB

    def supportsService(self, name):
        return name == PLAIN_NAMES_JOB

    def getSupportedServiceNames(self):
        return (PLAIN_NAMES_JOB,)

    def execute(self, arguments):
        for named in arguments:
            if named.Name == "Environment":
                for item in named.Value:
                    if item.Name == "Model" and item.Value is not None and \
                            item.Value.supportsService("com.sun.star.sheet.SpreadsheetDocument"):
                        recompile(item.Value, plain_call())
        return ()


g_ImplementationHelper = unohelper.ImplementationHelper()
g_ImplementationHelper.addImplementation(Functions, IMPLEMENTATION, (SERVICE, "com.sun.star.sheet.AddIn"))
g_ImplementationHelper.addImplementation(PlainNames, PLAIN_NAMES_JOB, (PLAIN_NAMES_JOB,))
