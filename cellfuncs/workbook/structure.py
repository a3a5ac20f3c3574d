"""What the package format requires of the parts recalculation reads and passes on: the
content types, the relationships and the workbook's list of sheets and names.

A part that breaks these rules is refused rather than recalculated: written back with new
values it would still be a file that Excel repairs or rejects, and other readers fail on.
The attribute sets are those of the format's schemas (ECMA-376 Part 1 and Part 2, from
memory of their definitions of these elements).

>>> from cellfuncs.workbook.package import parse_xml
>>> ct = ('<Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types"><Override PartName='
...       '"/xl/workbook.xml" ContentType="application/vnd.ms-excel.sheet.macroEnabled.main+xml"/></Types>')
>>> check_content_types(parse_xml(ct.encode(), "ct"), "xl/workbook.xml")
>>> check_content_types(parse_xml(ct.replace("PartName", "Name").encode(), "ct"), "xl/workbook.xml")
Traceback (most recent call last):
...
cellfuncs.workbook.package.Refused: [Content_Types].xml: an Override with attributes ContentType, Name
"""

from __future__ import annotations

import posixpath
from xml.etree.ElementTree import Element

from .package import Refused

CONTENT_TYPES = "[Content_Types].xml"
_CT_NS = "{http://schemas.openxmlformats.org/package/2006/content-types}"
_WORKBOOK_TYPES = {
    "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml",
    "application/vnd.openxmlformats-officedocument.spreadsheetml.template.main+xml",
    "application/vnd.ms-excel.sheet.macroEnabled.main+xml",
    "application/vnd.ms-excel.template.macroEnabled.main+xml",
}
_CT_ATTRIBUTES = {"Default": {"Extension", "ContentType"}, "Override": {"PartName", "ContentType"}}
_REL_REQUIRED = {"Id", "Type", "Target"}
_REL_ATTRIBUTES = _REL_REQUIRED | {"TargetMode"}
_SHEET_ATTRIBUTES = {"name", "sheetId", "state", "id"}  # id: in the relationships namespace
_NAME_ATTRIBUTES = {"name", "comment", "customMenu", "description", "help", "statusBar", "localSheetId", "hidden",
                    "function", "vbProcedure", "xlm", "functionGroupId", "shortcutKey", "publishToServer",
                    "workbookParameter"}


def _local(name: str) -> str:
    return name.rpartition("}")[2]


def _attributes(el: Element) -> set[str]:
    return {_local(k) for k in el.attrib if not k.startswith("{http://www.w3.org/XML/1998/namespace}")}


def check_content_types(root: Element, workbook_part: str) -> None:
    """Every entry well formed, and the workbook part typed as a workbook."""
    found = None
    for el in root:
        kind = _local(el.tag)
        wanted = _CT_ATTRIBUTES.get(kind)
        if el.tag != _CT_NS + kind or wanted is None or _attributes(el) != wanted:
            raise Refused(f"{CONTENT_TYPES}: an {kind} with attributes {', '.join(sorted(_attributes(el)))}")
        if kind == "Override" and el.get("PartName", "").lstrip("/").lower() == workbook_part.lower():
            found = el.get("ContentType")
        elif kind == "Default" and found is None:
            extension = posixpath.splitext(workbook_part)[1].lstrip(".").lower()
            if el.get("Extension", "").lower() == extension and el.get("ContentType") in _WORKBOOK_TYPES:
                found = el.get("ContentType")
    if found not in _WORKBOOK_TYPES:
        raise Refused(f"{CONTENT_TYPES}: the workbook part {workbook_part} is not typed as a workbook "
                      f"({found or 'no type'})")


def check_relationship(el: Element, part: str, seen: set[str]) -> None:
    """One Relationship element: the attributes of the schema, an Id used once."""
    names = _attributes(el)
    if not _REL_REQUIRED <= names <= _REL_ATTRIBUTES or not el.get("Id") or not el.get("Type"):
        raise Refused(f"{part}: a relationship with attributes {', '.join(sorted(names))}")
    if el.get("Id") in seen:
        raise Refused(f"{part}: relationship Id {el.get('Id')!r} used twice")
    seen.add(el.get("Id"))


def check_sheet(el: Element, names: set[str], ids: set[str]) -> None:
    """A sheet of the workbook's list: a name and a number, each used once."""
    name, number = el.get("name"), el.get("sheetId", "")
    if not name or not number.isdigit() or not _attributes(el) <= _SHEET_ATTRIBUTES:
        raise Refused(f"workbook: a sheet entry with attributes {', '.join(sorted(_attributes(el)))}")
    if name.lower() in names or number in ids:
        raise Refused(f"workbook: two sheets named {name!r} or numbered {number}")
    names.add(name.lower())
    ids.add(number)


def check_defined_name(el: Element, sheets: int) -> None:
    """A defined name: named, attributes of the schema, its sheet one of the workbook's."""
    scope = el.get("localSheetId")
    if not el.get("name") or not _attributes(el) <= _NAME_ATTRIBUTES or (
            scope is not None and not (scope.isdigit() and int(scope) < sheets)):
        raise Refused(f"workbook: a defined name with attributes {', '.join(sorted(_attributes(el)))}"
                      + (f" and localSheetId {scope!r}" if scope is not None else ""))
