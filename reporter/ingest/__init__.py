"""Ingest: read every configured export into one record table plus an intake log."""

from reporter.ingest.intake import read_inputs

__all__ = ["read_inputs"]
