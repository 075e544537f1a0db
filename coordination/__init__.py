"""coordination: selectivity studies of low-voltage protective devices.

The Python API and the command line call the same functions::

    from coordination import study, faults, engine
    s = study.load("examples/small-shop.toml")
    levels = faults.compute(s)
    analysis = engine.analyse(s, levels)

or all three stages at once, as ``check`` runs them::

    from coordination.pipeline import assess
    result = assess(s)  # result.levels, result.analysis, result.checks, result.ok
"""

__version__ = "0.1.0"

#: The caution every verdict printout, the README and the report carry.
CAUTION = (
    "Design aid only: verify every result against the manufacturers' data; local codes and a "
    "qualified, licensed person decide."
)
