"""Random config mistakes never end in a traceback: load_config returns a Config or raises ConfigError (issue 15).

Starts from a valid config and replaces values with values of the wrong kind, out of range, empty,
or pointing at paths that are files, folders, missing or odd; hypothesis explores the combinations.
"""

import json
import string
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from reporter.config import Config, load_config
from reporter.errors import ConfigError

BASE = {
    "report": {"institution": "Test University", "home_country": "IE", "reporting_year": 2025,
               "comparison_years": [2023, 2024], "output": "out"},
    "inputs": [{"path": "a.bib"}],
    "score": {"threshold": 0.6},
    "analysis": {"counting": "full"},
}

KEYS = [
    ("report", "institution"), ("report", "home_country"), ("report", "reporting_year"),
    ("report", "comparison_years"), ("report", "output"), ("report", "theme"), ("report", "logo"),
    ("report", "allow_empty_years"), ("report", "accent_colour"), ("report", "unknown_key"),
    ("inputs", "path"), ("inputs", "format"), ("inputs", "delimiter"), ("inputs", "columns"),
    ("inputs", "encoding"), ("inputs", "allow_empty"),
    ("score", "threshold"), ("score", "cache"), ("score", "framework"), ("score", "thresholds_file"),
    ("score", "backend"), ("score", "threads"), ("analysis", "counting"), ("analysis", "min_group_size"),
    ("validation", "review_file"), ("validation", "labelled_sample"), ("departments", "staff_map"),
    ("report", "record_noun"), ("inputs", "currency"), ("funding", "counting"), ("funding", "base_currency"),
    ("funding", "conversion_table"),
]

PATH_LIKE = st.sampled_from(["", ".", "..", "~", "~/x", "a.bib", "out", "out/x.csv", "missing.csv", "a.bib/x",
                             "notes.txt", "folder", "/", "loop/x", "https://example.invalid/x.png", "\u00e9t\u00e9.csv"])
VALUES = st.one_of(
    PATH_LIKE,
    st.text(alphabet=string.printable, max_size=12),
    st.integers(min_value=-10**6, max_value=10**6),
    st.floats(allow_nan=False, allow_infinity=False, width=32),
    st.booleans(),
    st.lists(st.integers(min_value=-3000, max_value=3000), max_size=4),
    st.lists(PATH_LIKE, max_size=3),
    st.dictionaries(st.sampled_from(["title", "year", "bogus"]), PATH_LIKE, max_size=2),
)


def _toml_value(value) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, (int, float)):
        return repr(value)
    if isinstance(value, str):
        return json.dumps(value)  # a JSON string is a valid TOML basic string
    if isinstance(value, list):
        return "[" + ", ".join(_toml_value(v) for v in value) + "]"
    return "{ " + ", ".join(f"{json.dumps(k)} = {_toml_value(v)}" for k, v in value.items()) + " }"


def _toml(data: dict) -> str:
    out = []
    for section, body in data.items():
        tables = body if isinstance(body, list) else [body]
        for table in tables:
            out.append(f"[[{section}]]" if isinstance(body, list) else f"[{section}]")
            out.extend(f"{key} = {_toml_value(value)}" for key, value in table.items())
            out.append("")
    return "\n".join(out)


def _project(root: Path) -> None:
    (root / "a.bib").write_text("@article{a, title={T}, year=2025}\n", encoding="utf-8")
    (root / "notes.txt").write_text("not a database\n", encoding="utf-8")
    (root / "folder").mkdir(exist_ok=True)
    if not (root / "loop").is_symlink():
        (root / "loop").symlink_to(root / "loop")


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(changes=st.lists(st.tuples(st.sampled_from(KEYS), VALUES), min_size=1, max_size=4), out=st.one_of(st.none(), PATH_LIKE))
def test_random_config_mistakes_end_in_a_config_or_a_config_error(tmp_path, changes, out):
    _project(tmp_path)
    data = json.loads(json.dumps(BASE))
    for (section, key), value in changes:
        table = data.setdefault(section, [{}] if section == "inputs" else {})
        (table[0] if isinstance(table, list) else table)[key] = value
    path = tmp_path / "waymark.toml"
    path.write_text(_toml(data), encoding="utf-8")
    try:
        config = load_config(path, output=None if out is None else Path(out))
    except ConfigError as error:
        assert error.problems, "a refusal says why"
        for problem in error.problems:
            assert problem.message.strip(), "every problem has a message"
            assert problem.path == path or tmp_path in Path(problem.path).parents or problem.key == "--out", \
                f"every problem names the config file or the file it is about: {problem}"
    else:
        assert isinstance(config, Config)
