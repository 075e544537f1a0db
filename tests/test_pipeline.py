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


# common practice (start-up time): a check loads only what its study uses; the standby and
# motor modules come with the studies that have standby sources or motors, and no grid of
# currents goes through np.unique, whose first call imports numpy.ma (docs/performance.md)
@pytest.mark.parametrize(("name", "loaded", "absent"), [
    ("small-shop.toml", (), ("coordination.standby", "coordination.decay",
                             "coordination.generator", "coordination.motors", "numpy.ma")),
    ("plant-room.toml", ("coordination.motors",), ("coordination.standby",)),
    ("standby-generator.toml", ("coordination.standby", "coordination.generator"), ()),
])
def test_a_check_imports_what_its_study_uses(name, loaded, absent):
    import subprocess
    import sys

    code = ("import sys\n"
            "from coordination import study\n"
            "from coordination.pipeline import assess\n"
            f"assess(study.load({str(EXAMPLES / name)!r}))\n"
            "print(' '.join(sorted(m for m in sys.modules if m.startswith(('coordination', "
            "'numpy.ma')))))\n")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, cwd=Path(__file__).resolve().parents[1]).stdout.split()
    for module in loaded:
        assert module in out
    for module in absent:
        assert module not in out
