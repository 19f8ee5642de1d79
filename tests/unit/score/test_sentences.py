"""Text units: sentence split and the no-silent-truncation rule."""

from reporter.score.sentences import SentenceSplitter, TextUnit, fit_to_model, record_units


def test_units_in_reading_order():
    units = record_units(
        "r1",
        {"title": "Water quality in rural wells", "abstract": "We sampled wells. Dr. Ng et al. found arsenic in 40% of them.",
         "keywords": ("arsenic", "groundwater")},
        ("title", "abstract", "keywords"),
        SentenceSplitter(),
    )
    assert [u.kind for u in units] == ["title", "abstract", "abstract", "keywords"]
    assert units[2].text == "Dr. Ng et al. found arsenic in 40% of them."
    assert units[3].text == "Keywords: arsenic; groundwater"


def test_long_unit_is_split_into_windows_not_truncated():
    words = [f"w{i}" for i in range(1000)]
    unit = TextUnit("r", "abstract", 0, " ".join(words))
    out = fit_to_model([unit], max_tokens=100, count_tokens=lambda texts: [len(t.split()) for t in texts])
    assert len(out) > 1
    assert all(len(u.text.split()) <= 100 for u in out)
    assert " ".join(u.text for u in out).split() == words, "every word is still scored"


def test_publisher_boilerplate_is_not_scored():
    abstract = ("Nitrate leaching was measured in twelve catchments. "
                "© 2024 The Authors. Published by Example Press Ltd. All rights reserved.")
    units = record_units("r", {"abstract": abstract}, ("abstract",), SentenceSplitter())
    assert [u.text for u in units] == ["Nitrate leaching was measured in twelve catchments."]


def test_short_units_are_not_tokenised_and_long_ones_are():
    seen = []

    def count(texts):
        seen.extend(texts)
        return [len(t.split()) * 3 for t in texts]

    short = TextUnit("r", "abstract", 0, "A short sentence about wells.")
    long = TextUnit("r", "abstract", 1, " ".join(["word"] * 60))
    out = fit_to_model([short, long], max_tokens=100, count_tokens=count)
    assert seen == [long.text], "a text shorter than the token budget cannot exceed it"
    assert out[0] == short and len(out) == 3
