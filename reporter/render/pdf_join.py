"""One PDF from pages of several WeasyPrint PDFs, with the whole report's anchors and bookmarks.

Pages are copied with pikepdf (qpdf): copying 40 pages takes it a tenth of a second, where a pure
Python PDF library took seconds. Internal links in WeasyPrint's pages name their target
(`/Dest (id)`), so they work once the joined file's name tree holds every anchor; the outline is
rebuilt from the bookmarks of all pages by WeasyPrint's own nesting rule, as one document has it.
"""

from __future__ import annotations

import io
import warnings
from types import SimpleNamespace

_PT_PER_PX = 0.75  # WeasyPrint: 1 CSS px = 0.75 pt at zoom 1


def join_pages(sources: list[tuple[bytes, int, int]], page_facts: list[dict], info_from: bytes) -> bytes:
    """`sources`: (PDF bytes, first page index, number of pages), in order; `page_facts`: per page of the
    result, its height and anchors and bookmarks in CSS px (pdf_parts.page_facts); `info_from`: the PDF
    whose metadata and language the result keeps."""
    import pikepdf

    out = pikepdf.new()
    opened: dict[int, pikepdf.Pdf] = {}
    for blob, first, count in sources:
        source = opened.get(id(blob))
        if source is None:
            source = opened[id(blob)] = pikepdf.open(io.BytesIO(blob))
        with warnings.catch_warnings():  # "named destinations are not preserved": they are made below
            warnings.simplefilter("ignore", pikepdf.PageCopyWarning)
            out.pages.extend(source.pages[first : first + count])
    if len(out.pages) != len(page_facts):
        raise ValueError(f"joined {len(out.pages)} pages, expected {len(page_facts)}")

    dests = pikepdf.NameTree.new(out)
    for number, facts in enumerate(page_facts):
        height = facts["height"]
        for name, (x, y) in facts["anchors"].items():
            if name not in dests:  # as WeasyPrint: the first anchor of a name wins
                dests[name] = pikepdf.Array([out.pages[number].obj, pikepdf.Name.XYZ,
                                             x * _PT_PER_PX, (height - y) * _PT_PER_PX, 0])
    out.Root.Names = pikepdf.Dictionary(Dests=dests.obj)
    _add_outline(out, page_facts)

    info = opened.get(id(info_from)) or pikepdf.open(io.BytesIO(info_from))
    for key, value in info.docinfo.items():
        out.docinfo[key] = pikepdf.String(str(value))
    if "/Lang" in info.Root:
        out.Root.Lang = pikepdf.String(str(info.Root.Lang))
    buffer = io.BytesIO()
    out.save(buffer, deterministic_id=True, object_stream_mode=pikepdf.ObjectStreamMode.generate)
    return buffer.getvalue()


def _add_outline(out, page_facts: list[dict]) -> None:
    import pikepdf
    from weasyprint.document import Document

    pages = [SimpleNamespace(height=f["height"],
                             bookmarks=[(level, label, (x, y), state) for level, label, x, y, state in f["bookmarks"]])
             for f in page_facts]
    tree = Document.make_bookmark_tree(SimpleNamespace(pages=pages), scale=_PT_PER_PX, transform_pages=True)

    def items(subtrees) -> list:
        made = []
        for label, (page_number, x, y), children, state in subtrees:
            item = pikepdf.OutlineItem(label, page_number, "XYZ", left=x, top=y)
            item.children.extend(items(children))
            item.is_closed = state == "closed"
            made.append(item)
        return made

    with out.open_outline() as outline:
        outline.root.extend(items(tree))
