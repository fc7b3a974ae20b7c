"""The demo club through the health judge: the storms flag exactly what the scenario damaged.

Each antenna's sweep is judged against its baseline (the first sweep, or the first
after its repair) with ``services.health.judge``, the same comparison the site check
makes for every antenna of a site. The expected outcome is ``SCENARIO.damaged``.
Thresholds are the defaults (rules of thumb, common practice).
"""

from __future__ import annotations

from functools import cache

from mastwatch.demo.club import SCENARIO, SweepSpec, sweep_of
from mastwatch.rf.bands import bands_in
from mastwatch.rf.lines import deembed
from mastwatch.rf.metrics import compute_metrics
from mastwatch.services.health import SweepView, Verdict, judge


@cache
def _view(spec: SweepSpec) -> SweepView:
    """What the records service hands the judge: feedpoint metrics plus both arrays."""
    a = SCENARIO.antenna(spec.antenna)
    measured = sweep_of(spec)
    at_feed = measured
    if spec.plane == "line_input" and a.feedline is not None:
        at_feed = deembed(measured, a.feedline.to_rf())
    region = SCENARIO.site(a.site).itu_region
    metrics = compute_metrics(at_feed, bands_in(at_feed.f_start_hz, at_feed.f_stop_hz, region))
    return SweepView(metrics, spec.measured_at, measured, spec.plane, at_feed)


def _baseline_for(spec: SweepSpec) -> SweepSpec:
    """The first sweep of the antenna, or the first after its latest repair before ``spec``."""
    repairs = [
        e.occurred_at
        for e in SCENARIO.events
        if e.kind == "repair" and e.antenna == spec.antenna and e.occurred_at < spec.measured_at
    ]
    since = max(repairs) if repairs else None
    return next(
        s
        for s in SCENARIO.sweeps
        if s.antenna == spec.antenna and (since is None or s.measured_at > since)
    )


def _verdict(spec: SweepSpec) -> Verdict:
    a = SCENARIO.antenna(spec.antenna)
    line = a.feedline.to_rf() if a.feedline else None
    return judge(
        _view(spec),
        _view(_baseline_for(spec)),
        bands=list(a.bands),
        velocity_factor=line.cable.velocity_factor if line else None,
        line_length_m=line.length_m if line else None,
    )


def _site_check(site: str, since) -> dict[str, Verdict]:
    """Latest sweep since ``since`` of every antenna of ``site``, judged."""
    out = {}
    for a in SCENARIO.antennas:
        if a.site != site:
            continue
        after = [s for s in SCENARIO.sweeps if s.antenna == a.key and s.measured_at > since]
        assert after, f"{a.key} has no sweep since the event"
        out[a.key] = _verdict(after[-1])
    return out


def test_the_damaging_storm_flags_exactly_the_two_damaged_antennas():
    check = _site_check(SCENARIO.storm_site, SCENARIO.storm_at)
    flagged = {k for k, v in check.items() if v.status != "ok"}
    assert flagged == set(SCENARIO.damaged)
    for key in SCENARIO.damaged:
        assert check[key].status == "fault", (key, check[key].reasons)
    codes = {key: {f.code for f in check[key].findings} for key in SCENARIO.damaged}
    detuned = next(
        k for k in SCENARIO.damaged if any(s.detune_hz for s in SCENARIO.sweeps if s.antenna == k)
    )
    wet = next(k for k in SCENARIO.damaged if k != detuned)
    assert "lossy_feedline" in codes[wet], check[wet].reasons
    assert any("resonance moved" in r for r in check[detuned].reasons), check[detuned].reasons


def test_the_first_storm_damaged_nothing():
    storm1 = next(
        e for e in SCENARIO.events if e.kind == "storm" and e.occurred_at != SCENARIO.storm_at
    )
    check = _site_check(storm1.site, storm1.occurred_at)
    assert {k: v.status for k, v in check.items()} == dict.fromkeys(check, "ok")


def test_only_the_scenario_faults_are_ever_flagged_over_two_years():
    # Every sweep of every antenna against its baseline: noise and drift alone never
    # raise a flag; the crushed cable is a fault, the failed sweep cannot be judged.
    flagged = {}
    for spec in SCENARIO.sweeps:
        if spec is _baseline_for(spec):
            continue
        v = _verdict(spec)
        if v.status != "ok":
            flagged[(spec.antenna, spec.measured_at)] = v.status
    expected = {}
    for spec in SCENARIO.sweeps:
        if spec.damage or spec.detune_hz:
            expected[(spec.antenna, spec.measured_at)] = "fault"
        if spec.erratic:
            expected[(spec.antenna, spec.measured_at)] = "unknown"
    assert flagged == expected
