"""demo layer."""
