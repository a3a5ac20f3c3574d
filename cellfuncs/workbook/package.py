"""The workbook file as a zip package, opened defensively.

Every refusal is a :class:`Refused` with a one-line reason, raised before anything is
written. Limits (stated in ``cellfuncs recalc --help`` too):

- the file is a regular file (a named pipe or a device is refused without being opened
  for reading, so nothing waits for a writer or reads without end);
- it is a zip (an OLE compound file, which is how Excel stores an encrypted workbook, is
  refused by its signature) whose directory Python's zip reader accepts, every member
  named once, without encrypted members, stored or deflated;
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

import os
import stat
import struct
import zipfile
from typing import Any
from xml.etree.ElementTree import Element, ParseError

OLE_SIGNATURE = b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1"
MAX_TOTAL = 200 * 2**20
MAX_RATIO = 100
RATIO_FLOOR = 2**20
MAX_MEMBERS = 10_000
ENTITY_REFUSAL = "XML with a DTD or entity declaration (possible entity bomb)"


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
        raise Refused(f"{part}: {ENTITY_REFUSAL}") from None
    except ParseError as exc:
        raise Refused(f"{part}: corrupt XML ({exc})") from None
    except (LookupError, ValueError) as exc:  # an encoding name the parser does not know, and the like
        raise Refused(f"{part}: corrupt XML ({_reason(exc)})") from None


class Package:
    """A checked zip package: member names, their contents, and their raw compressed bytes.

    Opening runs every check except the XML parse, which :meth:`validate` does.
    """

    def __init__(self, path: str):
        self.path = path
        self.file = _open_regular(path)
        try:
            head = self.file.read(8)
            if head == OLE_SIGNATURE:
                raise Refused("an OLE compound file: an encrypted (password-protected) workbook or a legacy .xls")
            self.file.seek(0)
            try:
                self.zip = zipfile.ZipFile(self.file)
            except zipfile.BadZipFile:
                raise Refused("not a zip package (.xlsx/.xlsm)") from None
            except Exception as exc:  # NotImplementedError (a version field), struct.error, ...: a damaged directory
                raise Refused(f"a damaged zip directory ({_reason(exc)})") from None
            self.infos = self.zip.infolist()
            self._check_members()
        except BaseException:
            self.file.close()
            raise
        self.names = {info.filename: info for info in self.infos}
        self._cache: dict[str, bytes] = {}
        self._utf8: dict[str, tuple[bytes, Any]] = {}

    def _check_members(self) -> None:
        if len(self.infos) > MAX_MEMBERS:
            raise Refused(f"{len(self.infos)} zip members; the limit is {MAX_MEMBERS}")
        total = 0
        seen: set[str] = set()
        size = os.fstat(self.file.fileno()).st_size
        for info in self.infos:
            if info.filename in seen:
                raise Refused(f"{info.filename}: two zip members of this name")
            seen.add(info.filename)
            if info.header_offset < 0 or info.header_offset + info.compress_size > size:
                raise Refused(f"{info.filename}: the zip directory places it beyond the end of the file")
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
        self.file.close()

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

    def utf8(self, name: str) -> bytes:
        """Member ``name`` as UTF-8 bytes, to be read with positions and edited (see
        :mod:`.encoding`); :meth:`encoded` gives edited bytes back the part's encoding."""
        found = self._utf8.get(name)
        if found is None:
            from .encoding import as_utf8

            found = self._utf8[name] = as_utf8(self.read(name), name)
        return found[0]

    def encoded(self, name: str, work: bytes) -> bytes:
        """Edited UTF-8 bytes of member ``name`` in the member's own encoding."""
        from .encoding import restore

        self.utf8(name)
        return restore(work, self._utf8[name][1])

    def validate(self, skip: set[str]) -> None:
        """Parse every XML part not in ``skip`` (those are parsed by their readers)."""
        for info in self.infos:
            name = info.filename
            if name not in skip and name.endswith((".xml", ".rels")):
                parse_xml(self.read(name), name, _Discard())
                self._cache.pop(name, None)  # kept only while needed

    def raw(self, info: zipfile.ZipInfo) -> bytes:
        """The compressed bytes of a member exactly as stored, to copy it unchanged."""
        fp = self.file
        try:
            fp.seek(info.header_offset)
            header = fp.read(30)
            if len(header) != 30 or header[:4] != b"PK\x03\x04":
                raise Refused(f"{info.filename}: damaged local zip header")
            name_len, extra_len = struct.unpack("<HH", header[26:30])
            fp.seek(info.header_offset + 30 + name_len + extra_len)
            data = fp.read(info.compress_size)
        except (OSError, ValueError, OverflowError) as exc:  # an offset the directory got wrong
            raise Refused(f"{info.filename}: damaged zip member ({_reason(exc)})") from None
        if len(data) != info.compress_size:
            raise Refused(f"{info.filename}: truncated zip member")
        return data


def _reason(exc: BaseException) -> str:
    text = str(exc)
    return f"{type(exc).__name__}: {text}" if text else type(exc).__name__


_KINDS = ((stat.S_ISFIFO, "a named pipe"), (stat.S_ISCHR, "a character device"), (stat.S_ISBLK, "a block device"),
          (stat.S_ISSOCK, "a socket"))


def _open_regular(path: str):
    """``path`` opened for reading if it is a regular file; refused otherwise.

    The kind of file is looked at before opening it (opening a named pipe waits for a
    writer) and again on the open file (the name could have changed in between).
    """
    try:
        before = os.stat(path)
    except FileNotFoundError:
        raise Refused("no such file") from None
    except OSError as exc:
        raise Refused(f"cannot be read ({exc.strerror})") from None
    _check_regular(before.st_mode)
    flags = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_BINARY", 0)
    try:
        fd = os.open(path, flags)
    except OSError as exc:
        raise Refused(f"cannot be read ({exc.strerror})") from None
    try:
        _check_regular(os.fstat(fd).st_mode)
    except BaseException:
        os.close(fd)
        raise
    return os.fdopen(fd, "rb")


def _check_regular(mode: int) -> None:
    if stat.S_ISDIR(mode):
        raise Refused("a folder, not a workbook")
    if not stat.S_ISREG(mode):
        kind = next((name for test, name in _KINDS if test(mode)), "a special file")
        raise Refused(f"not a regular file but {kind}")
