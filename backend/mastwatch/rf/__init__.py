"""Pure RF computation on numpy arrays: parse sweeps, compute metrics, lines, DTF, matching.

This package imports numpy and scipy only (never FastAPI, SQLAlchemy, settings or
plotly), so it can be used and tested as a library on its own.

    bytes ──parse──▶ Sweep ──metrics──▶ SweepMetrics (per sweep and per band)
                       │
                       ├──lines──▶ feedpoint Sweep (de-embedded)
                       ├──dtf────▶ reflection vs distance
                       └──matching▶ L-networks
"""

from mastwatch.rf.errors import AnalysisError, RFError, SweepFormatError
from mastwatch.rf.sweep import Sweep, SweepSource

__all__ = ["AnalysisError", "RFError", "Sweep", "SweepFormatError", "SweepSource"]
