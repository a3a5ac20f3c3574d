"""Headless workbook recalculation (``cellfuncs recalc``).

Modules, in the order a workbook passes through them:

- ``package``: the zip, opened defensively (limits, refusals, defusedxml for every XML part)
- ``sheetxml``, ``model``: cells, formulas, defined names, shared strings, array metadata
- ``templates``: formula texts parsed once per shape (cells filled down share one tree)
- ``graph``, ``engine``: dependency order, loops, evaluation, spills
- ``writer``, ``xmledit``, ``zipout``: cached values patched into the sheet XML, the
  package written atomically with untouched members copied as stored
- ``report``, ``recalc``, ``command``: --check differences, progress, one file end to end,
  the command line

The entry point is :func:`cellfuncs.workbook.recalc.recalc_file`; nothing is imported
here, so the command line pays for this package only when it recalculates.

>>> from cellfuncs.workbook.recalc import recalc_file
>>> recalc_file("no such workbook.xlsx").refused
'no such file'
"""
