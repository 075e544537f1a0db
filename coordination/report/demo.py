"""The demo: check the bundled multi-board example and write its report."""

from __future__ import annotations

import os
import sys
from pathlib import Path

from coordination import CAUTION
from coordination.text import fit_lines
from curves.errors import InputError

#: The file name the demo writes; it replaces only a file of this name in the chosen folder.
DEMO_REPORT_NAME = "coordination-demo-report.pdf"
#: The bundled example the demo runs.
DEMO_EXAMPLE = "office-building.toml"


def bundled_example(name: str = DEMO_EXAMPLE) -> tuple[str, str]:
    """The text and a display name of a bundled example study.

    Installed, the examples are the package data ``coordination.examples``; in a source
    checkout (an editable install) they are the repository's ``examples/`` folder.

    Raises
    ------
    InputError
        When the installation lacks the example.

    Examples
    --------
    >>> text, where = bundled_example("small-shop.toml")
    >>> print(where.endswith("small-shop.toml"), "[[circuit]]" in text)
    True True
    """
    try:
        from importlib.resources import files

        resource = files("coordination.examples") / name
        if resource.is_file():
            return resource.read_text(encoding="utf-8"), str(resource)
    except (ModuleNotFoundError, FileNotFoundError, NotADirectoryError, TypeError):
        pass
    import coordination

    local = Path(coordination.__file__).resolve().parents[1] / "examples" / name
    if local.is_file():
        return local.read_text(encoding="utf-8"), str(local)
    raise InputError(f"the bundled example {name!r} is missing from this installation; "
                     "reinstall the package", key="demo")


def run_demo(output_dir: str | os.PathLike) -> int:
    """Check the bundled multi-board example and write its report into ``output_dir``.

    The folder is created when missing. Only a file named ``coordination-demo-report.pdf`` in it
    is ever replaced (atomically); nothing else is touched.

    Returns
    -------
    int
        0 when the demo ran (the example has non-selective pairs on purpose, so the checks'
        own exit code would be 1).

    Raises
    ------
    InputError
        When ``output_dir`` is a file.

    Examples
    --------
    Skipped under doctest because the whole report takes a few seconds; ``tests/test_report.py``
    runs it.

    >>> import tempfile
    >>> with tempfile.TemporaryDirectory() as folder:  # doctest: +SKIP
    ...     print(run_demo(folder))
    Demo: ...
    0
    """
    from coordination import study, tables
    from coordination.pipeline import assess

    from .write import write_report

    folder = Path(output_dir)
    if folder.exists() and not folder.is_dir():
        raise InputError(f"{str(folder)!r} is a file, not a folder; give a folder for the "
                         "report", key="-o")
    text, where = bundled_example()
    s = study.loads(text, source=where)
    result = assess(s)
    levels, analysis = result.levels, result.analysis
    print(f"Demo: {s.title}")
    print(f"study file: {where}\n")
    print(tables.check_text(s, levels, analysis, result.checks, study_path=where))
    print()
    folder.mkdir(parents=True, exist_ok=True)
    target = folder / DEMO_REPORT_NAME
    summary = write_report(s, target, progress=sys.stderr.isatty(), assessment=result)
    counts = analysis.summary()
    print(f"The example is invented and has non-selective pairs on purpose "
          f"({counts['partial']} partial, {counts['none']} none of {counts['pairs']}): their "
          "crossover zones are hatched on the plots.")
    print(f"report ({summary.pages} pages) written to {target.resolve()}")
    print(fit_lines(CAUTION))
    return 0

