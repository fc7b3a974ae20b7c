"""Database layer: typed models (models.py), engine and sessions (engine.py),
column types (types.py), migrations helpers (migrate.py) and array codec (arrays.py)."""
