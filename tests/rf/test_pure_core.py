"""mastwatch.rf is pure computation: importing all of it loads no web, DB, plot or CLI code."""

from __future__ import annotations

import json
import pkgutil
import subprocess
import sys

import mastwatch.rf

FORBIDDEN = ("fastapi", "sqlalchemy", "plotly", "pydantic", "typer", "starlette", "rich")


def test_rf_modules_import_without_web_db_plot_or_cli_packages() -> None:
    modules = sorted(f"mastwatch.rf.{m.name}" for m in pkgutil.iter_modules(mastwatch.rf.__path__))
    assert "mastwatch.rf.metrics" in modules and "mastwatch.rf.bands" in modules
    code = (
        "import importlib, json, sys\n"
        f"for m in {modules!r}: importlib.import_module(m)\n"
        f"print(json.dumps(sorted(n for n in {FORBIDDEN!r} if n in sys.modules)))\n"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True, timeout=120
    )
    assert json.loads(out.stdout) == []
