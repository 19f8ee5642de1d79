"""The record noun put into the written report (report.record_noun): text and read attributes, nothing else."""

from reporter.render.nouns import noun_in_html, noun_in_text


def test_plural_singular_capital_and_article_follow_the_noun():
    text = "A publication counts once; Publications analysed: 12 publications. PUBLICATIONS"
    assert noun_in_text(text, "award", "awards") == "An award counts once; Awards analysed: 12 awards. AWARDS"
    assert noun_in_text("a publication", "grant", "grants") == "a grant"


def test_publications_stay_publications():
    html = '<p id="x">A publication</p>'
    assert noun_in_html(html, "publication", "publications") is html


def test_ids_links_scripts_and_styles_are_left_alone_but_read_attributes_change():
    html = ('<section id="publication-explorer"><a href="#publication-explorer">Publication explorer</a>'
            '<script>var s = " publications ";</script><style>.publication{}</style>'
            '<svg aria-label="share of publications"><text>aligned publications</text></svg>'
            '<p data-noun="publications" class="publications">n_publications 3 publications</p></section>')
    out = noun_in_html(html, "project", "projects")
    assert 'id="publication-explorer"' in out and 'href="#publication-explorer"' in out
    assert ">Project explorer<" in out
    assert 'var s = " publications ";' in out and ".publication{}" in out, "code is not text"
    assert 'aria-label="share of projects"' in out and "<text>aligned projects</text>" in out
    assert 'data-noun="projects"' in out and 'class="publications"' in out
    assert "n_publications 3 projects" in out, "identifiers glued to the word are not words"
