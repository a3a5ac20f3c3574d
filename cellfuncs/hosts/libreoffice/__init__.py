"""LibreOffice Calc: the sheet functions as a Calc add-in, installed as an extension.

- ``interface``: the UNO names and the IDL generated from the function registry
  (``CellFuncs.idl``; ``cellfuncs.rdb`` is its compiled type library, shipped so users need no SDK).
- ``adapt``: Calc's argument values to the pack's, results to Calc's (true error values).
- ``addin``: the UNO component that runs inside LibreOffice (imports ``uno``).
- ``extension``: builds the .oxt and installs or removes it (``cellfuncs libreoffice``).
- ``office``: a script for LibreOffice's own Python: start an office, install, remove, recalculate.
"""
