"""``make bench``: run every ``tests/bench/bench_*.py`` module's ``main()`` in one process.

Each benchmark measures ours and its reference side by side in the same run and prints
ratios (the machine is small and noisy: absolute times mean little, ratios travel).
Run one: ``python -m tests.bench ingest``.
"""

from __future__ import annotations

import importlib
import pkgutil
import sys
from pathlib import Path


def main(argv: list[str]) -> int:
    here = Path(__file__).parent
    names = sorted(m.name for m in pkgutil.iter_modules([str(here)]) if m.name.startswith("bench_"))
    wanted = [f"bench_{a}" if not a.startswith("bench_") else a for a in argv]
    for name in names:
        if wanted and name not in wanted:
            continue
        print(f"\n== {name} ==", flush=True)
        importlib.import_module(f"tests.bench.{name}").main()
    return 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
