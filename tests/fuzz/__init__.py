"""Seeded mutation fuzzing of pathcast's input files (helpers for tests/test_fuzz.py)."""
