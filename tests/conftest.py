"""Shared fixtures. The real model loads once per test session, only for tests that ask for it."""

import pytest


@pytest.fixture(scope="session")
def embedder():
    from reporter.score.embedder import SentenceEmbedder

    return SentenceEmbedder()


@pytest.fixture(scope="session")
def framework():
    from reporter.score.framework import load_framework

    return load_framework("un-sdg-2030")
