"""services layer."""
