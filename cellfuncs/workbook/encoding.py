"""The two encodings a package's XML parts may use, UTF-8 and UTF-16: parts are edited as
UTF-8 and given back their own encoding when written.

A UTF-16 part is decoded, its XML declaration made to say UTF-8, and edited like any
other; on writing, the text goes back to UTF-16 in its byte order, with its byte-order
mark and its own declaration. Any other encoding is refused for a part that is edited
(the package format allows only these two).

>>> part = "\\ufeff<?xml version='1.0' encoding='UTF-16'?><a>é</a>".encode("utf-16-le")
>>> work, codec = as_utf8(part, "p.xml")
>>> work
b"<?xml version='1.0' encoding='UTF-8'?><a>\\xc3\\xa9</a>"
>>> restore(work.replace(b"</a>", b"<b/></a>"), codec) == "\\ufeff<?xml version='1.0' encoding='UTF-16'?><a>é<b/></a>".encode("utf-16-le")
True
>>> as_utf8(b"<a/>", "p.xml")
(b'<a/>', None)
"""

from __future__ import annotations

import re
from typing import NamedTuple

from .package import Refused

_DECLARATION = re.compile(rb"""<\?xml[^>]*?encoding\s*=\s*(["'])([A-Za-z0-9._-]+)\1""")
_UTF8_NAMES = {b"utf-8", b"utf8"}
_UTF16 = ((b"\xff\xfe", "utf-16-le"), (b"\xfe\xff", "utf-16-be"), (b"<\x00?\x00", "utf-16-le"),
          (b"\x00<\x00?", "utf-16-be"))


class Codec(NamedTuple):
    """How a UTF-16 part was written: its byte order, byte-order mark and declared name."""

    python_name: str
    bom: bytes
    declared: bytes  # the encoding name as the declaration wrote it (b"" if it named none)


def as_utf8(data: bytes, part: str) -> tuple[bytes, Codec | None]:
    """The part as UTF-8 bytes, and the codec that gives it back (None: it is UTF-8 already)."""
    for bom, name in _UTF16:
        if data.startswith(bom):
            break
    else:
        m = _DECLARATION.match(data)
        if m is not None and m.group(2).lower() not in _UTF8_NAMES:
            encoding = m.group(2).decode("ascii")
            raise Refused(f"{part}: encoded in {encoding}; the package format allows only UTF-8 and UTF-16")
        return data, None
    mark = bom if bom in (b"\xff\xfe", b"\xfe\xff") else b""
    try:
        text = data[len(mark):].decode(name)
    except UnicodeDecodeError as exc:
        raise Refused(f"{part}: not valid UTF-16 ({exc.reason} at byte {exc.start + len(mark)})") from None
    work = text.encode("utf-8")
    m = _DECLARATION.match(work)
    declared = m.group(2) if m else b""
    if m:
        work = work[:m.start(2)] + b"UTF-8" + work[m.end(2):]
    return work, Codec(name, mark, declared)


def restore(work: bytes, codec: Codec | None) -> bytes:
    """Edited UTF-8 bytes of a part in the part's own encoding again."""
    if codec is None:
        return work
    if codec.declared:
        m = _DECLARATION.match(work)
        if m is not None:
            work = work[:m.start(2)] + codec.declared + work[m.end(2):]
    return codec.bom + work.decode("utf-8").encode(codec.python_name)
