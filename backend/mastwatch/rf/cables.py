"""The seeded cable catalog as plain data: the table points each entry is fitted to.

Each entry names the table its points come from. `mastwatch.rf.lines` fits the loss
model A(f) = k0 + k1·√f + k2·f (dB per 100 m, f in MHz, k ≥ 0) to these points by
non-negative least squares when it builds ``CABLES``, so the coefficients are never
typed in by hand and a test can show the fit reproduces the table within its rounding.

Sources (see docs/feedlines.md and REFERENCES §5):

- ``ARRL-GCLM``: ARRL *General Class License Manual*, Table 6-1 "Feedline
  Characteristics", matched loss in dB per 100 ft at 30 and 150 MHz — read in the
  published table [found].
- ``HANDBOOK-MEMORY``: handbook-style cable tables at 1 / 10 / 100 MHz in dB per
  100 ft, recalled from memory and not checked against a printed table [memory].
  These are editable presets: measure your own cable when it matters.

Velocity factors are the usual figures for the dielectric (solid polyethylene 0.66,
foam 0.78–0.88, open-wire line 0.9+): common practice, from memory.

Trade designations only; no brand names.
"""

from __future__ import annotations

from dataclasses import dataclass

FEET_PER_100M = 100.0 / 0.3048
"""dB per 100 ft × this / 100 = dB per 100 m (100 m = 328.084 ft)."""

ARRL_GCLM = (
    "ARRL General Class License Manual, Table 6-1 'Feedline Characteristics' "
    "(matched loss at 30 and 150 MHz, dB/100 ft) [found]"
)
HANDBOOK_MEMORY = (
    "handbook-style cable table at 1/10/100 MHz (dB/100 ft), from memory, "
    "not checked against a printed table [memory]"
)


@dataclass(frozen=True)
class CatalogEntry:
    """One seeded cable type before fitting: what the table says about it."""

    name: str
    z0_ohm: float
    velocity_factor: float
    kind: str  # "coax" or "twin"
    points_mhz_db100ft: tuple[tuple[float, float], ...]
    decimals: int  # digits after the point in the table (its rounding)
    table: str  # which table the points are from
    note: str  # velocity factor origin and limits of the model

    @property
    def source(self) -> str:
        return f"{self.table}; {self.note}"


_VF_NOTE = "velocity factor {vf} for {what} (common practice, from memory)"

CATALOG: tuple[CatalogEntry, ...] = (
    CatalogEntry(
        "RG-58", 50.0, 0.66, "coax", ((30.0, 2.47), (150.0, 5.63)), 2, ARRL_GCLM,
        _VF_NOTE.format(vf=0.66, what="solid polyethylene"),
    ),
    CatalogEntry(
        "RG-8X", 50.0, 0.78, "coax", ((30.0, 1.96), (150.0, 4.53)), 2, ARRL_GCLM,
        _VF_NOTE.format(vf=0.78, what="foam polyethylene (0.78-0.82 quoted)"),
    ),
    CatalogEntry(
        "RG-213", 50.0, 0.66, "coax", ((30.0, 1.08), (150.0, 2.53)), 2, ARRL_GCLM,
        _VF_NOTE.format(vf=0.66, what="solid polyethylene"),
    ),
    CatalogEntry(
        "RG-8", 50.0, 0.66, "coax", ((30.0, 1.08), (150.0, 2.53)), 2, ARRL_GCLM,
        _VF_NOTE.format(vf=0.66, what="solid polyethylene (foam RG-8 types are ~0.8)"),
    ),
    CatalogEntry(
        "RG-174", 50.0, 0.66, "coax", ((30.0, 4.56), (150.0, 10.3)), 2, ARRL_GCLM,
        _VF_NOTE.format(vf=0.66, what="solid polyethylene")
        + "; steel-core centre: below ~5 MHz real loss is higher than this model",
    ),
    CatalogEntry(
        "RG-59", 75.0, 0.66, "coax", ((30.0, 1.79), (150.0, 4.11)), 2, ARRL_GCLM,
        _VF_NOTE.format(vf=0.66, what="solid polyethylene"),
    ),
    CatalogEntry(
        "RG-6", 75.0, 0.82, "coax", ((1.0, 0.2), (10.0, 0.6), (100.0, 2.0)), 1,
        HANDBOOK_MEMORY, _VF_NOTE.format(vf=0.82, what="foam polyethylene (0.82-0.85 quoted)"),
    ),
    CatalogEntry(
        "RG-11", 75.0, 0.84, "coax", ((1.0, 0.1), (10.0, 0.4), (100.0, 1.4)), 1,
        HANDBOOK_MEMORY, _VF_NOTE.format(vf=0.84, what="foam polyethylene"),
    ),
    CatalogEntry(
        "hardline-1/2in", 50.0, 0.88, "coax", ((1.0, 0.1), (10.0, 0.2), (100.0, 0.7)), 1,
        HANDBOOK_MEMORY,
        "generic 1/2-inch foam-dielectric hardline; "
        + _VF_NOTE.format(vf=0.88, what="foam dielectric hardline"),
    ),
    CatalogEntry(
        "foam-400", 50.0, 0.85, "coax", ((1.0, 0.1), (10.0, 0.4), (100.0, 1.3)), 1,
        HANDBOOK_MEMORY,
        "generic 400-size (10.3 mm) foam low-loss coax; "
        + _VF_NOTE.format(vf=0.85, what="foam polyethylene"),
    ),
    CatalogEntry(
        "window-450", 450.0, 0.91, "twin", ((1.0, 0.02), (10.0, 0.08), (100.0, 0.3)), 2,
        HANDBOOK_MEMORY,
        "450 ohm window (ladder) line, dry; wet line loses much more; "
        + _VF_NOTE.format(vf=0.91, what="window line"),
    ),
    CatalogEntry(
        "twinlead-300", 300.0, 0.80, "twin", ((1.0, 0.1), (10.0, 0.3), (100.0, 1.1)), 1,
        HANDBOOK_MEMORY,
        "300 ohm flat twin lead, dry; "
        + _VF_NOTE.format(vf=0.80, what="polyethylene-ribbon twin lead"),
    ),
)
