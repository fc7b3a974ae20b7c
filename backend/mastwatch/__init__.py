"""Mastwatch: self-hosted test records for a radio club's antennas."""

__version__ = "0.1.0"
