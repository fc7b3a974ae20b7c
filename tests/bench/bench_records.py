"""Records service speed, measured side by side in one run, on SQLite and PostgreSQL.

1. Upload: 500 uploads of 1,601-point .s1p files through the real API (in-process
   httpx client: parse, metrics at both planes, one transaction) versus a *bare*
   endpoint defined here only (not in the app) that receives the same multipart
   upload and inserts the same bytes into the same ``sweep`` table, computing nothing.
   Target (issue 4): ratio ≤ 1.5×.
2. Trend: one metric of one band for an antenna with 10,000 sweeps, via the trend
   service (what the endpoint runs) and via the endpoint itself, versus the raw SQL
   select of the same three columns. Target: service/raw ≤ 2×. Plus the trend's time at
   1,000 vs 10,000 sweeps: it must grow no faster than the rows returned (ratio ≲ 10).

The trend rows are bulk-inserted (the query reads sweep_metrics only, so how they got
there does not matter). PostgreSQL is skipped, saying why, when it cannot be reached.
Times are medians of repeats (``time.perf_counter``); the machine is small and shared,
so read the ratios rather than the absolute times.
"""

from __future__ import annotations

import asyncio
import hashlib
import statistics
import tempfile
import time
from collections.abc import Callable
from datetime import UTC, datetime, timedelta
from pathlib import Path
from typing import Annotated

import httpx
from fastapi import FastAPI, File, Request, UploadFile
from sqlalchemy import Engine, insert, text

from mastwatch.api.app import create_app
from mastwatch.db import migrate
from mastwatch.db.engine import make_engine, make_sessionmaker
from mastwatch.db.models import Antenna, Site, SweepMetrics
from mastwatch.db.models import Sweep as SweepRow
from mastwatch.services import ingest, trend
from mastwatch.services.cables import sync_builtin_cable_types
from mastwatch.settings import Settings
from tests.dbfixtures import (
    _create_pg_database,
    _drop_pg_database,
    _pg_reachable,
    pg_admin_url,
    rlc_sweep,
)

UPLOADS = int(__import__("os").environ.get("BENCH_UPLOADS", 500))
POINTS = 1601
TREND_SIZES = (1_000, 10_000)
BANDS = ("80m", "40m", "20m")
TREND_REPEATS = 15


def _round_robin_medians(fns: dict[str, Callable[[], object]], repeats: int) -> dict[str, float]:
    """Median time of each function, run in turns so load changes hit all of them alike."""
    for fn in fns.values():
        fn()  # warm-up
    times: dict[str, list[float]] = {name: [] for name in fns}
    for _ in range(repeats):
        for name, fn in fns.items():
            t0 = time.perf_counter()
            fn()
            times[name].append(time.perf_counter() - t0)
    return {name: statistics.median(ts) for name, ts in times.items()}


def _add_bare_endpoint(app: FastAPI) -> None:
    """POST /bench/bare/{antenna_id}: store the upload's bytes in ``sweep``, nothing else."""

    @app.post("/bench/bare/{antenna_id}", status_code=201)
    def bare(antenna_id: int, request: Request, file: Annotated[UploadFile, File()]) -> dict:
        data = file.file.read()
        with request.app.state.sessionmaker() as session:
            row = SweepRow(
                antenna_id=antenna_id,
                measured_at=datetime.now(UTC),
                reference_plane="feedpoint",
                filename=file.filename or "x",
                original_size=len(data),
                sha256=hashlib.sha256(data).hexdigest(),
                original=data,
                freq_hz=b"",
                gamma=b"",
                z0=50.0,
                has_phase=True,
                points=0,
                f_start_hz=0.0,
                f_stop_hz=0.0,
            )
            session.add(row)
            session.commit()
            return {"id": row.id}


def _instrument_s1p(f0_hz: float) -> bytes:
    """A 1,601-point 1.8–30 MHz series-RLC sweep written the way analyzers export it:
    MHz, real/imaginary with 9 significant digits (not our repr-precision writer)."""
    sweep = rlc_sweep(f0_hz, points=POINTS, f_start_hz=1.8e6, f_stop_hz=30e6)
    rows = [
        f"{f / 1e6:.9g} {g.real:.9g} {g.imag:.9g}"
        for f, g in zip(sweep.freq_hz.tolist(), sweep.gamma.tolist(), strict=True)
    ]
    return ("! bench sweep\n# MHz S RI R 50\n" + "\n".join(rows) + "\n").encode()


def _files(n: int, salt: int) -> list[bytes]:
    # Distinct files (resonance stepping by 10 Hz) so no upload is a duplicate.
    return [_instrument_s1p(7.0e6 + 10.0 * i + salt) for i in range(n)]


def _make_antenna(engine: Engine, name: str) -> int:
    with make_sessionmaker(engine)() as s:
        site = Site(name=f"bench {name}", itu_region=1)
        s.add(site)
        s.flush()
        antenna = Antenna(site_id=site.id, name=name, kind="dipole", bands=list(BANDS))
        s.add(antenna)
        s.commit()
        return antenna.id


async def _upload_run(app: FastAPI, engine: Engine) -> tuple[float, float, float]:
    api_files, bare_files = _files(UPLOADS, 1), _files(UPLOADS, 3)
    api_antenna, bare_antenna = _make_antenna(engine, "api"), _make_antenna(engine, "bare")
    nohook_files, nohook_antenna = _files(UPLOADS, 5), _make_antenna(engine, "api without hook")
    transport = httpx.ASGITransport(app=app)
    async with httpx.AsyncClient(transport=transport, base_url="http://bench") as c:

        async def run(url: str, files: list[bytes]) -> float:
            t0 = time.perf_counter()
            for i, data in enumerate(files):
                r = await c.post(url, files={"file": (f"s{i}.s1p", data)})
                assert r.status_code == 201, r.text
            return time.perf_counter() - t0

        # Warm both paths, then alternate halves so drift on a shared machine hits both.
        await run(f"/api/v1/antennas/{api_antenna}/sweeps", [_files(1, 7)[0]])
        await run(f"/bench/bare/{bare_antenna}", [_files(1, 9)[0]])
        half = UPLOADS // 2
        t_api = t_bare = t_nohook = 0.0
        for part in (slice(0, half), slice(half, UPLOADS)):
            t_api += await run(f"/api/v1/antennas/{api_antenna}/sweeps", api_files[part])
            t_bare += await run(f"/bench/bare/{bare_antenna}", bare_files[part])
            # The same upload path without the post-ingest health verdict (issue 5's hook).
            saved = ingest._health_judge
            ingest._health_judge = lambda: None  # type: ignore[assignment]
            try:
                t_nohook += await run(
                    f"/api/v1/antennas/{nohook_antenna}/sweeps", nohook_files[part]
                )
            finally:
                ingest._health_judge = saved  # type: ignore[assignment]
    return t_api, t_bare, t_nohook


def _fill_trend(engine: Engine, antenna_id: int, n: int) -> None:
    """n sweeps (tiny blobs) with metrics rows for 3 bands × 2 planes, bulk-inserted."""
    t0 = datetime(2000, 1, 1, tzinfo=UTC)
    with engine.begin() as conn:
        start = conn.execute(text("SELECT COALESCE(MAX(id), 0) FROM sweep")).scalar_one() + 1
        sweeps = [
            {
                "id": start + i,
                "antenna_id": antenna_id,
                "measured_at": t0 + timedelta(hours=i),
                "measured_at_source": "form",
                "uploaded_at": t0,
                "reference_plane": "feedpoint",
                "operator": "",
                "conditions": "",
                "notes": "",
                "filename": f"{i}.s1p",
                "original_size": 0,
                "sha256": f"{antenna_id:08d}{i:056d}",
                "original": b"",
                "freq_hz": b"",
                "gamma": b"",
                "z0": 50.0,
                "has_phase": True,
                "points": 0,
                "f_start_hz": 0.0,
                "f_stop_hz": 0.0,
                "summary": {},
                "status_reasons": [],
            }
            for i in range(n)
        ]
        conn.execute(insert(SweepRow.__table__), sweeps)
        metrics = [
            {
                "sweep_id": s["id"],
                "antenna_id": antenna_id,
                "measured_at": s["measured_at"],
                "band": band,
                "plane": plane,
                "low_hz": 7.0e6,
                "high_hz": 7.2e6,
                "coverage": 1.0,
                "min_swr": 1.1 + (s["id"] % 100) / 1000,
                "resonance_hz": 7.1e6,
            }
            for s in sweeps
            for band in BANDS
            for plane in ("measured", "feedpoint")
        ]
        conn.execute(insert(SweepMetrics.__table__), metrics)
        if engine.dialect.name == "postgresql":
            conn.execute(text("ANALYZE sweep_metrics"))


def _trend_run(app: FastAPI, engine: Engine) -> dict[str, float]:
    ids = {}
    for n in TREND_SIZES:
        ids[n] = _make_antenna(engine, f"trend {n}")
        _fill_trend(engine, ids[n], n)
    maker = make_sessionmaker(engine)

    def service(n: int) -> Callable[[], object]:
        def go() -> object:
            with maker() as s:
                t = trend.antenna_trend(s, ids[n], "40m", "min_swr", "feedpoint")
                assert len(t.points) == n
                return t

        return go

    raw_sql = text(
        "SELECT sweep_id, measured_at, min_swr FROM sweep_metrics WHERE antenna_id = :a "
        "AND band = '40m' AND plane = 'feedpoint' ORDER BY measured_at"
    )

    def raw(n: int) -> Callable[[], object]:
        def go() -> object:
            with engine.connect() as conn:
                rows = conn.execute(raw_sql, {"a": ids[n]}).fetchall()
                assert len(rows) == n
                return rows

        return go

    client = httpx.AsyncClient(transport=httpx.ASGITransport(app=app), base_url="http://bench")
    loop = asyncio.new_event_loop()

    def endpoint(n: int) -> Callable[[], object]:
        def go() -> object:
            r = loop.run_until_complete(
                client.get(
                    f"/api/v1/antennas/{ids[n]}/trend", params={"band": "40m", "metric": "min_swr"}
                )
            )
            # Count the points without parsing: the client's JSON decoding is not the server's.
            assert r.status_code == 200 and r.content.count(b'"sweep_id"') == n
            return r

        return go

    variants = {
        f"{kind}_{n}": make(n)
        for n in TREND_SIZES
        for kind, make in (("service", service), ("raw", raw), ("endpoint", endpoint))
    }
    out = _round_robin_medians(variants, TREND_REPEATS)
    loop.run_until_complete(client.aclose())
    loop.close()
    return out


def _bench(label: str, url: str, data_dir: Path) -> None:
    migrate.upgrade(url)
    engine = make_engine(url)
    with make_sessionmaker(engine)() as s:
        sync_builtin_cable_types(s)
        s.commit()
    app = create_app(Settings(database_url=url, data_dir=data_dir), engine=engine)
    _add_bare_endpoint(app)
    try:
        t_api, t_bare, t_nohook = asyncio.run(_upload_run(app, engine))
        print(
            f"[{label}] upload {UPLOADS} × {POINTS}-point sweeps: API {t_api:.2f} s "
            f"({1e3 * t_api / UPLOADS:.1f} ms each), bare store {t_bare:.2f} s "
            f"({1e3 * t_bare / UPLOADS:.1f} ms each): ratio {t_api / t_bare:.2f}× (target ≤ 1.5×)"
        )
        print(
            f"[{label}] upload without the health-verdict hook: {t_nohook:.2f} s "
            f"({1e3 * t_nohook / UPLOADS:.1f} ms each): ratio {t_nohook / t_bare:.2f}× bare"
        )
        t = _trend_run(app, engine)
        big, small = TREND_SIZES[1], TREND_SIZES[0]
        print(
            f"[{label}] trend {big} sweeps: service {1e3 * t[f'service_{big}']:.1f} ms, "
            f"raw SQL {1e3 * t[f'raw_{big}']:.1f} ms: ratio "
            f"{t[f'service_{big}'] / t[f'raw_{big}']:.2f}× (target ≤ 2×); endpoint with JSON "
            f"{1e3 * t[f'endpoint_{big}']:.1f} ms "
            f"({t[f'endpoint_{big}'] / t[f'raw_{big}']:.2f}× raw)"
        )
        print(
            f"[{label}] trend growth {small} → {big} sweeps (rows ×{big // small}): service "
            f"×{t[f'service_{big}'] / t[f'service_{small}']:.1f}, raw SQL "
            f"×{t[f'raw_{big}'] / t[f'raw_{small}']:.1f}, endpoint "
            f"×{t[f'endpoint_{big}'] / t[f'endpoint_{small}']:.1f} (must be ≲ ×{big // small})"
        )
    finally:
        engine.dispose()


def main() -> None:
    with tempfile.TemporaryDirectory() as tmp:
        _bench("sqlite", f"sqlite:///{Path(tmp) / 'bench.sqlite3'}", Path(tmp))
        admin = pg_admin_url()
        reason = _pg_reachable(admin)
        if reason:
            print(f"[postgresql] skipped: {reason}")
            return
        url, name = _create_pg_database(admin)
        try:
            _bench("postgresql", url, Path(tmp))
        finally:
            _drop_pg_database(admin, name)


if __name__ == "__main__":
    main()
