"""ReportContext -> one self-contained HTML document through the theme's report.html."""

from __future__ import annotations

import jinja2

from reporter.render.context import ReportContext
from reporter.render.themes import Theme, ThemeError

ENTRY_TEMPLATE = "report.html"


def render_html(context: ReportContext, env: jinja2.Environment, theme: Theme, entry: str = ENTRY_TEMPLATE) -> str:
    """Render the theme's entry template (report.html, or brief.html for a department brief); any template
    failure becomes a ThemeError naming the template."""
    try:
        return env.get_template(entry).render(report=context)
    except jinja2.TemplateNotFound as exc:
        raise ThemeError(
            f"theme {theme.name!r}: template {exc.name!r} not found in the theme folders "
            f"({', '.join(str(f) for f in theme.folders)}); templates cannot read files outside them"
        ) from None
    except jinja2.TemplateSyntaxError as exc:
        raise ThemeError(f"theme {theme.name!r}: {exc.filename or exc.name}:{exc.lineno}: {exc.message}") from None
    except jinja2.TemplateError as exc:
        # UndefinedError, SecurityError (sandbox) and the like: a theme bug, reported by name.
        raise ThemeError(f"theme {theme.name!r}: {type(exc).__name__}: {exc}") from None
