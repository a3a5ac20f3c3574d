"""Drive a headless LibreOffice through UNO; run by LibreOffice's own Python, not the pack's.

    python3 office.py install  PROFILE EXTENSION.oxt
    python3 office.py remove   PROFILE IDENTIFIER
    python3 office.py list     PROFILE
    python3 office.py recalc   PROFILE OUT.json WORKBOOK...

PROFILE is a user-installation folder, or "-" for the user's own profile. The office is
started with its own pipe, used and terminated. ``recalc`` loads each workbook (the
extension's load job runs), recalculates everything and writes every formula cell's result
as JSON rows [sheet, row, column, kind, value]: kind "n" (number), "s" (text) or "e" (Calc's
error number). Standard library and ``uno`` only: this file must run without the pack.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import time

import uno
import unohelper
from com.sun.star.beans import PropertyValue
from com.sun.star.task import XInteractionHandler
from com.sun.star.ucb import XCommandEnvironment

START_TIMEOUT = 90.0  # s: a new profile's first start restarts the office once


def _prop(name, value):
    p = PropertyValue()
    p.Name, p.Value = name, value
    return p


class _Approve(unohelper.Base, XInteractionHandler):
    """Approves what the extension manager asks (it asks before adding any package)."""

    def handle(self, request):
        approve = uno.getTypeByName("com.sun.star.task.XInteractionApprove")
        for choice in request.getContinuations():
            if choice.queryInterface(approve):
                choice.select()
                return


class _Environment(unohelper.Base, XCommandEnvironment):
    def getInteractionHandler(self):
        return _Approve()

    def getProgressHandler(self):
        return None


class Office:
    def __init__(self, profile):
        self.pipe = f"cellfuncs{os.getpid()}"
        soffice = os.environ.get("CELLFUNCS_SOFFICE", "soffice")
        command = [soffice, "--headless", "--norestore", "--nologo", "--nodefault",
                   f"--accept=pipe,name={self.pipe};urp;StarOffice.ComponentContext"]
        if profile != "-":
            command.insert(1, "-env:UserInstallation=" + uno.systemPathToFileUrl(os.path.abspath(profile)))
        # the environment as this process started with it: pyuno's bootstrap changes the C-level one
        self.process = subprocess.Popen(command, stdout=subprocess.DEVNULL,
                                        stderr=subprocess.DEVNULL)
        local = uno.getComponentContext()
        resolver = local.ServiceManager.createInstanceWithContext("com.sun.star.bridge.UnoUrlResolver", local)
        started = time.monotonic()
        while True:
            try:
                self.context = resolver.resolve(f"uno:pipe,name={self.pipe};urp;StarOffice.ComponentContext")
                break
            except Exception:
                if time.monotonic() - started > START_TIMEOUT:
                    self.process.kill()
                    raise SystemExit(f"LibreOffice did not start within {START_TIMEOUT:.0f} s")
                time.sleep(0.05)
        self.desktop = self.context.ServiceManager.createInstanceWithContext("com.sun.star.frame.Desktop",
                                                                               self.context)

    def close(self):
        try:
            self.desktop.terminate()
        except Exception:  # the bridge goes down with the office
            pass
        try:
            self.process.wait(60)
        except subprocess.TimeoutExpired:
            self.process.kill()

    def extensions(self):
        return self.context.getValueByName("/singletons/com.sun.star.deployment.ExtensionManager")


def install(office, oxt):
    manager = office.extensions()
    url = uno.systemPathToFileUrl(os.path.abspath(oxt))
    manager.addExtension(url, (), "user", None, _Environment())
    print("installed")


def remove(office, identifier):
    manager = office.extensions()
    installed = [e.getIdentifier().Value for e in manager.getDeployedExtensions("user", None, _Environment())]
    if identifier in installed:
        manager.removeExtension(identifier, "", "user", None, _Environment())
        print("removed")
    else:
        print("not installed")


def listing(office):
    for e in office.extensions().getDeployedExtensions("user", None, _Environment()):
        print(e.getIdentifier().Value)


def _formula_cells(sheet):
    cursor = sheet.createCursor()
    cursor.gotoEndOfUsedArea(False)
    end = cursor.getRangeAddress()
    area = sheet.getCellRangeByPosition(0, 0, end.EndColumn, end.EndRow)
    errors = {}
    error_ranges = area.queryFormulaCells(4)  # com.sun.star.sheet.FormulaResult.ERROR
    cells = error_ranges.getCells().createEnumeration()
    while cells.hasMoreElements():
        cell = cells.nextElement()
        a = cell.getCellAddress()
        errors[(a.Row, a.Column)] = cell.getError()
    rows = []
    for r, (formulas, values) in enumerate(zip(area.getFormulaArray(), area.getDataArray())):
        for c, (formula, value) in enumerate(zip(formulas, values)):
            if not formula.startswith(("=", "{=")):
                continue
            if (r, c) in errors:
                rows.append([sheet.getName(), r + 1, c + 1, "e", errors[(r, c)]])
            elif isinstance(value, str):
                rows.append([sheet.getName(), r + 1, c + 1, "s", value])
            else:
                rows.append([sheet.getName(), r + 1, c + 1, "n", value])
    return rows


def recalc(office, out, workbooks):
    results = {}
    for path in workbooks:
        started = time.monotonic()
        doc = office.desktop.loadComponentFromURL(uno.systemPathToFileUrl(os.path.abspath(path)), "_blank", 0,
                                                  (_prop("Hidden", True),))
        if doc is None:
            raise SystemExit(f"LibreOffice could not open {path}")
        try:
            doc.calculateAll()
            sheets = doc.getSheets()
            cells = [row for i in range(sheets.getCount()) for row in _formula_cells(sheets.getByIndex(i))]
        finally:
            doc.close(True)
        results[path] = {"cells": cells, "seconds": time.monotonic() - started}
    with open(out, "w", encoding="utf-8") as f:
        json.dump(results, f)


def main(argv):
    command, profile, *rest = argv
    office = Office(profile)
    try:
        if command == "install":
            install(office, rest[0])
        elif command == "remove":
            remove(office, rest[0])
        elif command == "list":
            listing(office)
        elif command == "recalc":
            recalc(office, rest[0], rest[1:])
        else:
            raise SystemExit(f"unknown command {command}")
    finally:
        office.close()


if __name__ == "__main__":
    main(sys.argv[1:])
