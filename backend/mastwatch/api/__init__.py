"""api layer."""
