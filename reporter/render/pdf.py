"""Print HTML -> PDF bytes with WeasyPrint, fetching only theme files and the configured logo."""

from __future__ import annotations

import contextlib
import gc
import logging
import mimetypes
from pathlib import Path
from typing import TYPE_CHECKING
from urllib.parse import unquote, urlsplit

from reporter.render.pdf_parts import PartsBuild, digest, split_report
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
        pdf = PartsBuild(report, memo, lambda text: _document(text, base_url, fetcher), _files_digest(allowed),
                         volatile).run()
        return pdf, tuple(fetcher.refused)


def _document(html: str, base_url: str, fetcher):
    from weasyprint import HTML  # heavy; only when a PDF is made

    source = HTML(string=html, base_url=base_url, url_fetcher=fetcher)
    return source.render(), source.etree_element


def _files_digest(files: frozenset[Path]) -> bytes:
    from weasyprint import __version__

    return digest("weasyprint", __version__, *(piece for path in sorted(files) for piece in (path, path.read_bytes())))


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
