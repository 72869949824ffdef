"""The package's PDF writer (build/pdfwrite.py): pages copied one source at a time, straight to the file.

The files are read back with pypdf, an independent reader, against ISO 32000-1 (PDF 1.7): the
cross-reference table (7.5.4), the page tree and inheritable page attributes (7.7.3.3, 7.7.3.4),
destinations (12.3.2), the outline (12.3.3) and form XObjects (8.10)."""

from __future__ import annotations

import re
from pathlib import Path

import pikepdf
import pytest
from pypdf import PdfReader

from timbersheets.build.pdfwrite import Outline, PdfWriter


def make_pdf(path: Path, texts: list[str]) -> Path:
    """A PDF of one page a text, each in Helvetica (a standard font: nothing embedded)."""
    pdf = pikepdf.new()
    font = pdf.make_indirect(pikepdf.Dictionary(Type=pikepdf.Name.Font, Subtype=pikepdf.Name.Type1,
                                                BaseFont=pikepdf.Name.Helvetica))
    resources = pdf.make_indirect(pikepdf.Dictionary(Font=pikepdf.Dictionary(F1=font)))
    for text in texts:
        page = pikepdf.Page(pikepdf.Dictionary(Type=pikepdf.Name.Page, MediaBox=[0, 0, 612, 792],
                                               Resources=resources))
        page.obj.Contents = pdf.make_stream(f"BT /F1 12 Tf 72 700 Td ({text}) Tj ET".encode())
        pdf.pages.append(page)
    pdf.save(path)
    return path


def raw_pdf(objects: list[bytes]) -> bytes:
    """A PDF written by hand: object n+1 is objects[n], the catalog is object 1."""
    out = b"%PDF-1.4\n"
    offsets = []
    for num, body in enumerate(objects, start=1):
        offsets.append(len(out))
        out += b"%d 0 obj\n" % num + body + b"\nendobj\n"
    start = len(out)
    out += b"xref\n0 %d\n0000000000 65535 f \n" % (len(objects) + 1)
    out += b"".join(b"%010d 00000 n \n" % at for at in offsets)
    return out + b"trailer\n<< /Size %d /Root 1 0 R >>\nstartxref\n%d\n%%%%EOF\n" % (len(objects) + 1, start)


def page_texts(path: Path) -> list[str]:
    return [page.extract_text().strip() for page in PdfReader(str(path), strict=True).pages]


def test_pages_copied_from_sources_read_as_their_sources(tmp_path):
    a = make_pdf(tmp_path / "a.pdf", ["first of a", "second of a"])
    b = tmp_path / "b.pdf"  # its size and resources held by the page tree, as a page may have them (7.7.3.4)
    b.write_bytes(raw_pdf([
        b"<< /Type /Catalog /Pages 2 0 R >>",
        b"<< /Type /Pages /Kids [ 3 0 R ] /Count 1 /MediaBox [ 0 0 396 612 ] "
        b"/Resources << /Font << /F1 << /Type /Font /Subtype /Type1 /BaseFont /Helvetica >> >> >> >>",
        b"<< /Type /Page /Parent 2 0 R /Contents 4 0 R >>",
        b"<< /Length 43 >>\nstream\nBT /F1 12 Tf 72 700 Td (only of b) Tj ET\nendstream"]))
    writer = PdfWriter(tmp_path / "out.pdf")
    for path in (a, b):
        with pikepdf.open(path) as src:
            writer.add_pages(src)
    writer.close()  # the sources are closed already: nothing of them is held
    assert page_texts(tmp_path / "out.pdf") == ["first of a", "second of a", "only of b"]
    with pikepdf.open(tmp_path / "out.pdf") as out:
        own = out.pages[2].obj  # inherited from b's page tree, now the page's own
        assert [float(v) for v in own["/MediaBox"]] == [0, 0, 396, 612] and "/Font" in own["/Resources"]


def test_a_stream_whose_length_is_a_reference_is_written_with_its_length(tmp_path):
    """A stream's /Length may be an indirect object (7.3.8.2); the copy's is the length itself."""
    content = b"BT /F1 12 Tf 72 700 Td (held apart) Tj ET"
    (tmp_path / "a.pdf").write_bytes(raw_pdf([
        b"<< /Type /Catalog /Pages 2 0 R >>",
        b"<< /Type /Pages /Kids [ 3 0 R ] /Count 1 >>",
        b"<< /Type /Page /Parent 2 0 R /MediaBox [ 0 0 612 792 ] /Contents 4 0 R "
        b"/Resources << /Font << /F1 << /Type /Font /Subtype /Type1 /BaseFont /Helvetica >> >> >> >>",
        b"<< /Length 5 0 R >>\nstream\n" + content + b"\nendstream",
        b"%d" % len(content)]))
    writer = PdfWriter(tmp_path / "out.pdf")
    with pikepdf.open(tmp_path / "a.pdf") as pdf:
        writer.add_pages(pdf)
    writer.close()
    data = (tmp_path / "out.pdf").read_bytes()
    assert re.search(rb"<< /Length %d >>\nstream\n" % len(content) + re.escape(content), data)
    assert page_texts(tmp_path / "out.pdf") == ["held apart"]


def test_every_cross_reference_points_at_its_object(tmp_path):
    """ISO 32000-1 7.5.4: each in-use entry is the byte offset of the object's `n 0 obj` line."""
    src = make_pdf(tmp_path / "a.pdf", ["one", "two"])
    writer = PdfWriter(tmp_path / "out.pdf")
    with pikepdf.open(src) as pdf:
        writer.add_pages(pdf)
    writer.close(info={"Title": "Hall — roof"})
    data = (tmp_path / "out.pdf").read_bytes()
    start = int(re.search(rb"startxref\n(\d+)\n%%EOF\n$", data).group(1))
    table = data[start:].split(b"trailer")[0].splitlines()
    assert table[0] == b"xref" and table[2] == b"0000000000 65535 f "
    count = int(table[1].split()[1])
    entries = table[3:3 + count - 1]
    assert len(entries) == count - 1
    for num, entry in enumerate(entries, start=1):
        offset = int(entry[:10])
        assert data[offset:].startswith(b"%d 0 obj\n" % num), num
    assert PdfReader(str(tmp_path / "out.pdf")).metadata.title == "Hall — roof"


def test_a_reference_written_inside_a_string_is_left_as_written(tmp_path):
    """A literal string reading like a reference ('3 0 R') is text, not a reference (7.3.4.2)."""
    src = make_pdf(tmp_path / "a.pdf", ["page"])
    with pikepdf.open(src, allow_overwriting_input=True) as pdf:
        note = pdf.make_indirect(pikepdf.Dictionary(Type=pikepdf.Name.Annot, Subtype=pikepdf.Name.Text,
                                                    Rect=[0, 0, 10, 10], Contents=pikepdf.String("see 3 0 R (and 1 0 R)")))
        pdf.pages[0].obj.Annots = pikepdf.Array([note])
        pdf.save(src)
    writer = PdfWriter(tmp_path / "out.pdf")
    with pikepdf.open(src) as pdf:
        writer.add_pages(pdf)
    writer.close()
    with pikepdf.open(tmp_path / "out.pdf") as out:
        assert str(out.pages[0].obj.Annots[0].Contents) == "see 3 0 R (and 1 0 R)"


def test_a_link_to_a_page_lands_on_that_page_of_the_copy(tmp_path):
    """A destination names its page object (12.3.2.2): after the copy, the copied page."""
    src = make_pdf(tmp_path / "b.pdf", ["from here", "to here"])
    with pikepdf.open(src, allow_overwriting_input=True) as pdf:
        link = pikepdf.Dictionary(Type=pikepdf.Name.Annot, Subtype=pikepdf.Name.Link, Rect=[0, 0, 10, 10],
                                  Dest=pikepdf.Array([pdf.pages[1].obj, pikepdf.Name.Fit]))
        pdf.pages[0].obj.Annots = pikepdf.Array([pdf.make_indirect(link)])
        pdf.save(src)
    writer = PdfWriter(tmp_path / "out.pdf")
    with pikepdf.open(make_pdf(tmp_path / "a.pdf", ["before"])) as pdf:
        writer.add_pages(pdf)
    with pikepdf.open(src) as pdf:
        writer.add_pages(pdf)
    writer.close()
    with pikepdf.open(tmp_path / "out.pdf") as out:
        target = out.pages[1].obj.Annots[0].Dest[0]
        assert target.objgen == out.pages[2].obj.objgen


def test_a_stamp_is_drawn_over_its_page_and_its_font_written_once(tmp_path):
    """The stamp is a form XObject (8.10) the page draws after its own content."""
    sheets = make_pdf(tmp_path / "sheets.pdf", ["sheet one", "sheet two"])
    stamps = make_pdf(tmp_path / "stamps.pdf", ["page 5 of 6", "page 6 of 6"])
    writer = PdfWriter(tmp_path / "out.pdf")
    with pikepdf.open(sheets) as pdf:
        slots = [writer.stamp_slot() for _ in pdf.pages]
        writer.add_pages(pdf, stamps=slots)
    with pikepdf.open(stamps) as pdf:
        memo: dict = {}
        for slot, page in zip(slots, pdf.pages):
            writer.stamp(slot, pdf, page, memo)
    writer.close()
    texts = page_texts(tmp_path / "out.pdf")
    assert texts[0].startswith("sheet one") and texts[0].endswith("page 5 of 6")
    assert texts[1].startswith("sheet two") and texts[1].endswith("page 6 of 6")
    data = (tmp_path / "out.pdf").read_bytes()
    assert data.count(b"/BaseFont /Helvetica") == 2  # the sheets' own and the stamps' (once for both pages)


def test_a_stamp_never_written_stops_the_file(tmp_path):
    writer = PdfWriter(tmp_path / "out.pdf")
    with pikepdf.open(make_pdf(tmp_path / "a.pdf", ["one"])) as pdf:
        writer.add_pages(pdf, stamps=[writer.stamp_slot()])
    with pytest.raises(RuntimeError, match="never written"):
        writer.close()
    writer.abandon()
    assert not (tmp_path / "out.pdf").exists()


def test_pages_go_in_the_order_given_and_bookmarks_open_their_pages(tmp_path):
    """The outline's items (12.3.3) open the pages they name, in the order the file shows them."""
    writer = PdfWriter(tmp_path / "out.pdf")
    with pikepdf.open(make_pdf(tmp_path / "s.pdf", ["sheet A", "sheet B"])) as pdf:
        writer.add_pages(pdf)
    with pikepdf.open(make_pdf(tmp_path / "f.pdf", ["cover"])) as pdf:
        writer.add_pages(pdf)
    writer.close([2, 0, 1], [Outline("Cover", 0), Outline("Member sheets", 1, [Outline("A — passes", 1),
                                                                               Outline("B — passes", 2)])])
    assert page_texts(tmp_path / "out.pdf") == ["cover", "sheet A", "sheet B"]
    reader = PdfReader(str(tmp_path / "out.pdf"), strict=True)
    top = reader.outline
    assert [top[0].title, top[1].title] == ["Cover", "Member sheets"]
    assert [item.title for item in top[2]] == ["A — passes", "B — passes"]
    assert [reader.get_destination_page_number(item) for item in (top[0], top[1], *top[2])] == [0, 1, 1, 2]
