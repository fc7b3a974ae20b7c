"""Input limits, named once; the parsers, the API and the docs all read these."""

MAX_FILE_BYTES = 20 * 1024 * 1024
"""Largest sweep file accepted (20 MB)."""

MAX_POINTS = 100_001
"""Most frequency points in one sweep."""

MAX_PASSIVE_GAMMA = 1.05
"""|S11| above this cannot come from a passive one-port (a margin over 1 for calibration noise)."""
