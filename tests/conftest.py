"""Shared test fixtures. Database fixtures live in tests/dbfixtures.py (see DEVELOPERS.md)."""
