"""Enrich: DOIs, duplicates, language, countries and departments on the record table."""

from reporter.enrich.enrichment import enrich

__all__ = ["enrich"]
