"""Theme lookup, theme.toml checks, and the sandboxed template loader."""

from pathlib import Path

import jinja2
import numpy as np
import pytest

from reporter.render.branding import build_theme_view
from reporter.render.themes import THEMES_ROOT, ThemeError, build_environment, load_theme
from tests.unit.render.render_inputs import make_report


def test_default_theme_has_palette_fonts_and_page_size():
    theme = load_theme("default")
    assert theme.folders == ((THEMES_ROOT / "default").resolve(),)
    assert theme.page_size == "A4"
    assert len(theme.palette["categorical"]) >= 2
    assert len(theme.palette["sequential"]) >= 3


def test_named_theme_falls_back_to_default_and_overrides_palette():
    theme = load_theme("compact")
    assert [f.name for f in theme.folders] == ["compact", "default"]
    assert theme.palette["categorical"] != load_theme("default").palette["categorical"]
    assert theme.palette["ink"] == load_theme("default").palette["ink"], "keys compact leaves out come from default"
    # Templates: compact's own summary, default's partials for the rest.
    assert theme.find("_summary.html").parent.name == "compact"
    assert theme.find("_evidence.html").parent.name == "default"


def test_stylesheets_cascade_from_general_to_specific():
    css = load_theme("compact").stylesheet("print.css")
    assert css.index("Print (WeasyPrint)") < css.index("Compact print"), "default first, compact overrides after"


def test_unknown_theme_name_lists_the_available_ones():
    with pytest.raises(ThemeError, match=r"no theme named 'fancy'; available: .*compact.*default"):
        load_theme("fancy")


def test_user_theme_folder_comes_first_then_extends_then_default(tmp_path):
    (tmp_path / "theme.toml").write_text('extends = "compact"\n[palette]\nink = "#000000"\n')
    theme = load_theme(str(tmp_path))
    assert [f.name for f in theme.folders][1:] == ["compact", "default"]
    assert theme.folders[0] == tmp_path.resolve()
    assert theme.palette["ink"] == "#000000"


def test_palette_values_must_be_colours(tmp_path):
    (tmp_path / "theme.toml").write_text('[palette]\nink = "red; background: url(http://x)"\n')
    with pytest.raises(ThemeError, match=r"palette\.ink: expected colours as #rrggbb"):
        load_theme(str(tmp_path))


def test_font_stacks_cannot_break_out_of_css(tmp_path):
    (tmp_path / "theme.toml").write_text('[fonts]\nbody = "serif} body{background:url(x)"\n')
    with pytest.raises(ThemeError, match=r"fonts\.body: a font list may not contain"):
        load_theme(str(tmp_path))


def test_template_cannot_include_a_file_outside_the_theme(tmp_path):
    (tmp_path / "report.html").write_text('{% include "../../etc/passwd" %}')
    env = build_environment(load_theme(str(tmp_path)))
    with pytest.raises(jinja2.TemplateNotFound):
        env.get_template("report.html").render()


def test_template_cannot_follow_a_symlink_out_of_the_theme(tmp_path):
    secret = tmp_path / "secret.txt"
    secret.write_text("do not show")
    theme_dir = tmp_path / "mine"
    theme_dir.mkdir()
    (theme_dir / "leak.html").symlink_to(secret)
    env = build_environment(load_theme(str(theme_dir)))
    with pytest.raises(jinja2.TemplateNotFound):
        env.get_template("leak.html")


def test_environment_escapes_and_rejects_undefined_names():
    env = build_environment(load_theme("default"))
    assert env.from_string("{{ x }}").render(x="<b>") == "&lt;b&gt;"
    with pytest.raises(jinja2.UndefinedError):
        env.from_string("{{ nothing_here }}").render()


def test_sandbox_blocks_reaching_python_internals():
    env = build_environment(load_theme("default"))
    with pytest.raises(jinja2.exceptions.SecurityError):
        env.from_string("{{ x.__class__.__mro__ }}").render(x=1)


# Machado, Oliveira & Fernandes (2009) dichromacy matrices at severity 1.0, for linear RGB (from memory).
_DEUTERANOPIA = np.array([[0.367322, 0.860646, -0.227968], [0.280085, 0.672501, 0.047413],
                          [-0.011820, 0.042940, 0.968881]])
_PROTANOPIA = np.array([[0.152286, 1.052583, -0.204868], [0.114503, 0.786281, 0.099216],
                        [-0.003882, -0.048116, 1.051998]])


def _lab(linear_rgb: np.ndarray) -> np.ndarray:
    """CIELAB (D65) from linear sRGB; sRGB matrix and Lab formulas from IEC 61966-2-1 / CIE 1976 (from memory)."""
    xyz = np.array([[0.4124, 0.3576, 0.1805], [0.2126, 0.7152, 0.0722], [0.0193, 0.1192, 0.9505]]) @ linear_rgb
    xyz = xyz / np.array([0.95047, 1.0, 1.08883])
    f = np.where(xyz > 0.008856, np.cbrt(xyz), 7.787 * xyz + 16 / 116)
    return np.array([116 * f[1] - 16, 500 * (f[0] - f[1]), 200 * (f[1] - f[2])])


def _linear(colour: str) -> np.ndarray:
    rgb = np.array([int(colour[i:i + 2], 16) / 255 for i in (1, 3, 5)])
    return np.where(rgb <= 0.04045, rgb / 12.92, ((rgb + 0.055) / 1.055) ** 2.4)


@pytest.mark.parametrize("name", ["default", "compact"])
def test_series_colours_stay_apart_for_colour_blind_readers(name):
    """Source: Machado et al. (2009) simulation; CIE76 colour difference. Threshold 20 is our choice."""
    colours = load_theme(name).palette["categorical"]
    for matrix in (np.eye(3), _DEUTERANOPIA, _PROTANOPIA):
        for i, a in enumerate(colours):
            for b in colours[i + 1:]:
                seen_a = _lab(np.clip(matrix @ _linear(a), 0, 1))
                seen_b = _lab(np.clip(matrix @ _linear(b), 0, 1))
                assert np.linalg.norm(seen_a - seen_b) >= 20, f"{a} and {b} look alike ({name})"


def test_sequential_ramp_gets_darker_step_by_step():
    ramp = load_theme("default").palette["sequential"]
    lightness = [_lab(_linear(c))[0] for c in ramp]
    assert lightness == sorted(lightness, reverse=True), "heat maps read lightness as value"


DEJAVU = Path("/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf")


@pytest.mark.skipif(not DEJAVU.is_file(), reason="needs a local TrueType font to copy into the theme")
def test_theme_font_files_are_inlined_as_data_uris(tmp_path):
    (tmp_path / "fonts").mkdir()
    (tmp_path / "fonts" / "body.ttf").write_bytes(DEJAVU.read_bytes())
    (tmp_path / "theme.toml").write_text(
        '[[font_files]]\nfamily = "Northmere Text"\nfile = "fonts/body.ttf"\n', encoding="utf-8")
    view = build_theme_view(load_theme(str(tmp_path)), make_report(), "screen")
    assert '@font-face { font-family: "Northmere Text"; src: url(data:font/ttf;base64,' in view.font_css
    assert str(tmp_path) not in view.font_css
