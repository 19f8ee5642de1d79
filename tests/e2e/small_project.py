"""A small project cut from the demo (the first records of the 2024 RIS export), for tests that build often."""

import shutil
from pathlib import Path

REPO = Path(__file__).resolve().parents[2]

CONFIG = """\
[report]
institution = "Kestrel Heath University"
home_country = "IE"
reporting_year = 2024
output = "out"

[[inputs]]
path = "publications-2024.ris"

[departments]
staff_map = "staff.csv"
"""


def make_small_project(folder: Path, n_records: int, extra_config: str = "") -> Path:
    """Write the config, the staff map and the first `n_records` RIS records into `folder`."""
    folder.mkdir(parents=True, exist_ok=True)
    shutil.copy(REPO / "example_input" / "staff.csv", folder / "staff.csv")
    ris = (REPO / "example_input" / "publications-2024.ris").read_text(encoding="utf-8")
    records = ris.split("ER  -")[:n_records]
    (folder / "publications-2024.ris").write_text("ER  -".join(records) + "ER  -\n", encoding="utf-8")
    (folder / "waymark.toml").write_text(CONFIG + extra_config)
    return folder
