import os
import sys

import pytest
from hypothesis import HealthCheck, settings

sys.path.insert(0, os.path.dirname(__file__))

# Deterministic property tests in CI: same examples on every run.
settings.register_profile(
    "ci", derandomize=True, deadline=None, max_examples=60,
    suppress_health_check=[HealthCheck.too_slow],
)
settings.register_profile("dev", deadline=None, max_examples=30)
settings.load_profile(os.environ.get("CODESEARCH_HYPOTHESIS", "ci"))


@pytest.fixture
def stub_methods(monkeypatch):
    """The test-only search methods (tests/table_stub_*.py), registered for one test only."""
    import table_stub_lex
    from codesearch.search import METHODS

    for name, spec in table_stub_lex.specs().items():
        monkeypatch.setitem(METHODS, name, spec)
