"""db layer."""
