"""A PDF written object by object: pages of other PDFs copied in one source at a time.

The package holds every sheet's pages. Gathered into one pikepdf document, each copied object stays
in memory until the document is saved (and each source stays open with it): about 1.2 MB a sheet,
2.7 GB for 2,000 sheets (measured). Here each source is opened, its pages and what they use are
written straight to the file, and the source is closed: the memory is that of one sheet, whatever
the number of sheets. What stays is a file offset for each object written and the page numbers.

An object is copied from its unparsed text (qpdf's, so it reads as qpdf writes it), with every
reference `n g R` in it renumbered to the object's number in this file. In that text a literal
string's parentheses are escaped and a hex string holds only hex digits, so a string is read as one
token and text in it that looks like a reference is left alone (tests/test_pdfwrite.py). Stream data is copied as it is stored (still compressed).

A page can carry a stamp: a form XObject named /TsLStamp, drawn over the page's own content, whose
object is written later (`stamp`). The package's page numbers are typeset while the sheets are
copied, so the sheets need not wait for them.
"""

from __future__ import annotations

import hashlib
import re
import zlib
from dataclasses import dataclass, field
from pathlib import Path

#: A literal string, a hex string, or a reference: only the reference (groups 1, 2) is renumbered.
TOKEN = re.compile(rb"\((?:\\.|[^\\)])*\)|<[0-9A-Fa-f\s]*>|(?<![\w.#+-])(\d+) (\d+) R(?!\w)", re.S)
STAMP = "/TsLStamp"  # the stamp's name in a page's XObjects: the sheets' own never start /TsL


@dataclass
class Outline:
    """A bookmark: its title, the index of the page it opens and its children (shown open)."""

    title: str
    page: int
    children: list["Outline"] = field(default_factory=list)


class PdfWriter:
    """A PDF file written as it goes: `add_pages`, `stamp`, then `close` (the page tree, bookmarks,
    document information, cross-reference table and trailer)."""

    def __init__(self, path: Path) -> None:
        self.path = path
        self.file = open(path, "wb")
        self.digest = hashlib.md5()
        self.offsets: list[int | None] = [None]  # by object number; 0 is the free list's head
        self.position = 0
        self.pages: list[int] = []  # the page objects' numbers, in page order
        self.root, self.tree = self.reserve(), self.reserve()
        self._emit(b"%PDF-1.7\n%\xe2\xe3\xcf\xd3\n")
        self.wrap = self._stream(b"q\n")  # shared by every stamped page: its own content kept in q..Q
        self.tail = self._stream(b"\nQ\nq " + STAMP.encode() + b" Do Q\n")

    def reserve(self) -> int:
        self.offsets.append(None)
        return len(self.offsets) - 1

    def _emit(self, data: bytes) -> None:
        self.file.write(data)
        self.digest.update(data)
        self.position += len(data)

    def _object(self, num: int, body: bytes) -> None:
        self.offsets[num] = self.position
        self._emit(b"%d 0 obj\n" % num + body + b"\nendobj\n")

    def _stream(self, data: bytes, entries: bytes = b"", num: int | None = None) -> int:
        num = self.reserve() if num is None else num
        packed = zlib.compress(data)
        self._object(num, b"<< %s/Filter /FlateDecode /Length %d >>\nstream\n" % (entries, len(packed))
                     + packed + b"\nendstream")
        return num

    # -- copying from another PDF --------------------------------------------------------------

    def add_pages(self, src, stamps: list[int] | None = None) -> list[int]:
        """Copy every page of the pikepdf document `src` and every object they use; a page given a
        stamp (its number from `stamp_slot`, in `stamps`) gets it drawn over it. Returns the new
        pages' object numbers. Once this returns, `src` may be closed. (Only whole documents: a link
        from a page copied to one left out would pull in the source's page tree.)"""
        pages = list(src.pages)
        memo: dict[tuple[int, int], int] = {}
        numbers = []
        for page in pages:  # numbered first, so a link to a page lands on its copy
            numbers.append(self.reserve())
            memo[page.obj.objgen] = numbers[-1]
        queue: list[tuple[int, int]] = []
        for k, page in enumerate(pages):
            stamp = stamps[k] if stamps is not None else None
            self._object(numbers[k], self._page(page.obj, stamp, memo, queue))
        self._drain(src, memo, queue)
        self.pages.extend(numbers)
        return numbers

    def _drain(self, src, memo: dict, queue: list) -> None:
        """Write every object of `src` that `queue` names, and those they name in turn."""
        while queue:
            objgen = queue.pop()
            self._object(memo[objgen], self._body(src.get_object(objgen), memo, queue))

    def _renumber(self, text: bytes, memo: dict, queue: list) -> bytes:
        def new(match: re.Match) -> bytes:
            if match.group(1) is None:
                return match.group(0)
            objgen = (int(match.group(1)), int(match.group(2)))
            num = memo.get(objgen)
            if num is None:
                num = memo[objgen] = self.reserve()
                queue.append(objgen)
            return b"%d 0 R" % num
        return TOKEN.sub(new, text)

    def _body(self, obj, memo: dict, queue: list) -> bytes:
        import pikepdf

        if isinstance(obj, pikepdf.Stream):
            raw = obj.read_raw_bytes()
            entries = pikepdf.Dictionary(obj.stream_dict)
            entries.Length = len(raw)  # a copy: the source's own /Length may be a reference
            return self._renumber(entries.unparse(), memo, queue) + b"\nstream\n" + raw + b"\nendstream"
        return self._renumber(obj.unparse(resolved=True), memo, queue)

    def _page(self, page, stamp: int | None, memo: dict, queue: list) -> bytes:
        """The page dictionary, under this file's page tree. What a page inherits from its source's
        page tree is its own already: qpdf moves it onto the pages when pikepdf lists them."""
        import pikepdf

        entries = pikepdf.Dictionary({k: v for k, v in page.items() if k not in ("/Parent", "/Contents")})
        head = b"/Parent %d 0 R " % self.tree
        contents = page.get("/Contents")
        if isinstance(contents, pikepdf.Array):  # its streams, in order (an array held apart is not needed)
            streams = b" ".join(self._renumber(part.unparse(), memo, queue) for part in contents)
        else:
            streams = self._renumber(contents.unparse(), memo, queue) if contents is not None else b""
        if stamp is None:
            head += b"/Contents [ %s ] " % streams
        else:
            head += b"/Contents [ %d 0 R %s %d 0 R ] " % (self.wrap, streams, self.tail)
            held = entries.get("/Resources")
            resources = pikepdf.Dictionary(held) if held is not None else pikepdf.Dictionary()
            xobjects = resources.get("/XObject")
            if xobjects is not None:
                del resources["/XObject"]
            others = pikepdf.Dictionary(xobjects).unparse()[2:] if xobjects is not None else b" >>"
            head += (b"/Resources << /XObject << %s %d 0 R" % (STAMP.encode(), stamp)
                     + self._renumber(others, memo, queue) + self._renumber(resources.unparse()[2:], memo, queue)
                     + b" ")
            del entries["/Resources"]
        return b"<< " + head + self._renumber(entries.unparse()[2:], memo, queue)

    # -- stamps --------------------------------------------------------------------------------

    def stamp_slot(self) -> int:
        """A number for a stamp not written yet: give it to `add_pages`, then `stamp` it."""
        return self.reserve()

    def stamp(self, slot: int, src, page, memo: dict) -> None:
        """Write stamp `slot`: page `page` of the pikepdf document `src` as a form XObject. `memo` is
        one dict for all the stamps of that document (its fonts copied once)."""
        import pikepdf

        page.contents_coalesce()
        content = page.obj.Contents.read_bytes()
        queue: list[tuple[int, int]] = []
        resources = page.obj.get("/Resources")
        box = pikepdf.Array(page.mediabox).unparse()
        entries = b"/Type /XObject /Subtype /Form /BBox %s " % box
        if resources is not None:
            entries += b"/Resources " + self._renumber(resources.unparse(), memo, queue) + b" "
        self._stream(content, entries, slot)
        self._drain(src, memo, queue)

    # -- the end -------------------------------------------------------------------------------

    def close(self, order: list[int] | None = None, outline: list[Outline] | None = None,
              info: dict[str, str] | None = None) -> None:
        """Finish the file: its pages in `order` (indices into the pages as added; else as added),
        its bookmarks and document information."""
        import pikepdf

        pages = [self.pages[i] for i in order] if order is not None else self.pages
        kids = b" ".join(b"%d 0 R" % n for n in pages)
        self._object(self.tree, b"<< /Type /Pages /Count %d /Kids [ %s ] >>" % (len(pages), kids))
        catalog = b"<< /Type /Catalog /Pages %d 0 R" % self.tree
        if outline:
            catalog += b" /Outlines %d 0 R /PageMode /UseOutlines" % self._outline(outline, pages)
        self._object(self.root, catalog + b" >>")
        info_num = None
        if info:
            info_num = self.reserve()
            self._object(info_num, b"<< " + b" ".join(b"/%s %s" % (k.encode(), pikepdf.String(v).unparse())
                                                     for k, v in info.items()) + b" >>")
        missing = [n for n, at in enumerate(self.offsets) if at is None and n]
        if missing:
            raise RuntimeError(f"objects reserved and never written: {missing[:10]}")
        start = self.position
        table = [b"xref\n0 %d\n0000000000 65535 f \n" % len(self.offsets)]
        table += [b"%010d 00000 n \n" % at for at in self.offsets[1:]]
        ident = self.digest.hexdigest().encode()
        trailer = b"trailer\n<< /Size %d /Root %d 0 R " % (len(self.offsets), self.root)
        if info_num is not None:
            trailer += b"/Info %d 0 R " % info_num
        trailer += b"/ID [ <%s> <%s> ] >>\nstartxref\n%d\n%%%%EOF\n" % (ident, ident, start)
        self._emit(b"".join(table) + trailer)
        self.file.close()

    def abandon(self) -> None:
        """Close and remove the unfinished file."""
        self.file.close()
        self.path.unlink(missing_ok=True)

    def _outline(self, items: list[Outline], pages: list[int]) -> int:
        """The outline's objects; returns the number of its root."""
        import pikepdf

        root = self.reserve()

        def level(entries: list[Outline], parent: int) -> tuple[int, int, int]:
            nums = [self.reserve() for _ in entries]
            visible = len(entries)
            for k, (item, num) in enumerate(zip(entries, nums)):
                body = b"<< /Title %s /Parent %d 0 R /Dest [ %d 0 R /Fit ]" % (
                    pikepdf.String(item.title).unparse(), parent, pages[item.page])
                if k:
                    body += b" /Prev %d 0 R" % nums[k - 1]
                if k + 1 < len(nums):
                    body += b" /Next %d 0 R" % nums[k + 1]
                if item.children:
                    first, last, count = level(item.children, num)
                    body += b" /First %d 0 R /Last %d 0 R /Count %d" % (first, last, count)
                    visible += count
                self._object(num, body + b" >>")
            return nums[0], nums[-1], visible

        first, last, count = level(items, root)
        self._object(root, b"<< /Type /Outlines /First %d 0 R /Last %d 0 R /Count %d >>" % (first, last, count))
        return root
