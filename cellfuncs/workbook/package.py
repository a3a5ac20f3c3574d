"""The workbook file as a zip package, opened defensively.

Every refusal is a :class:`Refused` with a one-line reason, raised before anything is
written. Limits (stated in ``cellfuncs recalc --help`` too):

- the file is a zip (an OLE compound file, which is how Excel stores an encrypted
  workbook, is refused by its signature), without encrypted members, stored or deflated;
- at most :data:`MAX_MEMBERS` members and :data:`MAX_TOTAL` bytes expanded in total;
- a member above :data:`RATIO_FLOOR` bytes expands at most :data:`MAX_RATIO` times its
  compressed size (zip bombs);
- every XML part (``*.xml``, ``*.rels``) parses with defusedxml: no DTD, no entity
  declarations, no external references, well formed.

The declared sizes bound what is read: Python's zip reader stops at a member's declared
size and fails its CRC check if the data runs on.

>>> MAX_TOTAL // 2**20, MAX_RATIO, RATIO_FLOOR // 2**20
(200, 100, 1)
"""

from __future__ import annotations

import zipfile
from typing import Any
from xml.etree.ElementTree import Element, ParseError

OLE_SIGNATURE = b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1"
MAX_TOTAL = 200 * 2**20
MAX_RATIO = 100
RATIO_FLOOR = 2**20
MAX_MEMBERS = 10_000


class Refused(Exception):
    """A workbook this tool will not touch; ``str()`` is the one-line reason."""


class _Discard:
    """A parser target that keeps nothing: validation only."""

    def start(self, tag: str, attrib: dict) -> None:
        pass

    def end(self, tag: str) -> None:
        pass

    def data(self, text: str) -> None:
        pass

    def close(self) -> None:
        return None


def parse_xml(data: bytes, part: str, target: Any = None) -> Any:
    """Parse ``data`` with defusedxml (into an Element, or feeding ``target``); refuse
    entity declarations, DTDs and malformed XML.

    >>> parse_xml(b"<a><b/></a>", "x.xml").tag
    'a'
    >>> parse_xml(b'<!DOCTYPE a [<!ENTITY e "x">]><a>&e;</a>', "x.xml")
    Traceback (most recent call last):
    ...
    cellfuncs.workbook.package.Refused: x.xml: XML with a DTD or entity declaration (possible entity bomb)
    """
    from defusedxml import DefusedXmlException
    from defusedxml.ElementTree import DefusedXMLParser

    parser = DefusedXMLParser(target=target, forbid_dtd=True)
    if target is not None and hasattr(target, "bind"):
        target.bind(parser)
    try:
        parser.feed(data)
        return parser.close()
    except DefusedXmlException:
        raise Refused(f"{part}: XML with a DTD or entity declaration (possible entity bomb)") from None
    except ParseError as exc:
        raise Refused(f"{part}: corrupt XML ({exc})") from None


class Package:
    """A checked zip package: member names, their contents, and their raw compressed bytes.

    Opening runs every check except the XML parse, which :meth:`validate` does.
    """

    def __init__(self, path: str):
        self.path = path
        try:
            with open(path, "rb") as f:
                head = f.read(8)
        except FileNotFoundError:
            raise Refused("no such file") from None
        except IsADirectoryError:
            raise Refused("a folder, not a workbook") from None
        except OSError as exc:
            raise Refused(f"cannot be read ({exc.strerror})") from None
        if head == OLE_SIGNATURE:
            raise Refused("an OLE compound file: an encrypted (password-protected) workbook or a legacy .xls")
        try:
            self.zip = zipfile.ZipFile(path)
        except (zipfile.BadZipFile, OSError, ValueError):
            raise Refused("not a zip package (.xlsx/.xlsm)") from None
        self.infos = self.zip.infolist()
        self._check_members()
        self.names = {info.filename: info for info in self.infos}
        self._cache: dict[str, bytes] = {}

    def _check_members(self) -> None:
        if len(self.infos) > MAX_MEMBERS:
            raise Refused(f"{len(self.infos)} zip members; the limit is {MAX_MEMBERS}")
        total = 0
        for info in self.infos:
            if info.flag_bits & 0x1:
                raise Refused(f"{info.filename}: an encrypted zip member")
            if info.compress_type not in (zipfile.ZIP_STORED, zipfile.ZIP_DEFLATED):
                raise Refused(f"{info.filename}: unsupported compression method {info.compress_type}")
            total += info.file_size
            if info.file_size > RATIO_FLOOR and info.file_size > MAX_RATIO * max(info.compress_size, 1):
                ratio = info.file_size / max(info.compress_size, 1)
                raise Refused(f"{info.filename}: compression ratio {ratio:.0f}:1 above {MAX_RATIO}:1 (possible zip bomb)")
        if total > MAX_TOTAL:
            raise Refused(f"expands to {total / 2**20:.0f} MiB; the limit is {MAX_TOTAL // 2**20} MiB (possible zip bomb)")

    def close(self) -> None:
        self.zip.close()

    def __contains__(self, name: str) -> bool:
        return name in self.names

    def read(self, name: str) -> bytes:
        """The content of member ``name`` (cached)."""
        data = self._cache.get(name)
        if data is None:
            try:
                data = self.zip.read(name)
            except KeyError:
                raise Refused(f"{name}: part missing") from None
            except (zipfile.BadZipFile, OSError, EOFError, ValueError) as exc:
                raise Refused(f"{name}: damaged zip member ({exc})") from None
            except Exception as exc:  # zlib.error and the like: a damaged stream
                raise Refused(f"{name}: damaged zip member ({type(exc).__name__})") from None
            self._cache[name] = data
        return data

    def xml(self, name: str) -> Element:
        """Member ``name`` parsed by defusedxml."""
        return parse_xml(self.read(name), name)

    def validate(self, skip: set[str]) -> None:
        """Parse every XML part not in ``skip`` (those are parsed by their readers)."""
        for info in self.infos:
            name = info.filename
            if name not in skip and name.endswith((".xml", ".rels")):
                parse_xml(self.read(name), name, _Discard())
                del self._cache[name]  # kept only while needed

    def raw(self, info: zipfile.ZipInfo) -> bytes:
        """The compressed bytes of a member exactly as stored, to copy it unchanged."""
        import struct

        fp = self.zip.fp
        fp.seek(info.header_offset)
        header = fp.read(30)
        if len(header) != 30 or header[:4] != b"PK\x03\x04":
            raise Refused(f"{info.filename}: damaged local zip header")
        name_len, extra_len = struct.unpack("<HH", header[26:30])
        fp.seek(info.header_offset + 30 + name_len + extra_len)
        data = fp.read(info.compress_size)
        if len(data) != info.compress_size:
            raise Refused(f"{info.filename}: truncated zip member")
        return data
