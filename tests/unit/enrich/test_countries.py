import pytest

from tests.unit.enrich.enrich_frames import record, records
from reporter.enrich.countries import add_countries, countries_in


@pytest.mark.parametrize(
    "affiliation, expected",
    [
        ("Dept of Physics, University of Georgia, Athens, GA 30602, USA", ("US",)),
        ("Institute of Botany, Ilia State University, Tbilisi, Georgia", ("GE",)),
        ("New Mexico State University, Las Cruces, NM 88003", ("US",)),
        ("School of Law, Rutgers University, Newark, New Jersey", ("US",)),
        ("Island Research Centre, St Helier, Jersey", ("JE",)),
        ("School of Forestry, Lae, Papua New Guinea", ("PG",)),
        ("Faculty of Agronomy, Bissau, Guinea-Bissau", ("GW",)),
        ("Ministry of Fisheries, Malabo, Equatorial Guinea", ("GQ",)),
        ("Centre for Rice, Conakry, Guinea", ("GN",)),
        ("School of Mines, Sydney, New South Wales", ("AU",)),
        ("Dept of Geography, Kowloon, Hong Kong, P.R. China", ("HK",)),
        ("College of Water, Nanjing 210098, PR China", ("CN",)),
        ("US Geological Survey, Reston, VA 20192", ()),
        ("Water Lab, Boulder, CO 80305, US", ("US",)),
        ("Dept of Soils, Ames, IA, U.S.A.", ("US",)),
        ("Dept of Ecology, Univ of Somewhere, DEU", ("DE",)),
        ("Marine Institute, Galway, Ireland", ("IE",)),
        ("School of Biology, Belfast BT9 7BL, Northern Ireland", ("GB",)),
        ("Dept of Zoology, Oxford OX1 3SZ, U.K.", ("GB",)),
        ("Coastal Unit, Cardiff, Wales", ("GB",)),
        ("Energy Lab, Daejeon, Republic of Korea", ("KR",)),
        ("Energy Lab, Busan, Korea (South)", ("KR",)),
        ("Rice Institute, Hanoi, Viet Nam", ("VN",)),
        ("Soil Institute, Moscow, Russia", ("RU",)),
        ("Dept of Water, Brno, Czech Republic", ("CZ",)),
        ("Dept of Water, Ankara, Türkiye", ("TR",)),
        ("Delta Lab, Delft, The Netherlands", ("NL",)),
        ("Cocoa Centre, Abidjan, Côte d'Ivoire", ("CI",)),
        ("Cocoa Centre, Abidjan, Ivory Coast", ("CI",)),
        ("Lake Studies, N'Djamena, Chad", ("TD",)),
        ("Delta University, Niamey, Niger", ("NE",)),
        ("Delta University, Port Harcourt, Nigeria", ("NG",)),
        ("Dept X, Univ Y, Dominican Republic", ("DO",)),
        ("Dept X, Univ Y, Dominica", ("DM",)),
        ("Dept X, Univ Y, South Sudan", ("SS",)),
        ("Dept X, Berlin, Germany; Dept Y, Lyon, France", ("DE", "FR")),
        ("Dept X, Berlin, Germany | Dept Y, Lyon, France", ("DE", "FR")),
        ("Dept X, Univ Y, Latin America", ()),
        ("", ()),
    ],
)
def test_countries_in(affiliation, expected):
    """ISO 3166-1 alpha-2 codes; the invented addresses use real place names (common practice)."""
    assert countries_in(affiliation) == expected


def test_last_country_of_a_segment_wins():
    assert countries_in("Institute for Studies of Mexico, Austin, TX, USA") == ("US",)


def test_lower_case_us_inside_text_is_not_a_country():
    assert countries_in("Centre for us and them, Kyoto, Japan") == ("JP",)


def test_add_countries_sets_partners_and_international_flag():
    frame = records(
        record("a:1", affiliations=("Univ A, Cork, Ireland", "Univ B, Lyon, France", "Univ C, Bonn, Germany")),
        record("a:2", affiliations=("Univ A, Cork, Ireland",)),
        record("a:3", affiliations=()),
    )
    out = add_countries(frame, home_country="IE")
    assert list(out["countries"]) == [("DE", "FR", "IE"), ("IE",), ()]
    assert list(out["partner_countries"]) == [("DE", "FR"), (), ()]
    assert list(out["is_international"]) == [True, False, False]
    assert "countries" not in frame.columns, "input frame must not change"
