"""The demo club's storms through the site check, on the records (SQLite and PostgreSQL).

The demo (engineer G's ``mastwatch.demo``) loads an invented club through the real
upload path; its scenario says which antennas storm 2 damaged (``SCENARIO.damaged``:
one bent vertical, one feedline with water in it). The site check after that storm
must flag exactly those two, and after storm 1 (nothing damaged) none.
"""

from __future__ import annotations

from sqlalchemy import select
from sqlalchemy.orm import Session

from mastwatch.db.models import Event
from mastwatch.demo.club import SCENARIO
from mastwatch.demo.loader import load
from mastwatch.services.sitecheck import site_check


def _storms(session: Session, site_id: int) -> list[Event]:
    return list(
        session.scalars(select(Event).where(Event.site_id == site_id, Event.kind == "storm"))
    )


def test_storm_checks_flag_exactly_the_damaged_antennas(session: Session) -> None:
    # One test, so the demo (about 100 uploads) is loaded once per database.
    demo = load(session, SCENARIO)
    site_id = demo.site_ids[SCENARIO.storm_site]
    (storm,) = [e for e in _storms(session, site_id) if e.occurred_at == SCENARIO.storm_at]
    check = site_check(session, site_id, str(storm.id))
    names = {r["antenna"]["id"]: r["antenna"]["name"] for r in check["antennas"]}
    flagged = sorted(names[i] for i in check["flagged"])
    assert flagged == sorted(SCENARIO.damaged_names())
    assert check["not_swept"] == []
    by_name = {r["antenna"]["name"]: r for r in check["antennas"]}
    for key in SCENARIO.damaged:
        row = by_name[SCENARIO.antenna(key).name]
        assert row["status"] in ("watch", "fault")
        assert row["reasons"], row
    # The wet feedline is named as such.
    wet = next(
        r
        for r in check["antennas"]
        if r["flagged"] and any("water in the coax" in t for t in r["reasons"])
    )
    assert wet["antenna"]["name"] in SCENARIO.damaged_names()

    # A storm that damaged nothing flags nothing.
    for site_id in demo.site_ids.values():
        for storm in _storms(session, site_id):
            if storm.occurred_at == SCENARIO.storm_at:
                continue
            check = site_check(session, site_id, str(storm.id))
            assert check["flagged"] == [], [r["reasons"] for r in check["antennas"]]
