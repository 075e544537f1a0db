"""docs/study-file.md lists exactly the keys the study-file loader accepts, table by table.

The document lists each table's keys under a heading ``### Keys: <table>`` as the rows of a
Markdown table whose first cell is the key in backticks (`` | `pfc_a` | ... ``). A key the loader
accepts but the document does not list fails here, and so does a listed key the loader refuses.
Source of the keys: the loader itself (our study-file format, README.md "The study file").
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
import rtoml

from coordination import study
from curves.spec import band_from_spec


def loader_tables() -> dict[str, tuple[str, ...]]:
    """The keys the loader accepts, by the name of the document's section that lists them.

    The one place that imports the loader's key tuples: when they move to another module, fix
    the imports here.
    """
    from coordination.motors import INRUSH_KEYS, MOTOR_KEYS
    from coordination.residual import RCD_KEYS
    from coordination.study import (
        CABLE_KEYS,
        CIRCUIT_KEYS,
        STANDBY_KEYS,
        STUDY_KEYS,
        SUPPLY_KEYS,
        TOP_KEYS,
        TRANSFORMER_KEYS,
    )
    from curves.spec import FAMILY_KEYS

    tables = {
        "top level": TOP_KEYS,
        "[study]": STUDY_KEYS,
        "[supply]": SUPPLY_KEYS,
        "[supply.transformer]": TRANSFORMER_KEYS,
        "[[supply.standby]]": STANDBY_KEYS,
        "[[circuit]]": CIRCUIT_KEYS,
        "[circuit.cable]": CABLE_KEYS,
        "[circuit.motor]": MOTOR_KEYS,
        "[circuit.inrush]": INRUSH_KEYS,
        "[circuit.rcd]": RCD_KEYS,
    }
    # a device's inline table takes ``family`` besides its family's own keys
    for family, keys in FAMILY_KEYS.items():
        tables[f"device, family {family}"] = ("family", *keys)
    return tables


ROOT = Path(__file__).resolve().parents[1]
DOC = ROOT / "docs" / "study-file.md"
EXAMPLES = sorted((ROOT / "examples").glob("*.toml"))
TABLES = loader_tables()

_SECTION = re.compile(r"^### Keys: (?P<name>.+?)\s*$")
_ROW = re.compile(r"^\|\s*`(?P<key>[^`]+)`\s*\|")
_FENCE = re.compile(r"^```(?P<lang>\w*)\s*$")


def documented(text: str) -> dict[str, list[str]]:
    """The keys the document lists, by section name (backticks removed), in written order."""
    sections: dict[str, list[str]] = {}
    current: list[str] | None = None
    for line in text.splitlines():
        head = _SECTION.match(line)
        if head:
            current = sections.setdefault(head["name"].replace("`", ""), [])
        elif line.startswith("#"):
            current = None
        elif current is not None and (row := _ROW.match(line)):
            current.append(row["key"])
    return sections


def code_blocks(text: str, lang: str = "toml") -> list[tuple[str, str]]:
    """Fenced blocks of a language as (the heading above the block, the block's text)."""
    blocks: list[tuple[str, str]] = []
    heading, inside, lines = "", None, []
    for line in text.splitlines():
        fence = _FENCE.match(line)
        if inside is None and line.startswith("#"):
            heading = line.lstrip("#").strip()
        elif fence and inside is None:
            inside, lines = fence["lang"], []
        elif line.startswith("```") and inside is not None:
            if inside == lang:
                blocks.append((heading, "\n".join(lines) + "\n"))
            inside = None
        elif inside is not None:
            lines.append(line)
    return blocks


@pytest.fixture(scope="module")
def doc_text() -> str:
    return DOC.read_text(encoding="utf-8")


@pytest.fixture(scope="module")
def doc_keys(doc_text) -> dict[str, list[str]]:
    return documented(doc_text)


def test_the_document_has_a_section_for_every_table_and_no_other(doc_keys):
    assert sorted(doc_keys) == sorted(TABLES)


@pytest.mark.parametrize("table", sorted(TABLES))
def test_the_document_lists_exactly_the_keys_the_loader_accepts(doc_keys, table):
    listed = doc_keys.get(table, [])
    accepted = set(TABLES[table])
    undocumented = sorted(accepted - set(listed))
    refused = sorted(set(listed) - accepted)
    assert not undocumented, f"{table}: accepted by the loader, missing in {DOC.name}"
    assert not refused, f"{table}: listed in {DOC.name}, refused by the loader"


@pytest.mark.parametrize("table", sorted(TABLES))
def test_each_key_is_listed_once_per_table(doc_keys, table):
    listed = doc_keys.get(table, [])
    assert len(listed) == len(set(listed)), sorted(k for k in set(listed)
                                                   if listed.count(k) > 1)


def _keys_used(data: dict) -> list[tuple[str, str]]:
    """(section, key) for every key a parsed study file uses (not the ids in tested limits)."""
    families = {name.rsplit(" ", 1)[1].lower(): name for name in TABLES
                if name.startswith("device, family ")}
    used = [("top level", k) for k in data]
    used += [("[study]", k) for k in data.get("study", {})]
    supply = data.get("supply", {})
    used += [("[supply]", k) for k in supply]
    used += [("[supply.transformer]", k) for k in supply.get("transformer", {})]
    for circuit in data.get("circuit", []):
        used += [("[[circuit]]", k) for k in circuit]
        used += [("[circuit.cable]", k) for k in circuit.get("cable", {})]
        used += [("[circuit.rcd]", k) for k in circuit.get("rcd", {})]
        device = circuit.get("device")
        if isinstance(device, dict):
            family = str(device.get("family", "")).strip().lower().removeprefix("breaker-")
            used += [(families.get(family, f"device, family {family}"), k) for k in device]
    return used


@pytest.mark.parametrize("path", EXAMPLES, ids=[p.name for p in EXAMPLES])
def test_every_key_of_the_examples_is_in_the_document(doc_keys, path):
    data = rtoml.loads(path.read_text(encoding="utf-8"))
    used = _keys_used(data)
    assert used, f"{path.name}: no keys found"
    missing = sorted({(t, k) for t, k in used if k not in doc_keys.get(t, [])})
    assert not missing, f"{path.name}: keys used but not in {DOC.name}"


def test_the_short_complete_example_loads(doc_text):
    blocks = [b for h, b in code_blocks(doc_text) if h == "A short complete example"]
    assert len(blocks) == 1
    loaded = study.loads(blocks[0], source="example.toml")
    assert loaded.circuits and loaded.supply


def test_every_toml_block_is_valid_and_its_devices_build(doc_text):
    """Blocks of ``device = ...`` lines alone are read line by line (one key each)."""
    blocks = code_blocks(doc_text)
    assert len(blocks) >= 5
    devices = 0
    for _, block in blocks:
        lines = [ln for ln in block.splitlines() if ln.strip()]
        parts = lines if all(ln.startswith("device = ") for ln in lines) else [block]
        for part in parts:
            data = rtoml.loads(part)
            circuits = data.get("circuit", [])
            circuits = [circuits] if isinstance(circuits, dict) else circuits
            for table in [data, *circuits]:
                if "device" in table:
                    band_from_spec(table["device"])
                    devices += 1
    assert devices >= 5


def test_every_shorthand_the_document_shows_builds(doc_text):
    section = doc_text.split("### Shorthand", 1)[1].split("###", 1)[0]
    written = re.findall(r'`"([^"`]+)"`', section)
    assert len(written) >= 6
    for text in written:
        band = band_from_spec(text)
        assert band.rating_a > 0, text
