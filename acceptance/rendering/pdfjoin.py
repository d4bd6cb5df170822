"""Join finished PDFs into one, writing each part's objects as soon as they are read.

pypdf's ``PdfWriter`` keeps every object of every part until it writes the file: about
1.3 MB of Python objects for a 150 kB record, so joining the 600 records of a large job
held close to 800 MB. Here each part is read, its pages and everything they reference are
written out with new object numbers, and the part is dropped before the next one; what
stays in memory is one offset per object, the page list, the outline entries and the
named destinations.

The first document (the package's cover and contents) gives the catalog: its metadata,
output intent, embedded files and outline stay as they are. Files given to the join are
embedded as well (ISO 32000-1 7.11.4, with the PDF 2.0 / PDF/A-3 ``/AFRelationship``), so
the front need not be laid out again when only an embedded file changed. Each further part gets one
outline entry that opens on its first page, with the part's own outline nested under it.
A link or outline entry of a part that names a destination of that same part is written
with the destination itself, since several parts name their sections alike; the joined
name tree keeps the first document's names and the first part's of any other name.
"""

from __future__ import annotations

import datetime as _dt
import gc
import hashlib
import io
import mimetypes
import zlib
from collections import deque
from collections.abc import Sequence
from pathlib import Path
from typing import Any, BinaryIO

from pypdf import PdfReader
from pypdf.generic import (
    ArrayObject,
    DictionaryObject,
    IndirectObject,
    NameObject,
    NullObject,
    StreamObject,
    TextStringObject,
)

__all__ = ["join_pdfs"]

_CATALOG, _PAGES, _OUTLINES = 1, 2, 3
_DESTINATION_KEYS = ("/Dest", "/D")
# Readers hold reference cycles (objects point back at their reader); a full collection
# every few parts keeps at most that many parts in memory without paying for one per part.
_COLLECT_EVERY = 32


class _Output:
    """The file being written: object offsets, and a digest for the second /ID entry."""

    def __init__(self, handle: BinaryIO) -> None:
        self.handle, self.position = handle, 0
        self.offsets: dict[int, int] = {}
        self.digest = hashlib.md5(usedforsecurity=False)
        self.next_number = _OUTLINES + 1

    def allocate(self) -> int:
        number, self.next_number = self.next_number, self.next_number + 1
        return number

    def write(self, data: bytes) -> None:
        self.handle.write(data)
        self.digest.update(data)
        self.position += len(data)

    def write_object(self, number: int, body: bytes) -> None:
        self.offsets[number] = self.position
        self.write(b"%d 0 obj\n%s\nendobj\n" % (number, body))


class _Part:
    """Copies objects of one reader into the output under new numbers."""

    def __init__(self, reader: PdfReader, output: _Output, fixed: dict[int, int]) -> None:
        self.reader, self.output = reader, output
        self.numbers: dict[int, int] = dict(fixed)  # old number → new; fixed ones not copied
        self.pending: deque[IndirectObject] = deque()
        self.overrides: dict[int, bytes] = {}  # old number → entries added to its dictionary
        self.names = _named_destinations(reader)

    def number(self, reference: IndirectObject) -> int:
        if reference.idnum not in self.numbers:
            self.numbers[reference.idnum] = self.output.allocate()
            self.pending.append(reference)
        return self.numbers[reference.idnum]

    def serialize(self, value: Any, buffer: io.BytesIO, key: str | None = None) -> None:
        if isinstance(value, IndirectObject):
            buffer.write(b"%d 0 R" % self.number(value))
        elif key in _DESTINATION_KEYS and isinstance(value, str | bytes) \
                and str(value) in self.names:
            self.serialize(self.names[str(value)], buffer)
        elif isinstance(value, DictionaryObject):
            buffer.write(b"<<")
            for name, item in value.items():
                if isinstance(value, StreamObject) and name == "/Length":
                    continue
                NameObject(name).write_to_stream(buffer)
                buffer.write(b" ")
                self.serialize(item, buffer, name)
                buffer.write(b"\n")
            if isinstance(value, StreamObject):
                buffer.write(b"/Length %d" % len(value._data))
            buffer.write(b">>")
        elif isinstance(value, ArrayObject):
            buffer.write(b"[")
            for index, item in enumerate(value):
                if index:
                    buffer.write(b" ")
                self.serialize(item, buffer)
            buffer.write(b"]")
        elif value is None:
            NullObject().write_to_stream(buffer)
        else:
            value.write_to_stream(buffer)

    def dump(self, value: Any) -> bytes:
        buffer = io.BytesIO()
        self.serialize(value, buffer)
        return buffer.getvalue()

    def drain(self) -> None:
        """Write every object referenced so far, and what those reference in turn."""
        while self.pending:
            reference = self.pending.popleft()
            value = reference.get_object()
            body = self.dump(value)
            extra = self.overrides.get(reference.idnum)
            if extra:
                body = body[:-2] + extra + b">>"
            if isinstance(value, StreamObject):
                body += b"\nstream\n" + value._data + b"\nendstream"
            self.output.write_object(self.numbers[reference.idnum], body)

    def pages(self) -> list[int]:
        numbers = []
        for page in self.reader.pages:
            reference = page.indirect_reference
            assert reference is not None  # every page of a file read from disk is an object
            numbers.append(self.number(reference))
        self.drain()
        return numbers


def _catalog(reader: PdfReader) -> Any:
    """The document catalog: a PDF dictionary whose entries pypdf types only as PdfObject."""
    return reader.trailer["/Root"]


def _named_destinations(reader: PdfReader) -> dict[str, Any]:
    names: dict[str, Any] = {}
    tree = _catalog(reader).get("/Names", {}).get("/Dests")
    for name, value in _name_tree_leaves(tree):
        target = value.get_object()
        names.setdefault(name, target.get("/D", target)
                         if isinstance(target, DictionaryObject) else target)
    return names


def _name_tree_leaves(tree: Any) -> list[tuple[str, Any]]:
    """(name, value) pairs of a name tree (ISO 32000-1 7.9.6), values unresolved."""
    leaves: list[tuple[str, Any]] = []
    stack = [tree.get_object()] if tree is not None else []
    while stack:
        node = stack.pop()
        flat = node.get("/Names", [])
        leaves += [(str(flat[index]), flat[index + 1]) for index in range(0, len(flat) - 1, 2)]
        stack.extend(kid.get_object() for kid in node.get("/Kids", []))
    return leaves


def _text(value: str) -> bytes:
    buffer = io.BytesIO()
    TextStringObject(value).write_to_stream(buffer)
    return buffer.getvalue()


def _embed(output: _Output, attachment: Any, moment: _dt.datetime) -> int:
    """Write one embedded file and its file specification; return the specification's
    number. ``attachment`` has ``name``, ``data`` and ``description``."""
    data = attachment.data
    mime = mimetypes.guess_type(attachment.name)[0] or "application/octet-stream"
    when = _text(moment.astimezone(_dt.UTC).strftime("D:%Y%m%d%H%M%SZ"))
    packed = zlib.compress(data, 9)
    stream = output.allocate()
    output.write_object(stream, b"<</Type /EmbeddedFile\n/Subtype /%s\n/Params <</CheckSum <%s>"
                        b" /Size %d /CreationDate %s /ModDate %s>>\n/Filter /FlateDecode"
                        b"\n/Length %d>>\nstream\n%s\nendstream" % (
                            mime.replace("/", "#2F").encode(),
                            hashlib.md5(data, usedforsecurity=False).hexdigest().encode(),
                            len(data), when, when, len(packed), packed))
    spec = output.allocate()
    name = _text(attachment.name)
    output.write_object(spec, b"<</Type /Filespec\n/F %s\n/UF %s\n/EF <</F %d 0 R /UF %d 0 R>>"
                        b"\n/Desc %s\n/AFRelationship /Source>>" % (
                            name, name, stream, stream, _text(attachment.description)))
    return spec


def _outline_root(reader: PdfReader) -> tuple[int | None, DictionaryObject | None]:
    catalog = _catalog(reader)
    reference = catalog.raw_get("/Outlines") if "/Outlines" in catalog else None
    if not isinstance(reference, IndirectObject):
        return None, None
    root: Any = reference.get_object()
    return (reference.idnum, root) if root.get("/First") is not None else (None, None)


def _pages_nodes(reader: PdfReader) -> list[int]:
    found, stack = [], [_catalog(reader).raw_get("/Pages")]
    while stack:
        reference = stack.pop()
        node = reference.get_object()
        if node.get("/Type") == "/Pages":
            found.append(reference.idnum)
            stack.extend(node.raw_get("/Kids"))
    return found


def join_pdfs(target: Path, front: Path, parts: Sequence[tuple[str, Path]],
              attachments: Sequence[Any] = (), moment: _dt.datetime | None = None) -> int:
    """Write ``front`` followed by every ``(title, path)`` of ``parts`` to ``target``, with
    ``attachments`` (each with ``name``, ``data`` and ``description``) embedded as sources
    dated ``moment``; return the page count."""
    with open(target, "wb") as handle:
        output = _Output(handle)
        part_items = [output.allocate() for _ in parts]
        reader = PdfReader(front)
        output.write(b"%" + reader.pdf_header[1:].encode() + b"\n%\xe2\xe3\xcf\xd3\n")
        outline_number, outline = _outline_root(reader)
        copier = _Part(reader, output, {n: _PAGES for n in _pages_nodes(reader)}
                       | ({outline_number: _OUTLINES} if outline_number else {}))
        if outline is not None and part_items:
            copier.overrides[outline.raw_get("/Last").idnum] = b"/Next %d 0 R" % part_items[0]
        kids = copier.pages()
        catalog = _catalog(reader)
        entries = {name: copier.dump(value) for name, value in catalog.items()
                   if name not in ("/Type", "/Pages", "/Outlines", "/Names", "/AF")}
        front_names = catalog.get("/Names", {})
        name_entries = {name: copier.dump(value) for name, value in front_names.items()
                        if name not in ("/Dests", "/EmbeddedFiles")}
        associated = [copier.dump(value) for value in catalog.get("/AF", [])]
        files = {name: copier.dump(value) for name, value
                 in _name_tree_leaves(front_names.get("/EmbeddedFiles"))}
        destinations = {name: copier.dump(value) for name, value in copier.names.items()}
        info = copier.dump(reader.trailer["/Info"]) if "/Info" in reader.trailer else None
        trailer: Any = reader.trailer
        permanent = trailer["/ID"][0] if "/ID" in trailer else None
        first_item = copier.dump(outline.raw_get("/First")) if outline is not None else None
        last_item = copier.dump(outline.raw_get("/Last")) if outline is not None else None
        top_count = _visible(outline) if outline is not None else 0
        copier.drain()
        del copier, reader
        for attachment in attachments:
            spec = b"%d 0 R" % _embed(output, attachment, moment or _dt.datetime(
                1970, 1, 1, tzinfo=_dt.UTC))
            associated.append(spec)
            files[attachment.name] = spec
        if associated:
            entries["/AF"] = b"[" + b" ".join(associated) + b"]"
        if files:
            number = output.allocate()
            output.write_object(number, b"<</Names [%s]>>" % b"\n".join(
                _text(name) + b" " + files[name] for name in sorted(files)))
            name_entries["/EmbeddedFiles"] = b"%d 0 R" % number
        for index, (title, path) in enumerate(parts):
            reader = PdfReader(path)
            outline_number, outline = _outline_root(reader)
            fixed = {n: _PAGES for n in _pages_nodes(reader)}
            if outline_number:
                fixed[outline_number] = part_items[index]
            copier = _Part(reader, output, fixed)
            numbers = copier.pages()
            buffer = io.BytesIO()
            buffer.write(b"<</Title ")
            TextStringObject(title).write_to_stream(buffer)
            buffer.write(b"\n/Parent %d 0 R\n/Dest [%d 0 R /Fit]" % (_OUTLINES, numbers[0]))
            if index > 0:
                buffer.write(b"\n/Prev %d 0 R" % part_items[index - 1])
            elif last_item is not None:
                buffer.write(b"\n/Prev %s" % last_item)
            if index + 1 < len(parts):
                buffer.write(b"\n/Next %d 0 R" % part_items[index + 1])
            if outline is not None:
                count = int(outline.get("/Count", 0))
                buffer.write(b"\n/First %s\n/Last %s\n/Count %d" % (
                    copier.dump(outline.raw_get("/First")), copier.dump(outline.raw_get("/Last")),
                    count))
                top_count += 1 + max(count, 0)
            else:
                top_count += 1
            buffer.write(b">>")
            for name, value in copier.names.items():
                if name not in destinations:
                    destinations[name] = copier.dump(value)
            copier.drain()
            output.write_object(part_items[index], buffer.getvalue())
            kids += numbers
            del copier, reader
            if (index + 1) % _COLLECT_EVERY == 0:
                gc.collect()
        _finish(output, kids, entries, name_entries, destinations, info, permanent,
                first_item, part_items, top_count)
    return len(kids)


def _visible(outline: DictionaryObject) -> int:
    """Entries shown of an outline whose open entries stay open (ISO 32000-1 12.3.3)."""
    return max(int(outline.get("/Count", 0)), 0)


def _finish(output: _Output, kids: list[int], entries: dict[str, bytes],
            name_entries: dict[str, bytes], destinations: dict[str, bytes],
            info: bytes | None, permanent: bytes | None, first_item: bytes | None,
            part_items: list[int], top_count: int) -> None:
    output.write_object(_PAGES, b"<</Type /Pages\n/Kids [%s]\n/Count %d>>" % (
        b" ".join(b"%d 0 R" % kid for kid in kids), len(kids)))
    first = first_item or (b"%d 0 R" % part_items[0] if part_items else None)
    last = b"%d 0 R" % part_items[-1] if part_items else first_item
    if first is not None:
        output.write_object(_OUTLINES, b"<</Type /Outlines\n/First %s\n/Last %s\n/Count %d>>"
                            % (first, last, top_count))
    else:  # no outline at all: the number reserved for it still needs an entry in the table
        output.write_object(_OUTLINES, b"null")
    catalog = [b"/Type /Catalog", b"/Pages %d 0 R" % _PAGES]
    if first is not None:
        catalog.append(b"/Outlines %d 0 R" % _OUTLINES)
    catalog += [name.encode() + b" " + value for name, value in entries.items()]
    names = [name.encode() + b" " + value for name, value in name_entries.items()]
    if destinations:
        flat = io.BytesIO()
        for name in sorted(destinations):
            TextStringObject(name).write_to_stream(flat)
            flat.write(b" " + destinations[name] + b"\n")
        number = output.allocate()
        output.write_object(number, b"<</Names [%s]>>" % flat.getvalue())
        names.append(b"/Dests %d 0 R" % number)
    if names:
        catalog.append(b"/Names <<" + b"\n".join(names) + b">>")
    output.write_object(_CATALOG, b"<<" + b"\n".join(catalog) + b">>")
    trailer = [b"/Size %d" % output.next_number, b"/Root %d 0 R" % _CATALOG]
    if info is not None:
        number = output.allocate()
        output.write_object(number, info)
        trailer.append(b"/Info %d 0 R" % number)
        trailer[0] = b"/Size %d" % output.next_number
    second = output.digest.hexdigest().encode()
    if permanent is not None:
        raw = getattr(permanent, "original_bytes", permanent)
        first_id = bytes(raw).hex().encode()
    else:
        first_id = second
    trailer.append(b"/ID [<%s> <%s>]" % (first_id, second))
    start = output.position
    table = [b"xref\n0 %d\n0000000000 65535 f \n" % output.next_number]
    table += [b"%010d 00000 n \n" % output.offsets[number]
              for number in range(1, output.next_number)]
    output.write(b"".join(table))
    output.write(b"trailer\n<<" + b"\n".join(trailer) + b">>\nstartxref\n%d\n%%%%EOF\n"
                 % start)
