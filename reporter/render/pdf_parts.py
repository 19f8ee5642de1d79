"""The printed report in parts that each start on a page of their own, laid out only when they change.

A rebuild after a small edit (a department alias, say) prints most sections exactly as before. The
report is split at its top-level sections; a run of sections whose first one begins on a page of its
own (a forced page break, nothing of the part before on that page) is a *part*. Each build lays out
one *sparse* document: the real cover and contents, the parts that changed, and, in place of each
part whose pages are kept from an earlier build, as many empty pages as it fills, holding its anchors
where they fall. Page numbers, "page N of M", the contents' page references and running heads
are therefore those of the whole report, and the pages of kept parts are taken from their earlier
PDF (pdf_join.py puts the pages together).

What a kept part's pages depend on is in its key: the part's HTML, the document head and cover with
the build time taken out, the closing tags, the theme files and logo, WeasyPrint's version, the page
it starts on, the number of pages, and the pages of the anchors it links to. A theme must therefore
not carry the build time, or a CSS counter other than the page counters, from the cover into the
sections; the default and compact themes do neither (the compact theme has no forced breaks, so its
report is one part, laid out whole each time).

Anything unexpected (a part that fills more or fewer pages than before, a section sharing a page
with the part before) makes the build lay out the whole document, as a first build does.
`PartsBuild` (at the end) is one such build; render/pdf.py calls it with WeasyPrint set up.
"""

from __future__ import annotations

import hashlib
import logging
import re
from dataclasses import dataclass
from typing import TYPE_CHECKING, Callable

from reporter.render.pdf_join import join_pages

if TYPE_CHECKING:
    from reporter.render.pdf_memo import PdfMemo

LOGGER = logging.getLogger("reporter.render.pdf")  # one logger for report.pdf, however it is made

SECTION_OPEN = re.compile(r'<section class="section[ "]')
_FORCED = {"page", "left", "right", "recto", "verso"}
_HREF = re.compile(r'href="#([^"]+)"')
_ID = re.compile(r'\sid="([^"]+)"')
STUB_CLASS = "waymark-print-stub"
VOLATILE_TOKEN = "\x00build-time\x00"


@dataclass(frozen=True)
class PrintedReport:
    """The printed HTML cut into the text before the first section, the sections, and the rest."""

    prefix: str
    sections: tuple[str, ...]
    suffix: str

    @property
    def html(self) -> str:
        return self.prefix + "".join(self.sections) + self.suffix


def split_report(html: str) -> PrintedReport | None:
    """None when the HTML has no top-level `<section class="section ...">` inside `<main>`."""
    starts = [m.start() for m in SECTION_OPEN.finditer(html)]
    end = html.rfind("</main>")
    if not starts or end < starts[-1]:
        return None
    bounds = starts + [end]
    return PrintedReport(html[: starts[0]], tuple(html[a:b] for a, b in zip(bounds, bounds[1:])), html[end:])


def digest(*pieces: object) -> bytes:
    h = hashlib.sha256()
    for piece in pieces:
        h.update(piece if isinstance(piece, bytes) else str(piece).encode("utf-8", "surrogatepass"))
        h.update(b"\x00\x1f")
    return h.digest()


@dataclass
class Part:
    """Sections [first, last] of the report; part 0 is the cover and contents (no sections)."""

    first: int
    last: int
    html: str
    layout_key: bytes
    facts: dict | None = None  # {"pages": [{"height", "anchors": {id: [x, y]}, "bookmarks": [...]}, ...]}
    start: int = 0  # 0-based index of its first page in the whole report
    rendered: bool = False
    source: tuple[bytes, int] | None = None  # (PDF its pages are taken from, index of its first page there)

    @property
    def n_pages(self) -> int:
        return len(self.facts["pages"]) if self.facts else 0

    def anchor_ids(self) -> list[str]:
        return _ID.findall(self.html)

    def links_out(self) -> list[str]:
        own = set(self.anchor_ids())
        return sorted({name for name in _HREF.findall(self.html) if name not in own})


def section_heads(report: PrintedReport) -> tuple[str, ...]:
    """What decides whether a section forces a page break: its opening tag and first heading."""
    heads = []
    for section in report.sections:
        close = section.find("</h2>")
        heads.append(section[: close if 0 <= close < 600 else 300])
    return tuple(heads)


_MARGIN_BOXES = ("top-left-corner", "top-left", "top-center", "top-right", "top-right-corner", "right-top",
                 "right-middle", "right-bottom", "bottom-right-corner", "bottom-right", "bottom-center",
                 "bottom-left", "bottom-left-corner", "left-bottom", "left-middle", "left-top")
# Stub pages are thrown away: their running heads and page numbers need no layout (a third of a
# rebuild's PDF time). A named page outranks the theme's plain @page rules.
STUB_PAGE_STYLE = ("<style>@page waymark-print-stub { "
                   + " ".join(f"@{box} {{ content: none; }}" for box in _MARGIN_BOXES) + " }</style>")


def stub_pages(pages: list[list[str]]) -> str:
    """Empty pages, each holding the given anchors (ids) at its top."""
    style = "page: waymark-print-stub; break-before: page; height: 0; margin: 0; padding: 0; border: 0"
    return "".join(f'<div class="{STUB_CLASS}" style="{style}">' + "".join(f'<span id="{a}"></span>' for a in ids)
                   + "</div>" for ids in pages)


def sparse_document(report: PrintedReport, parts: list[Part]) -> str:
    """The cover and contents, the parts to lay out, and empty pages in place of the parts kept."""
    pieces = [report.prefix, STUB_PAGE_STYLE]
    for part in parts[1:]:
        if part.rendered:
            pieces.append(part.html)
        else:
            pages: list[list[str]] = [[] for _ in range(part.n_pages)]
            for name, (offset, _x, _y) in part_anchor_pages(part).items():
                pages[offset].append(name)
            pieces.append(stub_pages(pages))
    pieces.append(report.suffix)
    return "".join(pieces)


def part_anchor_pages(part: Part) -> dict[str, tuple[int, float, float]]:
    found: dict[str, tuple[int, float, float]] = {}
    for offset, page in enumerate(part.facts["pages"]):
        for name, (x, y) in page["anchors"].items():
            found.setdefault(name, (offset, x, y))
    return found


def page_facts(page) -> dict:
    """What the report needs of a laid-out WeasyPrint page to join it with others (CSS px)."""
    return {
        "height": page.height,
        "anchors": {name: [values[0], values[1]] for name, values in page.anchors.items()},
        "bookmarks": [[level, label, x, y, state] for level, label, (x, y), state in page.bookmarks],
    }


def section_pages(document, html_root, indices: list[int]) -> tuple[list[set[int]], dict[int, bool]] | None:
    """For each page, the sections with content on it (-1: the cover and contents, or a stub), and for
    each section whether its box forces a page break before it. `indices` are the report's section
    numbers of the sections the document holds, in order. None: they were not found."""
    owner: dict[int, int] = {}
    parent = {id(child): element for element in html_root.iter() for child in element}
    sections = [el for el in html_root.iter("section") if SECTION_OPEN.match(f'<section class="{el.get("class")}"')]
    # Top-level sections only: a section nested in another belongs to it.
    nested = {id(inner) for outer in sections for inner in outer.iter("section") if inner is not outer}
    sections = [el for el in sections if id(el) not in nested]
    if len(sections) != len(indices):
        return None
    for index, section in zip(indices, sections):
        for element in section.iter():
            owner[id(element)] = index
    by_index = dict(zip(indices, sections))
    containers: set[int] = set()  # html, body, main: their boxes are on every page
    element = parent.get(id(sections[0])) if sections else None
    while element is not None:
        containers.add(id(element))
        element = parent.get(id(element))
    forced = dict.fromkeys(indices, False)
    seen: set[int] = set()
    pages: list[set[int]] = []
    for page in document.pages:
        present: set[int] = set()
        for box in page._page_box.descendants():
            element = getattr(box, "element", None)
            if element is None or id(element) in containers:
                continue
            index = owner.get(id(element), -1)
            present.add(index)
            if index >= 0 and index not in seen and element is by_index[index]:
                seen.add(index)
                children = [child for child in getattr(box, "children", ()) if getattr(child, "element", None) is not None]
                styles = [box.style, children[0].style] if children else [box.style]
                forced[index] = any(style["break_before"] in _FORCED for style in styles)
        pages.append(present)
    return pages, forced


class PartsBuild:
    """One build of report.pdf from parts: kept pages where nothing changed, one layout for the rest."""

    def __init__(self, report: PrintedReport, memo: "PdfMemo", lay_out: Callable[[str], tuple], files: bytes,
                 volatile: tuple[str, ...]):
        """`lay_out(html)` is WeasyPrint's (document, root element); `files` a digest of the theme files, logo
        and WeasyPrint's version; `volatile`: strings of the cover that differ on every build."""
        self.report, self.memo, self.lay_out = report, memo, lay_out
        stable_prefix = report.prefix
        for text in volatile:
            stable_prefix = stable_prefix.replace(text, VOLATILE_TOKEN) if text else stable_prefix
        self.context = digest(files, stable_prefix, report.suffix)
        self.heads = section_heads(report)
        self.plan_key = digest(self.context, "plan", *self.heads)
        self._blobs: dict[str, bytes | None] = {}

    def run(self) -> bytes:
        plan = self.memo.facts(self.plan_key)
        if plan is not None:
            pdf = self._sparse(self._parts(plan["starts"]))
            if pdf is not None:
                return pdf
            LOGGER.debug("report.pdf: the parts did not fall on the pages they had before")
        return self._whole()

    # -- parts and their keys

    def _parts(self, starts: list[int]) -> list[Part]:
        n = len(self.report.sections)
        parts = [Part(-1, -1, "", digest(self.context, "cover"))]
        for first, end in zip(starts, starts[1:] + [n]):
            html = "".join(self.report.sections[first:end])
            parts.append(Part(first, end - 1, html, digest(self.context, "part", html)))
        for part in parts:
            part.facts = self.memo.facts(part.layout_key)
        return parts

    def _guess_key(self, part: Part) -> bytes:
        return digest(self.context, "last", self.heads[part.first])

    def _place(self, parts: list[Part]) -> int:
        start = 0
        for part in parts:
            part.start = start
            start += part.n_pages
        return start

    def _refs(self, part: Part, parts: list[Part]) -> list:
        where: dict[str, int] = {}
        for other in parts:
            if other is not part and other.facts:
                for name, (offset, _x, _y) in part_anchor_pages(other).items():
                    where.setdefault(name, other.start + offset)
        return [(name, where.get(name)) for name in part.links_out()]

    def _pages_key(self, part: Part, parts: list[Part], total: int) -> bytes:
        return digest(part.layout_key, part.start, total, self._refs(part, parts))

    def _blob(self, key: str) -> bytes | None:
        """A kept PDF, read once however many parts it holds (the join copies its fonts once)."""
        if key not in self._blobs:
            self._blobs[key] = self.memo.part(bytes.fromhex(key))
        return self._blobs[key]

    # -- builds

    def _sparse(self, parts: list[Part]) -> bytes | None:
        """Lay out the cover and the changed parts only; None when a part did not fill its pages as before."""
        if parts[0].facts is None:
            return None
        parts[0].rendered = True
        for part in parts[1:]:
            if part.facts is None:
                part.facts = self.memo.facts(self._guess_key(part))  # its page count the last time
                if part.facts is None:
                    return None
                part.rendered = True
        total = self._place(parts)
        keys = {}
        for part in parts[1:]:
            keys[id(part)] = self._pages_key(part, parts, total)
            kept = None if part.rendered else self.memo.facts(keys[id(part)])
            blob = self._blob(kept["blob"]) if kept else None
            if blob is None:
                part.rendered = True
            else:
                part.source = (blob, kept["first"])
        rendered = [p for p in parts[1:] if p.rendered]
        LOGGER.debug("report.pdf: laying out %d of %d parts", len(rendered), len(parts) - 1)
        document, root = self.lay_out(sparse_document(self.report, parts))
        if len(document.pages) != total:
            return None
        indices = [i for p in rendered for i in range(p.first, p.last + 1)]
        found = section_pages(document, root, indices)
        if found is None:
            return None
        pages, _forced = found
        for part in rendered:
            own = set(range(part.first, part.last + 1))
            expected = range(part.start, part.start + part.n_pages)
            if {n for n, present in enumerate(pages) if present & own} != set(expected):
                return None
            if any(pages[n] - own for n in expected):
                return None
            part.facts = {"pages": [page_facts(document.pages[n]) for n in expected]}
        parts[0].facts = {"pages": [page_facts(document.pages[n]) for n in range(parts[0].n_pages)]}
        # A kept part's contents may name pages of anchors in a part laid out now: they must not have moved.
        if any(keys[id(p)] != self._pages_key(p, parts, total) for p in parts[1:] if not p.rendered):
            return None
        blob = document.write_pdf()
        self._remember(parts, blob, total, rendered)
        return self._join(parts, blob)

    def _whole(self) -> bytes:
        """Lay out the whole report, find its parts, and keep them for the next build."""
        LOGGER.debug("report.pdf: laying out the whole report")
        n = len(self.report.sections)
        document, root = self.lay_out(self.report.html)
        blob = document.write_pdf()
        found = section_pages(document, root, list(range(n)))
        if found is None:
            return blob
        pages, forced = found
        first_page = {i: min(p for p, present in enumerate(pages) if i in present) for i in range(n)
                      if any(i in present for present in pages)}
        if len(first_page) != n:
            return blob
        starts = [k for k in range(n) if forced[k]
                  and not any(min(present) < k <= max(present) for present in pages if present)]
        if not starts or starts[0] != 0:
            return blob  # the cover shares a page with the first section: one part, laid out each time
        parts = self._parts(starts)
        bounds = [0] + [first_page[part.first] for part in parts[1:]] + [len(document.pages)]
        for part, a, b in zip(parts, bounds, bounds[1:]):
            part.facts = {"pages": [page_facts(document.pages[p]) for p in range(a, b)]}
            part.rendered = True
        total = self._place(parts)
        self.memo.put_facts(self.plan_key, {"starts": starts})
        self._remember(parts, blob, total, parts[1:])
        return self._join(parts, blob)

    def _remember(self, parts: list[Part], blob: bytes, total: int, rendered: list[Part]) -> None:
        self.memo.put_facts(parts[0].layout_key, parts[0].facts)
        if not rendered:  # only the cover, whose build time is new each time: nothing to keep
            return
        blob_key = digest("pdf", blob)
        self.memo.put_part(blob_key, blob)
        for part in rendered:
            part.source = (blob, part.start)
            self.memo.put_facts(part.layout_key, part.facts)
            self.memo.put_facts(self._guess_key(part), part.facts)
            self.memo.put_facts(self._pages_key(part, parts, total), {"blob": blob_key.hex(), "first": part.start})

    def _join(self, parts: list[Part], blob: bytes) -> bytes:
        parts[0].source = (blob, 0)
        sources = [(p.source[0], p.source[1], p.n_pages) for p in parts]
        facts = [page for p in parts for page in p.facts["pages"]]
        return join_pages(sources, facts, info_from=blob)
