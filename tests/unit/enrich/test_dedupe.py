from tests.unit.enrich.enrich_frames import record, records
from reporter.enrich.dedupe import dedupe, normalise_title


def test_normalise_title_ignores_case_accents_punctuation_and_spacing():
    assert normalise_title("Résumé of  Coastal-Erosion: A Study!") == "resume of coastal erosion a study"
    assert normalise_title("RESUME of coastal erosion -- a study") == "resume of coastal erosion a study"


def test_same_doi_across_files_keeps_richer_record_and_merges_fields():
    frame = records(
        record("a:1", doi="10.1234/x", title="Tidal flats", keywords=("mud",), affiliations=("Univ A, Ireland",)),
        record(
            "b:7", source_file="b.ris", doi="10.1234/x", title="Tidal Flats.", abstract="We map tidal flats.",
            keywords=("Mud", "sediment"), venue="Coastal Letters",
        ),
    )
    out, merged = dedupe(frame)
    assert list(out["record_id"]) == ["b:7"], "the record with an abstract is kept"
    kept = out.iloc[0]
    assert kept["keywords"] == ("Mud", "sediment"), "keyword union drops a repeat that differs in case"
    assert kept["affiliations"] == ("Univ A, Ireland",)
    assert merged == {"a:1": ("b:7", "duplicate of b:7 (same DOI)")}


def test_same_title_and_year_merges_and_kept_record_takes_the_doi():
    frame = records(
        record("a:1", title="Peat and carbon", year=2023, abstract="Peat stores carbon."),
        record("a:2", title="PEAT AND CARBON", year=2023, doi="10.1234/peat", affiliations=("X, Chile",)),
    )
    out, merged = dedupe(frame)
    assert list(out["record_id"]) == ["a:1"], "the record with an abstract is kept"
    assert out.iloc[0]["doi"] == "10.1234/peat"
    assert out.iloc[0]["affiliations"] == ("X, Chile",)
    assert merged["a:2"] == ("a:1", "duplicate of a:1 (same title and year)")


def test_tie_goes_to_the_record_read_first():
    frame = records(
        record("a:1", title="Peat", doi="10.1234/peat", affiliations=("X, Chile",)),
        record("b:1", title="Peat", venue="Bog Review", affiliations=("Y, Peru",)),
    )
    out, merged = dedupe(frame)
    assert list(out["record_id"]) == ["a:1"]
    assert out.iloc[0]["venue"] == "Bog Review"
    assert merged["b:1"] == ("a:1", "duplicate of a:1 (same title and year)")


def test_richness_prefers_more_fields_then_more_affiliations():
    frame = records(
        record("a:1", title="Kelp", affiliations=("X, Norway",)),
        record("a:2", title="Kelp", affiliations=("X, Norway", "Y, Iceland")),
    )
    out, _ = dedupe(frame)
    assert list(out["record_id"]) == ["a:2"]
    assert out.iloc[0]["affiliations"] == ("X, Norway", "Y, Iceland")


def test_empty_field_of_kept_record_is_filled_from_duplicate():
    frame = records(
        record("a:1", title="Kelp", abstract="Kelp forests.", venue=""),
        record("a:2", title="Kelp", venue="Marine Notes"),
    )
    out, _ = dedupe(frame)
    assert out.iloc[0]["venue"] == "Marine Notes"
    assert bool(out.iloc[0]["has_abstract"]) is True


def test_different_years_or_different_dois_are_not_duplicates():
    frame = records(
        record("a:1", title="Annual flood review", year=2023),
        record("a:2", title="Annual flood review", year=2024),
        record("a:3", title="Kelp", doi="10.1234/preprint"),
        record("a:4", title="Kelp", doi="10.1234/journal"),
    )
    out, merged = dedupe(frame)
    assert len(out) == 4 and merged == {}


def test_title_link_never_joins_two_dois():
    frame = records(
        record("a:1", title="Kelp", doi="10.1234/one"),
        record("a:2", title="Kelp"),
        record("a:3", title="Kelp", doi="10.1234/two"),
    )
    out, merged = dedupe(frame)
    assert sorted(out["record_id"]) == ["a:1", "a:3"]
    assert merged == {"a:2": ("a:1", "duplicate of a:1 (same title and year)")}


def test_within_file_duplicates_three_way():
    frame = records(record("a:1", title="Soil"), record("a:2", title="Soil"), record("a:3", title="soil"))
    out, merged = dedupe(frame)
    assert list(out["record_id"]) == ["a:1"]
    assert set(merged) == {"a:2", "a:3"}
    assert len(out) + len(merged) == len(frame), "every record is kept or merged"


def test_input_frame_is_not_changed():
    frame = records(record("a:1", title="Soil", keywords=("x",)), record("a:2", title="Soil", keywords=("y",)))
    before = frame.copy()
    dedupe(frame)
    assert frame.equals(before)


def test_reason_names_the_link_that_joined_the_group():
    frame = records(
        record("a:1", title="Peat stores", abstract="Peat stores carbon."),
        record("a:2", title="Peat stores", doi="10.1234/peat"),
        record("a:3", title="Peat stores carbon (preprint title)", doi="10.1234/peat"),
    )
    out, merged = dedupe(frame)
    assert list(out["record_id"]) == ["a:1"]
    assert merged == {
        "a:2": ("a:1", "duplicate of a:1 (same title and year)"),
        "a:3": ("a:1", "duplicate of a:1 (same DOI)"),
    }


def test_awards_with_the_same_title_and_year_but_other_amounts_stay_apart():
    frame = records(
        record("g:1", title="Doctoral studentship", year=2023, abstract="Catchments."),
        record("g:2", title="Doctoral studentship", year=2023, abstract="Catchments."),
        record("g:3", title="Doctoral studentship", year=2023),
    ).assign(amount=[98000.0, 104500.0, 98000.0], currency=["EUR", "EUR", "EUR"], amount_note="")
    out, merged = dedupe(frame)
    assert list(out["record_id"]) == ["g:1", "g:2"], "two amounts are two awards; the same amount is one"
    assert merged == {"g:3": ("g:1", "duplicate of g:1 (same title and year)")}


def test_the_copy_with_a_usable_amount_is_kept():
    frame = records(
        record("g:1", title="Heat pumps", year=2024, abstract="Retrofit."),
        record("h:1", title="Heat pumps", year=2024),
    ).assign(amount=[float("nan"), 310500.0], currency=["EUR", "EUR"], amount_note=["no amount", ""])
    out, merged = dedupe(frame)
    assert list(out["record_id"]) == ["h:1"], "the funding figures count the kept record's amount"
    assert out.iloc[0]["abstract"] == "Retrofit." and merged == {"g:1": ("h:1", "duplicate of h:1 (same title and year)")}
