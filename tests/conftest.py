"""Shared test setup. This directory is put on sys.path by pytest (it holds
a conftest.py and no __init__.py), so tests import `reference.values`."""

from hypothesis import settings

# Keep property tests quick on a 2-core machine; the full suite must stay
# within a few minutes.
settings.register_profile("inspector", max_examples=60, deadline=None)
settings.load_profile("inspector")
