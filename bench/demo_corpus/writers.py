"""Write planned demo records as BibTeX, RIS and a research-system CSV export.

A record is a plain dict made by make_demo.plan_records; each writer renders
it the way that kind of export usually looks (LaTeX in BibTeX, tags in RIS,
long headers in the CSV).
"""

from __future__ import annotations

import csv
import io
import re

_LATEX_ACCENTS = {
    "á": "{\\'a}", "é": "{\\'e}", "í": "{\\'i}", "ó": "{\\'o}", "ú": "{\\'u}", "ý": "{\\'y}",
    "Á": "{\\'A}", "É": "{\\'E}", "Í": "{\\'I}", "Ó": "{\\'O}", "Ú": "{\\'U}",
    "à": "{\\`a}", "è": "{\\`e}", "ò": "{\\`o}", "ä": '{\\"a}', "ö": '{\\"o}', "ü": '{\\"u}',
    "Ä": '{\\"A}', "Ö": '{\\"O}', "Ü": '{\\"U}', "ë": '{\\"e}', "ï": '{\\"i}',
    "â": "{\\^a}", "ê": "{\\^e}", "î": "{\\^i}", "ô": "{\\^o}", "û": "{\\^u}",
    "ñ": "{\\~n}", "ã": "{\\~a}", "õ": "{\\~o}", "ç": "{\\c{c}}", "ş": "{\\c{s}}", "Ş": "{\\c{S}}",
    "ß": "{\\ss}", "å": "{\\aa}", "Å": "{\\AA}", "ø": "{\\o}", "ł": "{\\l}", "Ł": "{\\L}",
    "č": "{\\v{c}}", "ř": "{\\v{r}}", "š": "{\\v{s}}", "ž": "{\\v{z}}", "ğ": "{\\u{g}}", "ı": "{\\i}",
    "ś": "{\\'s}", "ń": "{\\'n}", "ć": "{\\'c}", "Ç": "{\\c{C}}",
}
_ITALIC = re.compile(r"\*([^*]+)\*")


def plain(text: str) -> str:
    """Text for RIS and CSV: markers dropped, formulas as written in plain exports."""
    return _ITALIC.sub(r"\1", text)


def latex(text: str, accents: bool, formulas: bool) -> str:
    """Text as a BibTeX export writes it."""
    text = text.replace("\\", "\\textbackslash{}").replace("&", "\\&").replace("%", "\\%")
    text = _ITALIC.sub(r"\\textit{\1}", text)
    text = text.replace("–", "--").replace("—", "---")
    if formulas:
        text = re.sub(r"\bCO2\b", "$CO_2$", text)
        text = text.replace("PM2.5", "PM$_{2.5}$")
    if accents:
        text = "".join(_LATEX_ACCENTS.get(ch, ch) for ch in text)
    return text


def _bib_name(name: str, accents: bool, first_last: bool) -> str:
    last, _, first = name.partition(", ")
    if first_last and " " not in last and first and not first.endswith("."):
        name = f"{first} {last}"
    return latex(name, accents, formulas=False)


def write_bibtex(records: list[dict]) -> str:
    out = io.StringIO()
    out.write("% Exported from the Kestrel Heath University publications database\n")
    out.write("% Selection: outputs added or updated 1 January 2025 - 31 December 2025\n\n")
    for rec in records:
        acc, form = rec["bib_accents"], rec["bib_formulas"]
        kind = {"article": "article", "conference": "inproceedings", "chapter": "incollection", "book": "book"}[rec["doc_type"]]
        fields: list[tuple[str, str]] = []
        if rec["authors"]:
            names = [_bib_name(a, acc, rec["bib_first_last"]) for a in rec["authors"]]
            fields.append(("author", " and ".join(names)))
        if rec["title"]:
            title = latex(rec["title"], acc, form)
            fields.append(("title", "{" + title + "}" if rec.get("bib_double_brace") else title))
        venue_field = {"article": "journal", "conference": "booktitle", "chapter": "booktitle", "book": "publisher"}[rec["doc_type"]]
        fields.append((venue_field, latex(rec["venue"], acc, False)))
        if rec["doc_type"] == "chapter":
            fields.append(("publisher", "Kestrel Heath University Press"))
        fields.append(("year", str(rec["year_text"])))
        if rec.get("month"):
            fields.append(("month", rec["month"]))
        if rec["doc_type"] == "article":
            fields.append(("volume", str(rec["volume"])))
            fields.append(("number", str(rec["issue"])))
        if rec["doc_type"] != "book":
            fields.append(("pages", f"{rec['first_page']}--{rec['last_page']}"))
        if rec["doi_as_written"]:
            fields.append(("doi", rec["doi_as_written"]))
        if rec["abstract"]:
            fields.append(("abstract", latex(rec["abstract"], acc, form)))
        if rec["keywords"]:
            sep = "; " if rec["kw_semicolon"] else ", "
            fields.append(("keywords", sep.join(latex(k, acc, form) for k in rec["keywords"])))
        if rec["affiliations"]:
            fields.append(("affiliations", "; ".join(latex(a, acc, False) for a in rec["affiliations"])))
        if rec.get("language_name"):
            fields.append(("language", rec["language_name"]))
        out.write(f"@{kind}{{{rec['native_id']},\n")
        for i, (key, value) in enumerate(fields):
            bare = key == "month"
            comma = "," if i < len(fields) - 1 else ""
            out.write(f"  {key} = {value if bare else '{' + value + '}'}{comma}\n")
        out.write("}\n\n")
    return out.getvalue()


def write_ris(records: list[dict]) -> str:
    lines: list[str] = []
    kinds = {"article": "JOUR", "conference": "CONF", "chapter": "CHAP", "book": "BOOK"}
    for rec in records:
        tag = lambda t, v: lines.append(f"{t}  - {v}")  # noqa: E731 - RIS lines are "XX  - value"
        tag("TY", kinds[rec["doc_type"]])
        tag("ID", rec["native_id"])
        if rec["title"]:
            tag("TI", plain(rec["title"]))
        for author in rec["authors"]:
            tag("AU", author)
        for aff in rec["affiliations"]:
            tag("AD", aff)
        tag("PY", rec["ris_date"] or str(rec["year_text"]))
        tag("T2" if rec["doc_type"] != "article" or rec["native_id"][-1] in "02468" else "JO", rec["venue"])
        if rec["doc_type"] == "article":
            tag("VL", str(rec["volume"]))
            tag("IS", str(rec["issue"]))
        if rec["doc_type"] != "book":
            tag("SP", str(rec["first_page"]))
            tag("EP", str(rec["last_page"]))
        if rec["abstract"]:
            tag("AB", plain(rec["abstract"]))
        for kw in rec["keywords"]:
            tag("KW", plain(kw))
        if rec["doi_as_written"]:
            tag("DO", rec["doi_as_written"])
            if rec["ris_url"]:
                tag("UR", "https://doi.org/" + rec["doi"])
        if rec.get("language_name"):
            tag("LA", rec["language_name"])
        lines.append("ER  - ")
        lines.append("")
    return "\n".join(lines)


CSV_HEADER = ("Record ID", "Output Title", "Abstract", "Publication Year", "Contributors", "Affiliations",
              "Keywords", "DOI", "Organisational Unit", "Output Type", "Journal", "Publication Status")
_CSV_TYPES = {"article": "Journal article", "conference": "Conference contribution",
              "chapter": "Chapter in book", "book": "Book"}


def write_cris_csv(records: list[dict]) -> str:
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\r\n")
    writer.writerow(CSV_HEADER)
    for rec in records:
        writer.writerow((
            rec["native_id"], plain(rec["title"]), plain(rec["abstract"]), rec["year_text"],
            "; ".join(rec["authors"]), "; ".join(rec["affiliations"]), "; ".join(plain(k) for k in rec["keywords"]),
            rec["doi_as_written"], "; ".join(rec["units"]), _CSV_TYPES[rec["doc_type"]], rec["venue"],
            rec["status"],
        ))
    return out.getvalue()
