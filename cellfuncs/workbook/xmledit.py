"""Small edits of XML bytes at positions the parser reports: everything else stays byte for byte.

>>> data = b'<r xmlns="urn:x"><a n="1"/><b/></r>'
>>> els = elements(data, "t.xml")
>>> [(e.local, e.depth, data[e.start:e.end(data)]) for e in els[1:]]
[('a', 2, b'<a n="1"/>'), ('b', 2, b'<b/>')]
>>> splice(data, [(els[1].start, els[1].end(data), b""), (els[0].close, els[0].close, b"<c/>")])
b'<r xmlns="urn:x"><b/><c/></r>'
>>> retag(b'<c r="A1" t="s" s="2">', {b"t"}, [(b"t", b"str")])
b'<c r="A1" s="2" t="str">'
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from operator import itemgetter

from .package import Refused, parse_xml
from .sheetxml import closing, tag_end

_ATTR = re.compile(rb"""\s+([^\s=/>]+)\s*=\s*("[^"]*"|'[^']*')""")
_NAME = re.compile(rb"<([^\s/>]+)")
# what ST_Xstring escapes as _xHHHH_: characters XML cannot hold, a carriage return (XML reads
# it as a line feed), and the underscore that begins a literal "_xHHHH_" (so it is not decoded)
_ESCAPED = re.compile("[\x00-\x08\x0b-\x1f\ud800-\udfff\ufffe\uffff]|_(?=x[0-9A-Fa-f]{4}_)")


@dataclass(slots=True)
class Element:
    tag: str  # "{namespace}local"
    attrib: dict
    depth: int
    start: int
    close: int = -1  # start of the end tag; equal to start when self-closing

    @property
    def local(self) -> str:
        return self.tag.rpartition("}")[2]

    def end(self, data: bytes) -> int:
        if self.close == self.start:
            return tag_end(data, self.start)
        return data.index(b">", self.close) + 1

    def inner(self, data: bytes) -> int:
        """Where the content begins (just past the start tag)."""
        return tag_end(data, self.start)


@dataclass
class _Collector:
    source: bytes
    out: list = field(default_factory=list)
    open: list = field(default_factory=list)

    def bind(self, parser) -> None:
        self.expat = parser.parser

    def start(self, tag: str, attrib: dict) -> None:
        el = Element(tag, attrib, len(self.open) + 1, self.expat.CurrentByteIndex)
        self.out.append(el)
        self.open.append(el)

    def end(self, tag: str) -> None:
        el = self.open.pop()
        el.close = closing(self.source, el.start, self.expat.CurrentByteIndex)

    def data(self, text: str) -> None:
        pass

    def close(self) -> list:
        return self.out


def elements(data: bytes, part: str) -> list[Element]:
    """Every element of ``data`` in document order, with its byte positions."""
    return parse_xml(data, part, _Collector(data))


def prefix(data: bytes, el: Element) -> bytes:
    """The namespace prefix written on ``el``'s tag (``b"x:"`` or ``b""``)."""
    name = _NAME.match(data, el.start).group(1)
    return name[: name.index(b":") + 1] if b":" in name else b""


def retag(tag: bytes, drop: set[bytes], add: list[tuple[bytes, bytes]], close: bool | None = None) -> bytes:
    """Start tag ``tag`` without the attributes ``drop`` and with ``add`` appended (values
    already escaped); ``close`` forces self-closing (True) or open (False)."""
    m = _NAME.match(tag)
    pos = m.end()
    kept = [m.group()]
    while (a := _ATTR.match(tag, pos)) is not None:
        if a.group(1) not in drop:
            kept.append(a.group())
        pos = a.end()
    kept += [b' %s="%s"' % (k, v) for k, v in add]
    was_empty = tag.rstrip().endswith(b"/>")
    kept.append(b"/>" if (was_empty if close is None else close) else b">")
    return b"".join(kept)


def splice(data: bytes, edits: list[tuple[int, int, bytes]]) -> bytes:
    """``data`` with each (start, end, new bytes) applied; insertions are zero-length edits.

    Edits at one position apply in list order (a sort keeps it); edits may not overlap.
    """
    pieces, pos = [], 0
    for start, end, new in sorted(edits, key=itemgetter(0, 1)):
        if start < pos:
            raise Refused("overlapping XML edits (internal)")
        pieces += [data[pos:start], new]
        pos = end
    pieces.append(data[pos:])
    return b"".join(pieces)


def text(value: str) -> bytes:
    """Text for element content: XML-escaped, with the ``_xHHHH_`` escapes Excel reads back
    (see :func:`.sheetxml.xstring`).

    >>> text("a<b & \\x01\\r"), text("_x0041_ _x")
    (b'a&lt;b &amp; _x0001__x000D_', b'_x005F_x0041_ _x')
    """
    value = _ESCAPED.sub(lambda m: "_x%04X_" % ord(m.group()), value)
    return _escaped(value).encode("utf-8")


def attr(value: str) -> bytes:
    """Text for an attribute value in double quotes.

    >>> attr('a"<&>')
    b'a&quot;&lt;&amp;&gt;'
    """
    return _escaped(value).replace('"', "&quot;").encode("utf-8")


def _escaped(value: str) -> str:
    # the three characters XML content needs escaped, "&" first; by hand because the standard
    # library's escape lives in xml.sax.saxutils, whose import pulls in urllib.request (about 20 ms)
    return value.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")
