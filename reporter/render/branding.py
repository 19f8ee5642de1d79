"""Institution branding and the theme's styles as the templates see them.

The logo is read from a local file and inlined as a data: URI, so the HTML report
needs nothing beside it; fonts a theme ships are inlined the same way.
"""

from __future__ import annotations

import base64
from pathlib import Path

from markupsafe import Markup

from reporter.render.context import Branding, ThemeView
from reporter.render.themes import Theme, ThemeError

MAX_LOGO_BYTES = 2_000_000  # a cover logo; anything larger is almost certainly the wrong file
LOGO_TYPES = {".png": "image/png", ".jpg": "image/jpeg", ".jpeg": "image/jpeg", ".gif": "image/gif",
              ".svg": "image/svg+xml", ".webp": "image/webp"}
FONT_TYPES = {".woff2": ("font/woff2", "woff2"), ".woff": ("font/woff", "woff"),
              ".ttf": ("font/ttf", "truetype"), ".otf": ("font/otf", "opentype")}


def data_uri(path: Path, mime: str) -> str:
    return f"data:{mime};base64,{base64.b64encode(path.read_bytes()).decode('ascii')}"


def logo_path(report: object) -> Path | None:
    """The configured logo as a checked local file, or None."""
    logo = getattr(report, "logo", None)
    if logo is None:
        return None
    path = Path(logo)
    if path.suffix.lower() not in LOGO_TYPES:
        raise ThemeError(f"report.logo: expected a {', '.join(sorted(LOGO_TYPES))} file, got {path.name!r}")
    if not path.is_file():
        raise ThemeError(f"report.logo: file not found: {path}")
    if path.stat().st_size > MAX_LOGO_BYTES:
        raise ThemeError(f"report.logo: {path.name} is larger than {MAX_LOGO_BYTES // 1_000_000} MB")
    return path.resolve()


def build_branding(report: object) -> Branding:
    path = logo_path(report)
    uri = data_uri(path, LOGO_TYPES[path.suffix.lower()]) if path is not None else None
    return Branding(institution=report.institution, logo_data_uri=uri, accent_colour=report.accent_colour)


def build_theme_view(theme: Theme, report: object, medium: str) -> ThemeView:
    """CSS for one medium: custom properties from the palette, then the theme's cascading stylesheet."""
    pal, fonts = theme.palette, theme.fonts
    variables = {
        "--ink": pal["ink"], "--muted": pal["muted"], "--rule": pal["rule"], "--paper": pal["paper"],
        "--wash": pal["wash"], "--too-small": pal["too_small"], "--accent": report.accent_colour,
        "--series-1": pal["categorical"][0], "--series-2": pal["categorical"][1],
        "--font-body": fonts["body"], "--font-heading": fonts["heading"], "--font-mono": fonts["mono"],
    }
    # Values are checked colours and font stacks (themes.py), so they cannot close the rule.
    root = ":root {\n" + "".join(f"  {k}: {v};\n" for k, v in variables.items()) + "}\n"
    # Print styles refine the screen styles; the HTML file carries them too, for printing from a browser.
    if medium == "print":
        css = f"@page {{ size: {theme.page_size}; }}\n" + root + theme.stylesheet("screen.css") + theme.stylesheet("print.css")
    else:
        css = root + theme.stylesheet("screen.css") + "\n@media print {\n" + theme.stylesheet("print.css") + "\n}\n"
    return ThemeView(css=Markup(css), font_css=Markup(_font_faces(theme)), page_size=theme.page_size, medium=medium)


def _font_faces(theme: Theme) -> str:
    rules = []
    for font in theme.font_files:
        path = theme.find(font.file)
        mime, fmt = FONT_TYPES[path.suffix.lower()]
        rules.append(
            f'@font-face {{ font-family: "{font.family}"; src: url({data_uri(path, mime)}) format("{fmt}"); '
            f"font-weight: {font.weight}; font-style: {font.style}; }}"
        )
    return "\n".join(rules)
