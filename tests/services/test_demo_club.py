"""The invented demo club: its scenario, its files, what its damage does, and its loading.

The expected outcome is read from ``SCENARIO`` (plain data), not repeated here. The
physical checks use the cable model of the RF core and the thresholds of the health
service (rules of thumb, common practice — see services/thresholds.py).
"""

from __future__ import annotations

import itertools
import re
from collections import Counter
from datetime import timedelta

import numpy as np
import pytest

from mastwatch.demo.club import (
    MEASUREMENT_NOISE,
    SCENARIO,
    DemoSummary,
    load_demo_club,
    sweep_of,
    touchstone_bytes,
    write_demo_files,
)
from mastwatch.demo.synth import WaterInLine
from mastwatch.rf.bands import get_band
from mastwatch.rf.lines import CABLES, deembed, matched_loss_db
from mastwatch.rf.metrics import compute_metrics
from mastwatch.rf.parse import read_sweep
from mastwatch.services.thresholds import DEFAULT_THRESHOLDS
from tests.dbfixtures import row_counts

MAIDENHEAD_6 = re.compile(r"^[A-R]{2}[0-9]{2}[a-x]{2}$")


def _sweeps_of(key: str):
    return [s for s in SCENARIO.sweeps if s.antenna == key]


def _feedpoint_metrics(spec):
    """Band metrics of a demo sweep at the feedpoint (de-embedded like the upload does)."""
    a = SCENARIO.antenna(spec.antenna)
    sweep = sweep_of(spec)
    if spec.plane == "line_input" and a.feedline is not None:
        sweep = deembed(sweep, a.feedline.to_rf())
    region = SCENARIO.site(a.site).itu_region
    return compute_metrics(sweep, bands=[get_band(b, region) for b in a.bands])


def _baseline(key: str):
    return _sweeps_of(key)[0]


def _post_storm(key: str):
    after = [s for s in _sweeps_of(key) if s.measured_at > SCENARIO.storm_at]
    return after[0]


# -- the scenario as data ----------------------------------------------------------------


def test_scenario_has_three_sites_about_ten_antennas_two_storms_and_a_repair():
    assert len(SCENARIO.sites) == 3
    assert 8 <= len(SCENARIO.antennas) <= 12
    kinds = Counter(e.kind for e in SCENARIO.events)
    assert kinds["storm"] == 2
    assert kinds["repair"] >= 1
    assert len({a.kind for a in SCENARIO.antennas}) >= 6
    assert len({(a.site, a.name) for a in SCENARIO.antennas}) == len(SCENARIO.antennas)
    repair = next(e for e in SCENARIO.events if e.kind == "repair")
    assert repair.antenna == SCENARIO.repaired
    storm = next(
        e for e in SCENARIO.events if e.kind == "storm" and e.occurred_at == SCENARIO.storm_at
    )
    assert storm.site == SCENARIO.storm_site


def test_scenario_is_invented_and_well_formed():
    # Q-prefix call signs only: no country issues them, so no real holder.
    text = " ".join(
        [
            SCENARIO.call_sign,
            *(s.operator for s in SCENARIO.sweeps),
            *(a.notes for a in SCENARIO.antennas),
        ]
    )
    for call in re.findall(r"\b[A-Z]{1,2}[0-9][A-Z]{1,3}\b", text):
        assert call.startswith("Q"), call
    for s in SCENARIO.sites:
        assert MAIDENHEAD_6.match(s.locator), s.locator
        assert s.itu_region in (1, 2, 3)
    for a in SCENARIO.antennas:
        if a.feedline is not None:
            assert a.feedline.cable in CABLES


def test_two_years_of_sweeps_every_few_months_mostly_at_the_line_input():
    for a in SCENARIO.antennas:
        dates = [s.measured_at for s in _sweeps_of(a.key)]
        assert len(dates) >= 8, a.key
        assert dates == sorted(dates)
        assert dates[-1] - dates[0] >= timedelta(days=680), a.key
        assert max(b - a_ for a_, b in itertools.pairwise(dates)) <= timedelta(days=125)
    planes = Counter(s.plane for s in SCENARIO.sweeps)
    assert planes["feedpoint"] > 0
    assert planes["line_input"] > 3 * planes["feedpoint"]


def test_the_damaged_antennas_are_at_the_storm_site_and_every_antenna_there_is_swept_after():
    assert len(SCENARIO.damaged) == 2
    site_keys = {a.key for a in SCENARIO.antennas if a.site == SCENARIO.storm_site}
    assert set(SCENARIO.damaged) <= site_keys
    assert SCENARIO.repaired not in SCENARIO.damaged
    for key in site_keys:
        assert any(s.measured_at > SCENARIO.storm_at for s in _sweeps_of(key)), key


# -- the files ---------------------------------------------------------------------------------


def test_demo_files_parse_back_exactly_and_are_deterministic(tmp_path):
    paths = write_demo_files(tmp_path / "a")
    assert len(paths) == len(SCENARIO.sweeps)
    assert len({p.name for p in paths}) == len(paths)
    again = write_demo_files(tmp_path / "b")
    for p, q, spec in zip(paths, again, SCENARIO.sweeps, strict=True):
        data = p.read_bytes()
        assert data == q.read_bytes()
        parsed = read_sweep(data, p.name)
        made = sweep_of(spec)
        np.testing.assert_array_equal(parsed.freq_hz, made.freq_hz)
        np.testing.assert_array_equal(parsed.gamma, made.gamma)
        # The file says when it was measured (A's parser reads the ISO time).
        assert parsed.source.measured_at is not None
        assert parsed.source.measured_at.replace(tzinfo=None) == spec.measured_at.replace(
            tzinfo=None
        )


# -- what the storm did, seen with the RF core ------------------------------------------------


def test_the_storm_detuned_one_antenna_beyond_the_fault_threshold():
    [detuned] = [k for k in SCENARIO.damaged if _post_storm(k).detune_hz]
    a = SCENARIO.antenna(detuned)
    band = a.bands[0]
    region = SCENARIO.site(a.site).itu_region
    centre = (get_band(band, region).low_hz + get_band(band, region).high_hz) / 2
    # The resonance itself may leave the band: find it over the whole sweep.
    before = compute_metrics(deembed(sweep_of(_baseline(detuned)), a.feedline.to_rf()))
    after = compute_metrics(deembed(sweep_of(_post_storm(detuned)), a.feedline.to_rf()))
    series = [r.hz for r in before.resonances if r.kind == "series"]
    moved = [r.hz for r in after.resonances if r.kind == "series"]
    shift = min(moved, key=lambda h: abs(h - series[0])) - series[0]
    assert shift == pytest.approx(_post_storm(detuned).detune_hz, rel=0.05)
    assert abs(shift) / centre * 100 > 1.5 * DEFAULT_THRESHOLDS.resonance_shift_fault_pct


def test_the_storm_left_water_in_one_feedline_as_much_as_the_scenario_says():
    [wet] = [k for k in SCENARIO.damaged if _post_storm(k).damage]
    spec = _post_storm(wet)
    [water] = [d for d in spec.damage if isinstance(d, WaterInLine)]
    a = SCENARIO.antenna(wet)
    fl = a.feedline.to_rf()
    base, now = sweep_of(_baseline(wet)), sweep_of(spec)
    share = (water.wet_length_m or fl.length_m) / fl.length_m
    cable_db = matched_loss_db(fl, now.freq_hz) - fl.connectors * fl.connector_loss_db
    extra_one_way = (water.loss_factor - 1) * share * cable_db
    # Where the antenna is badly matched the line-input |Γ| is set by the line: the
    # return loss there rises by twice the extra one-way loss (plus the step's ripple).
    mismatched = base.gamma_mag > np.median(base.gamma_mag)
    rise = now.return_loss_db[mismatched] - base.return_loss_db[mismatched]
    assert np.median(rise) == pytest.approx(2 * np.median(extra_one_way[mismatched]), rel=0.15)
    assert np.mean(rise > 0) > 0.9
    assert np.median(extra_one_way) > DEFAULT_THRESHOLDS.lossy_line_fault_db


def test_every_other_antenna_after_the_storm_differs_from_its_baseline_only_by_noise_and_drift():
    for a in SCENARIO.antennas:
        if a.key in SCENARIO.damaged:
            continue
        last = [s for s in _sweeps_of(a.key) if not s.damage and not s.erratic][-1]
        assert last.detune_hz == 0.0
        before, after = _feedpoint_metrics(_baseline(a.key)), _feedpoint_metrics(last)
        for b0, b1 in zip(before.bands, after.bands, strict=True):
            centre = (b0.low_hz + b0.high_hz) / 2
            if b0.resonance_hz is not None and b1.resonance_hz is not None:
                shift_pct = abs(b1.resonance_hz - b0.resonance_hz) / centre * 100
                limit = DEFAULT_THRESHOLDS.resonance_shift_watch_pct / 3
                assert shift_pct < limit, (a.key, b0.band)
            assert abs(b1.min_swr - b0.min_swr) < 0.1, (a.key, b0.band)
    # "Realistic but small": the trace noise of a careful calibrated analyzer.
    assert 0 < MEASUREMENT_NOISE < DEFAULT_THRESHOLDS.noise_sigma_max / 5


def test_the_repaired_antenna_had_a_fault_and_is_back_to_normal_after_the_repair():
    key = SCENARIO.repaired
    repair = next(e for e in SCENARIO.events if e.kind == "repair" and e.antenna == key)
    faulty = [s for s in _sweeps_of(key) if s.damage]
    assert faulty and all(s.measured_at < repair.occurred_at for s in faulty)
    after = next(s for s in _sweeps_of(key) if s.measured_at > repair.occurred_at)
    assert not after.damage
    # The fault (a broken line) shows as |Γ| near 1 across the sweep; after, a match again.
    assert sweep_of(faulty[0]).gamma_mag.min() > DEFAULT_THRESHOLDS.open_short_min_mag
    assert _feedpoint_metrics(after).bands[0].min_swr < 1.5


# -- loading through the records services ------------------------------------------------------


def test_loader_loads_the_club_and_the_storm_check_flags_exactly_the_damaged(session, clean_db):
    before = row_counts(clean_db)
    summary = load_demo_club(session, None)
    assert isinstance(summary, DemoSummary)
    counts = row_counts(clean_db)
    assert counts["site"] - before["site"] == len(SCENARIO.sites) == summary.sites
    assert counts["antenna"] - before["antenna"] == len(SCENARIO.antennas) == summary.antennas
    assert counts["feedline"] == sum(a.feedline is not None for a in SCENARIO.antennas)
    assert counts["event"] == len(SCENARIO.events) == summary.events
    assert counts["sweep"] == len(SCENARIO.sweeps) == summary.sweeps
    from sqlalchemy import select

    from mastwatch.db.models import Sweep as SweepRow
    from mastwatch.db.models import SweepMetrics

    stored = {
        (r.antenna_id, r.measured_at.replace(tzinfo=None)): r
        for r in session.scalars(select(SweepRow))
    }
    rows: dict[int, set[tuple[str, str]]] = {}
    for m in session.scalars(select(SweepMetrics)):
        rows.setdefault(m.sweep_id, set()).add((m.band, m.plane))
    for spec in SCENARIO.sweeps:
        a = SCENARIO.antenna(spec.antenna)
        row = stored[(summary.antenna_ids[spec.antenna], spec.measured_at.replace(tzinfo=None))]
        assert row.reference_plane == spec.plane
        assert row.original_size == len(touchstone_bytes(spec))
        # Every band of interest has its metrics row as measured and at the feedpoint
        # (the same sweep, or de-embedded through the antenna's feedline).
        assert spec.plane == "feedpoint" or a.feedline is not None
        planes = {"measured", "feedpoint"}
        for band in a.bands:
            for plane in planes:
                assert (band, plane) in rows[row.id], (spec.filename, band, plane)

    # -- the records' health on the loaded club (issue 5's storm test) -----------------
    from mastwatch.db.models import Event
    from mastwatch.services.health_records import current_baseline
    from mastwatch.services.sitecheck import site_check

    by_id = {v: k for k, v in summary.antenna_ids.items()}
    # Each antenna has the baseline its keeper confirmed: the first sweep, or the
    # first after its repair.
    for key, antenna_id in summary.antenna_ids.items():
        base = current_baseline(session, antenna_id)
        assert base is not None, key
        base_row = session.get(SweepRow, base.sweep_id)
        repairs = [
            e.occurred_at for e in SCENARIO.events if e.kind == "repair" and e.antenna == key
        ]
        first = min(
            s.measured_at
            for s in SCENARIO.sweeps
            if s.antenna == key and all(s.measured_at > r for r in repairs)
        )
        assert base_row.measured_at.replace(tzinfo=None) == first.replace(tzinfo=None), key

    storms = list(session.scalars(select(Event).where(Event.kind == "storm")))
    assert len(storms) == 2
    for storm in storms:
        check = site_check(session, storm.site_id, str(storm.id))
        flagged = {by_id[i] for i in check["flagged"]}
        if storm.occurred_at.replace(tzinfo=None) == SCENARIO.storm_at.replace(tzinfo=None):
            assert flagged == set(SCENARIO.damaged)
        else:
            assert flagged == set()
        assert check["not_swept"] == []
        assert check["cautions"]  # the check sends people up masts: cautions come with it

    # The verdict stored with each sweep: only the scenario's faults, and the failed sweep.
    expected = {}
    for spec in SCENARIO.sweeps:
        if spec.damage or spec.detune_hz:
            expected[(spec.antenna, spec.measured_at.replace(tzinfo=None))] = "fault"
        if spec.erratic:
            expected[(spec.antenna, spec.measured_at.replace(tzinfo=None))] = "unknown"
    not_ok = {
        (by_id[r.antenna_id], r.measured_at.replace(tzinfo=None)): r.status
        for r in stored.values()
        if r.status != "ok"
    }
    assert not_ok == expected
