"""Spreadsheet applications other than Excel that call the sheet functions in their cells.

Each host adapts arguments and results only; the functions are the sheet layer's.
"""
