"""Write the JSON outputs of a set of studies into a folder, to compare before and after a change.

Run from the repository root (not collected by pytest)::

    python -m benchmarks.snapshot /tmp/before   # on the commit before the change
    python -m benchmarks.snapshot /tmp/after    # with the change
    diff -r /tmp/before /tmp/after              # a change meant to be faster leaves no difference

The studies: the bundled examples, the same installations under TT (invented variants), and
the benchmark's generated building (``benchmarks/generate.py``). Each command's output goes to
``<study>.<command>.json`` and its exit code to ``<study>.<command>.exit``.
"""

from __future__ import annotations

import re
import subprocess
import sys
import tempfile
from pathlib import Path

HERE = Path(__file__).resolve().parent
ROOT = HERE.parent
sys.path.insert(0, str(ROOT))

from benchmarks.generate import building  # noqa: E402


def _as_tt(text: str) -> str:
    """The same installation under a TT system (Ze of a typical installation earth electrode)."""
    text = re.sub(r"^ze_ohm\s*=.*$", "", text, flags=re.MULTILINE)
    return re.sub(r'^earthing\s*=\s*"[^"]*"', 'earthing = "TT"\nze_ohm = 21.0', text,
                  flags=re.MULTILINE)


def studies(folder: Path) -> dict[str, tuple[Path, list[list[str]]]]:
    """Study name -> (file, extra commands beyond check and faults)."""
    out: dict[str, tuple[Path, list[list[str]]]] = {}
    for example in sorted((ROOT / "examples").glob("*.toml")):
        text = example.read_text(encoding="utf-8")
        out[example.stem] = (example, [["choose", "--board", "supply"]])
        tt = folder / f"{example.stem}-tt.toml"
        tt.write_text(_as_tt(text), encoding="utf-8")
        out[tt.stem] = (tt, [])
    generated = folder / "building-2061.toml"
    generated.write_text(building(10, 5, 40), encoding="utf-8")
    out[generated.stem] = (generated, [["choose", "--circuit", "riser-1"]])
    return out


def main() -> None:
    if len(sys.argv) != 2:
        sys.exit("usage: python -m benchmarks.snapshot FOLDER")
    target = Path(sys.argv[1])
    target.mkdir(parents=True, exist_ok=True)
    with tempfile.TemporaryDirectory() as tmp:
        for name, (path, extra) in studies(Path(tmp)).items():
            for command in (["check"], ["faults"], *extra):
                proc = subprocess.run(
                    [sys.executable, "-m", "coordination", command[0], str(path), *command[1:],
                     "--json"], capture_output=True, cwd=ROOT, check=False)
                stem = f"{name}.{'-'.join(command)}"
                (target / f"{stem}.json").write_bytes(proc.stdout)
                (target / f"{stem}.exit").write_text(f"{proc.returncode}\n{proc.stderr.decode()}")
                print(f"{stem}: exit {proc.returncode}, {len(proc.stdout):,} bytes")


if __name__ == "__main__":
    main()
