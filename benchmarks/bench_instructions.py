"""Benchmark: machine instructions of whole processes, a measure this machine's drift leaves alone.

Run from the repository root, with valgrind installed (not collected by pytest)::

    python -m benchmarks.bench_instructions

Wall time on the shared 2-core machine drifts by half within a minute, so two versions of the
tool are best compared by the instructions their processes execute (``valgrind
--tool=callgrind``, which counts them exactly: the same run gives the same count to within a
thousandth). It counts the import floor (``python -c "import numpy, scipy, shapely"``), a check
of a two-circuit study (the tool's fixed cost: its imports) and the check of the invented
2,061-circuit building, each once. An instruction is not a fixed slice of wall time (loading
numpy's shared libraries costs more time per instruction than our loops do), so the ratios here
run higher than the wall-time ratios of ``benchmarks.bench_all``; each takes about 30 s.
"""

from __future__ import annotations

import re
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent))

from benchmarks.bench_all import ENV  # noqa: E402
from benchmarks.generate import building, wide  # noqa: E402


def instructions(cmd: list[str]) -> int:
    """Instructions a command's process executes (``I refs`` of callgrind), after one run
    outside valgrind that leaves the byte code cached, as an installed tool has it."""
    subprocess.run(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=ENV)
    run = subprocess.run(["valgrind", "--tool=callgrind", "--callgrind-out-file=/dev/null", *cmd],
                         stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True, env=ENV)
    found = re.search(r"I\s+refs:\s+([\d,]+)", run.stderr)
    if found is None:
        raise RuntimeError(f"no instruction count from valgrind for {cmd}: {run.stderr[-300:]}")
    return int(found.group(1).replace(",", ""))


def main() -> None:
    if shutil.which("valgrind") is None:
        sys.exit("valgrind is not installed")
    exe = [sys.executable, "-m", "coordination"]
    with tempfile.TemporaryDirectory() as tmp:
        full = Path(tmp) / "building-2061.toml"
        full.write_text(building(10, 5, 40))
        tiny = Path(tmp) / "one-final-circuit.toml"
        tiny.write_text(wide(1))
        counts = {
            "import floor (numpy, scipy, shapely)":
                instructions([sys.executable, "-c", "import numpy, scipy, shapely"]),
            "check, 2 circuits (the fixed cost)":
                instructions([*exe, "check", str(tiny), "--json"]),
            "check, full (2,061 circuits)":
                instructions([*exe, "check", str(full), "--json"]),
        }
    floor = counts["import floor (numpy, scipy, shapely)"]
    print(f"{'whole process (valgrind --tool=callgrind)':44} {'instructions':>14} {'x floor':>8}")
    for name, count in counts.items():
        print(f"{name:44} {count:14,} {count / floor:8.2f}")


if __name__ == "__main__":
    main()
