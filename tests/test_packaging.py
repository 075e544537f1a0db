"""The installed package holds every module of the source tree (common practice: a package
left out of the build installs without error and fails only when imported)."""

from __future__ import annotations

import tomllib
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def test_every_package_is_listed_for_the_build() -> None:
    config = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))
    listed = set(config["tool"]["setuptools"]["packages"])
    found = {
        ".".join(init.parent.relative_to(ROOT).parts)
        for top in ("coordination", "curves")
        for init in (ROOT / top).rglob("__init__.py")
    }
    assert found - listed == set(), "packages missing from pyproject.toml"
