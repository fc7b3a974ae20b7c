"""Tools on a stored sweep: distance to fault and L-network matching (read-only).

    GET /sweeps/{id}/dtf    reflection vs distance along the feedline, its peaks, and
                            the resolution and range the sweep allows (measured plane)
    GET /sweeps/{id}/match  L-networks for the impedance at one frequency, each with its
                            SWR≤2 bandwidth (measured or feedpoint plane)

Loading goes through the records service (``services.sweeps``, ``services.cables``);
the maths is ``mastwatch.rf.dtf`` / ``mastwatch.rf.matching``. AnalysisError (a sweep
too coarse, too narrow or without phase) maps to 422 through the app's error handler.
"""

from __future__ import annotations

from typing import Annotated, Any, Literal

from fastapi import APIRouter, Query
from pydantic import BaseModel, Field
from sqlalchemy.orm import Session

from mastwatch.api.deps import SessionDep
from mastwatch.rf.dtf import DEFAULT_THRESHOLD_DB, SAFETY_NOTE, distance_to_fault
from mastwatch.rf.lines import CableType, Feedline
from mastwatch.rf.matching import match_summary
from mastwatch.services import sweeps
from mastwatch.services.antennas import feedline_from_snapshot
from mastwatch.services.cables import find_cable_type, to_rf_cable
from mastwatch.services.errors import Invalid

router = APIRouter(tags=["tools"])


class DtfPeakOut(BaseModel):
    distance_m: float
    reflection: float = Field(description="|ρ|, loss-compensated when loss_compensated")
    return_loss_db: float | None


class DtfOut(BaseModel):
    sweep_id: int
    plane: Literal["measured"]
    resolution_m: float = Field(description="VF·c/(2·span)")
    range_m: float = Field(description="maximum unambiguous range VF·c·(N−1)/(2·span)")
    velocity_factor: float
    window: str
    beta: float | None
    pad: int
    points: int
    f_start_hz: float
    f_stop_hz: float
    span_hz: float
    threshold_db: float
    max_distance_m: float = Field(
        description="the view (distance_m, peaks) ends here; with loss compensation, by "
        "default where the line's two-way loss reaches threshold_db"
    )
    line_length_m: float | None = Field(
        default=None, description="the line length the compensation stopped at, if known"
    )
    resampled: bool
    loss_compensated: bool
    alpha_np_per_m: float | None
    cable: str | None
    notes: list[str]
    peaks: list[DtfPeakOut]
    distance_m: list[float] | None = None
    reflection: list[float] | None = None
    safety: str


class ElementOut(BaseModel):
    position: Literal["series", "shunt"]
    kind: Literal["L", "C"]
    reactance_ohm: float | None
    susceptance_s: float | None
    value: float
    unit: Literal["H", "F"]
    display: str


class SwrBandwidthOut(BaseModel):
    threshold: float
    low_hz: float | None
    high_hz: float | None
    width_hz: float | None
    open_low: bool
    open_high: bool


class NetworkOut(BaseModel):
    topology: Literal["shunt_at_load", "series_at_load"]
    f_hz: float
    z0_ohm: float
    load_r_ohm: float
    load_x_ohm: float
    x_ohm: float
    b_s: float
    elements: list[ElementOut] = Field(description="from the radio side towards the load")
    hint: str
    swr_bandwidth_2: SwrBandwidthOut


class MatchOut(BaseModel):
    sweep_id: int
    plane: Literal["measured", "feedpoint"]
    at_hz: float
    z0_ohm: float
    load_r_ohm: float
    load_x_ohm: float
    load_swr: float | None
    hint: str
    networks: list[NetworkOut]


def _cable(
    session: Session, name: str | None, vf: float | None, recorded: Feedline | None
) -> CableType | None:
    """The named cable (catalog or user type), else the sweep's recorded feedline's cable
    when no velocity factor is given."""
    if name is not None:
        return to_rf_cable(find_cable_type(session, name))
    if vf is None:
        if recorded is None:
            raise Invalid(
                "give cable (a cable type name) or vf (velocity factor): "
                "this sweep has no feedline on record"
            )
        return recorded.cable
    return None


@router.get("/sweeps/{sweep_id}/dtf", response_model=DtfOut)
def sweep_dtf(
    sweep_id: int,
    session: SessionDep,
    cable: Annotated[
        str | None, Query(description="cable type name; default: the recorded feedline's")
    ] = None,
    vf: Annotated[float | None, Query(gt=0, le=1, description="velocity factor")] = None,
    window: Literal["kaiser", "rect"] = "kaiser",
    beta: Annotated[float, Query(ge=0, le=50, description="Kaiser window β")] = 6.0,
    pad: Annotated[int, Query(ge=1, le=16, description="zero-padding factor")] = 4,
    threshold_db: Annotated[
        float, Query(ge=0, le=120, description="peaks with return loss below this")
    ] = DEFAULT_THRESHOLD_DB,
    compensate_loss: bool = True,
    max_distance_m: Annotated[
        float | None,
        Query(gt=0, description="look this far along the line (default: see docs/feedlines.md)"),
    ] = None,
    line_length_m: Annotated[
        float | None,
        Query(gt=0, description="where the loss compensation stops growing; default: the "
              "recorded feedline's length when its cable is used"),
    ] = None,
    arrays: bool = True,
    max_points: Annotated[int, Query(ge=16, le=200_000)] = 2000,
) -> dict[str, Any]:
    """Distance to fault of the sweep as measured (taken at the radio end of the line)."""
    row = sweeps.get_sweep(session, sweep_id, arrays=True)
    snapshot = row.feedline_snapshot
    recorded = feedline_from_snapshot(snapshot) if snapshot else None
    cable_type = _cable(session, cable, vf, recorded)
    if line_length_m is None and cable is None and vf is None and recorded is not None:
        line_length_m = recorded.length_m or None  # the recorded cable: its length too
    result = distance_to_fault(
        sweeps.sweep_at(row, "measured"),
        vf,
        window=window,
        beta=beta,
        pad=pad,
        cable=cable_type,
        compensate_loss=compensate_loss,
        threshold_db=threshold_db,
        max_distance_m=max_distance_m,
        line_length_m=line_length_m,
    )
    body = result.to_dict(arrays=arrays, max_points=max_points)
    return {"sweep_id": sweep_id, "plane": "measured", **body, "safety": SAFETY_NOTE}


@router.get("/sweeps/{sweep_id}/match", response_model=MatchOut)
def sweep_match(
    sweep_id: int,
    session: SessionDep,
    at_hz: Annotated[float, Query(gt=0, description="design frequency, Hz")],
    z0: Annotated[float, Query(gt=0, le=10_000, description="impedance to match to")] = 50.0,
    plane: Literal["measured", "feedpoint"] = "measured",
) -> dict[str, Any]:
    """L-networks matching the sweep's impedance at ``at_hz`` to z0 (a tuner at ``plane``)."""
    row = sweeps.get_sweep(session, sweep_id, arrays=True)
    summary = match_summary(sweeps.sweep_at(row, plane), at_hz, z0)
    return {"sweep_id": sweep_id, "plane": plane, **summary}
