"""Print HTML -> PDF bytes with WeasyPrint, fetching only theme files and the configured logo."""

from __future__ import annotations

import contextlib
import gc
import logging
import mimetypes
from pathlib import Path
from typing import TYPE_CHECKING
from urllib.parse import unquote, urlsplit

from reporter.render.pdf_join import join_pages
from reporter.render.pdf_parts import (
    VOLATILE_TOKEN, Part, PrintedReport, digest, page_facts, part_anchor_pages, section_heads, section_pages,
    sparse_document, split_report,
)
from reporter.render.themes import Theme

if TYPE_CHECKING:
    from reporter.render.pdf_memo import PdfMemo

LOGGER = logging.getLogger(__name__)


def _fetcher_class():
    from weasyprint.urls import URLFetcher, URLFetcherResponse

    class LocalOnlyFetcher(URLFetcher):
        """Serves data: URIs and an explicit set of local files; refuses every other URL."""

        def __init__(self, allowed: frozenset[Path]):
            super().__init__(allowed_protocols=("data", "file"), allow_redirects=False)
            self.allowed = allowed
            self.refused: list[str] = []

        def fetch(self, url: str, headers: dict | None = None):
            if url.startswith("data:"):
                return super().fetch(url, headers)
            parts = urlsplit(url)
            if parts.scheme == "file":
                path = Path(unquote(parts.path)).resolve()
                if path in self.allowed:
                    mime = mimetypes.guess_type(path.name)[0] or "application/octet-stream"
                    return URLFetcherResponse(url, path.read_bytes(), {"Content-Type": mime})
            self.refused.append(url)
            LOGGER.warning("report.pdf: refused to fetch %s (only theme files and the logo are allowed)", url)
            raise ValueError(f"refused: {url}")

    return LocalOnlyFetcher


def allowed_files(theme: Theme, logo: Path | None) -> frozenset[Path]:
    files = {p.resolve() for folder in theme.folders for p in folder.rglob("*") if p.is_file()}
    # A symlink leading out of the theme folder resolves elsewhere; keep only what stays inside.
    files = {p for p in files if any(p.is_relative_to(folder) for folder in theme.folders)}
    if logo is not None:
        files.add(logo.resolve())
    return frozenset(files)


def render_pdf(html: str, theme: Theme, logo: Path | None, memo: "PdfMemo | None" = None,
               volatile: tuple[str, ...] = ()) -> tuple[bytes, tuple[str, ...]]:
    """The PDF bytes and the URLs that were refused (empty for a well-made theme).

    With a `memo`, the pages of sections printed as before are taken from an earlier build
    (pdf_parts.py); `volatile` are strings of the cover that differ on every build (the build time).
    """
    allowed = allowed_files(theme, logo)
    fetcher = _fetcher_class()(allowed)
    base_url = theme.folders[0].as_uri() + "/"
    report = split_report(html) if memo is not None else None
    with _collection_paused():
        if report is None:
            return _document(html, base_url, fetcher)[0].write_pdf(), tuple(fetcher.refused)
        pdf = PartsBuild(report, memo, base_url, fetcher, _files_digest(allowed), volatile).run()
        return pdf, tuple(fetcher.refused)


def _document(html: str, base_url: str, fetcher):
    from weasyprint import HTML  # heavy; only when a PDF is made

    source = HTML(string=html, base_url=base_url, url_fetcher=fetcher)
    return source.render(), source.etree_element


def _files_digest(files: frozenset[Path]) -> bytes:
    from weasyprint import __version__

    return digest("weasyprint", __version__, *(piece for path in sorted(files) for piece in (path, path.read_bytes())))


class PartsBuild:
    """One build of report.pdf from parts: kept pages where nothing changed, one layout for the rest."""

    def __init__(self, report: PrintedReport, memo: "PdfMemo", base_url: str, fetcher, files: bytes,
                 volatile: tuple[str, ...]):
        self.report, self.memo, self.base_url, self.fetcher = report, memo, base_url, fetcher
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
        document, root = _document(sparse_document(self.report, parts), self.base_url, self.fetcher)
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
        document, root = _document(self.report.html, self.base_url, self.fetcher)
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


@contextlib.contextmanager
def _collection_paused():
    """Python's cycle collector off while WeasyPrint lays out the document.

    Layout makes and keeps hundreds of thousands of small objects, and each of the collector's
    full passes walks them all again, with everything the build holds besides (bench/README.md:
    an eighth of the PDF's time). Its cyclic garbage is collected once the collector is back on.
    """
    enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if enabled:
            gc.enable()
