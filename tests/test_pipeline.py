"""The pipeline: one assessment of a study, the same as its three stages run one by one.

The installations are the bundled examples (invented).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from coordination import checks, engine, faults, study
from coordination.pipeline import Assessment, assess
from coordination.report import write_report

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"


@pytest.mark.parametrize("name", ["small-shop.toml", "office-building.toml"])
@pytest.mark.parametrize("basis", [None, "typical", "envelope"])
def test_assessment_is_its_stages(name, basis):
    s = study.load(EXAMPLES / name)
    result = assess(s, basis)
    levels = faults.compute(s)
    analysis = engine.analyse(s, levels, basis=basis)
    results = checks.run(s, levels)
    assert result.levels == levels
    assert result.analysis == analysis
    assert result.checks == results
    assert result.basis == basis
    assert result.ok is bool(analysis.ok and all(r.ok for r in results))


def test_unmet_selectivity_alone_makes_the_assessment_fail():
    # the office example has non-selective pairs on purpose; its checks all pass
    s = study.load(EXAMPLES / "office-building.toml")
    result = assess(s)
    assert not result.analysis.ok and all(r.ok for r in result.checks)
    assert result.ok is False


def test_assessment_is_frozen():
    result = assess(study.load(EXAMPLES / "small-shop.toml"))
    assert isinstance(result, Assessment)
    with pytest.raises(AttributeError):
        result.ok = True  # type: ignore[misc]


def test_report_refuses_an_assessment_on_another_basis(tmp_path):
    s = study.load(EXAMPLES / "small-shop.toml")
    with pytest.raises(ValueError, match="basis"):
        write_report(s, tmp_path / "shop.pdf", basis="typical", assessment=assess(s, "envelope"))
    assert list(tmp_path.iterdir()) == []
