"""The command line: parse, call the same functions as the Python API, print.

Exit codes: 0 every requirement met, 1 a requirement not met, 2 bad input or usage.
Heavy modules (matplotlib, the report) are imported only inside the commands that need them.
"""

from __future__ import annotations

import errno
import gc
import math
import os
import signal
import sys
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from functools import wraps
from pathlib import Path
from typing import Annotated, Any, NoReturn

import orjson
import typer

from coordination import CAUTION, __version__, io
from curves.errors import InputError

app = typer.Typer(
    add_completion=False,
    no_args_is_help=True,
    pretty_exceptions_enable=False,
    help=(
        "Selectivity studies of low-voltage protective devices: device bands, fault levels, "
        "selectivity of every upstream/downstream pair, protection checks, a chooser, plots "
        "and a report. " + CAUTION
    ),
)

JsonOption = Annotated[bool, typer.Option("--json", help="Machine-readable JSON on stdout.")]
StudyArg = Annotated[Path, typer.Argument(help="The study file (TOML).", show_default=False)]
BasisOption = Annotated[
    str | None,
    typer.Option("--basis", help="Band basis for selectivity: typical or envelope "
                 "(default: the study's, else typical)."),
]


def fail(message: str) -> None:
    """Print one line on stderr and exit with code 2."""
    typer.echo(f"error: {message}", err=True)
    raise typer.Exit(2)


#: The exit code a command has decided before it prints (its verdict): a reader that closes the
#: pipe early (``check ... | head -1``) leaves the command with this code, not an error's.
_verdict: int | None = None


def verdict(code: int | None) -> int | None:
    """Record the command's exit code before its output is printed; returns ``code``."""
    global _verdict
    _verdict = code
    return code


def _quiet_stdout() -> None:
    """After a failed write to stdout, point it at the null device (in its own process only):
    what is left in its buffer is dropped instead of failing again at exit."""
    if not _own_process or sys.stdout is None:
        return
    try:
        null = os.open(os.devnull, os.O_WRONLY)
        os.dup2(null, sys.stdout.fileno())
        os.close(null)
    except (OSError, ValueError, AttributeError):
        pass


def _os_error(error: BaseException) -> OSError | None:
    """The OSError behind an error, if any: a library that fails while cleaning up after a
    failed write (matplotlib's PDF writer flushing its compressor on a full disk raises
    ``zlib.error``) hides the write's own error in ``__context__``."""
    seen: set[int] = set()
    node: BaseException | None = error
    while node is not None and id(node) not in seen:
        if isinstance(node, OSError):
            return node
        seen.add(id(node))
        node = node.__cause__ or node.__context__
    return None


def _os_message(error: OSError) -> str:
    """One line for an operating-system error; a failed write (full disk, file too large,
    quota, I/O error) says that the output could not be written."""
    reason = error.strerror or str(error) or type(error).__name__
    where = getattr(error, "filename", None)
    if where:
        return f"{where}: {reason}"
    if error.errno in (errno.ENOSPC, errno.EFBIG, getattr(errno, "EDQUOT", errno.ENOSPC),
                       errno.EIO):
        return f"the output could not be written: {reason}"
    return reason


def guarded(command: Callable[..., Any]) -> Callable[..., Any]:
    """Turn our input errors and unwritable paths into one line and exit code 2.

    A closed pipe on stdout ends the command quietly with its verdict (:func:`verdict`), or 0
    when it had none yet.
    """

    @wraps(command)
    def run(*args: Any, **kwargs: Any) -> Any:
        verdict(None)
        try:
            return command(*args, **kwargs)
        except InputError as error:
            fail(str(error))
        except BrokenPipeError:
            _quiet_stdout()
            raise typer.Exit(_verdict if _verdict is not None else 0) from None
        except (OSError, UnicodeError) as error:
            if isinstance(error, OSError):
                fail(_os_message(error))
            fail(str(error))
        except RecursionError:  # pragma: no cover - the code is iterative; a last guard
            fail("the study is nested too deeply to process")
        except Exception as error:  # an error raised while cleaning up after a failed write
            cause = None if isinstance(error, typer.Exit | typer.Abort) else _os_error(error)
            if cause is None:
                raise
            fail(_os_message(cause))

    return run


def _plain(v: Any) -> Any:
    """What the encoder cannot write itself, as plain JSON values (orjson's ``default`` hook)."""
    if isinstance(v, Mapping):
        return dict(v)
    if isinstance(v, set | frozenset):
        return sorted(v)
    if hasattr(v, "item") and callable(v.item):  # numpy scalars
        return v.item()
    if isinstance(v, Path):
        return str(v)
    raise TypeError(f"{type(v).__name__} is not JSON serialisable")


def json_bytes(value: Any) -> bytes:
    """Compact UTF-8 JSON with inf/NaN as null, the contract's ``null`` for never.

    Written by orjson: a building's check runs to megabytes, mostly floats, which the standard
    library's encoder formats about ten times more slowly (0.07 s against 0.007 s for a
    2,061-circuit check); orjson also writes non-finite floats as null, as the contract asks.
    Compact (no indentation); pipe through ``python -m json.tool`` to read it. A mapping with
    keys that are not text has them written as text, as the standard library does (orjson
    checks every key for that only when asked: a third slower, so only on a second try).
    """
    try:
        return orjson.dumps(value, default=_plain, option=orjson.OPT_SERIALIZE_NUMPY)
    except orjson.JSONEncodeError:
        return orjson.dumps(value, default=_plain,
                            option=orjson.OPT_SERIALIZE_NUMPY | orjson.OPT_NON_STR_KEYS)


def to_json(value: Any) -> str:
    """:func:`json_bytes` as text."""
    return json_bytes(value).decode("utf-8")


#: Records encoded and written at a time by :func:`echo_json`.
JSON_BLOCK = 500


@dataclass(frozen=True)
class Records:
    """Items written to JSON as the list of ``record(item)``, a block at a time (see echo_json)."""

    items: Sequence[Any]
    record: Callable[[Any], Any]


def echo_json(value: Any) -> None:
    """Print a value as JSON on stdout (as bytes: no scan for terminal colour codes).

    A :class:`Records` value at the top level of a mapping is encoded and written
    :data:`JSON_BLOCK` records at a time: the same bytes as the whole at once, without holding
    every record's dict and all of the text together (a building's check is 14,000 records and
    9 MB; built whole, they grew the process by 26 MB, and memory first touched costs time).
    """
    if not (isinstance(value, Mapping) and any(isinstance(v, Records) for v in value.values())):
        typer.echo(json_bytes(value))
        return
    out = [b"{"]
    for n, (key, item) in enumerate(value.items()):
        out.append((b"," if n else b"") + json_bytes(str(key)) + b":")
        if not isinstance(item, Records):
            out.append(json_bytes(item))
            continue
        out.append(b"[")
        for start in range(0, len(item.items), JSON_BLOCK):
            block = json_bytes([item.record(x) for x in item.items[start:start + JSON_BLOCK]])
            out.append(block[1:-1] if start == 0 else b"," + block[1:-1])  # without its [ ]
            typer.echo(b"".join(out), nl=False)
            out = []
        out.append(b"]")
    out.append(b"}")
    typer.echo(b"".join(out))


#: Thread counts of the BLAS libraries numpy may be built with (OpenBLAS, MKL), read when numpy
#: is first imported.
BLAS_THREADS = ("OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS")
#: Set by :func:`main`: the command line runs as its own process, whose stdout a failed write may
#: point at the null device (:func:`_quiet_stdout`). Unset in process (the tests' runner, the
#: Python API).
_own_process = False


def load_study(path: Path):
    from coordination import study

    return study.load(path)


def check_basis(basis: str | None) -> str | None:
    if basis is not None and basis not in ("typical", "envelope"):
        raise InputError(f"unknown basis {basis!r}; allowed: typical, envelope", key="--basis")
    return basis


@app.callback(invoke_without_command=True)
def _root(
    version: Annotated[bool, typer.Option("--version", help="Print the version and exit.")] = False,
) -> None:
    if version:
        typer.echo(f"coordination {__version__}")
        raise typer.Exit(0)


# ---------------------------------------------------------------------------------------------
@app.command()
@guarded
def times(
    spec: Annotated[str, typer.Argument(help='Device: shorthand ("B32", "C16", "gG100") or an '
                                        'inline TOML table ("{family=\'tm\', In_a=250}").',
                                        show_default=False)],
    current: Annotated[list[float], typer.Option("--current", "-i",
                                                 help="Prospective current [A]; repeat.")],
    basis: Annotated[str, typer.Option("--basis", help="typical or envelope.")] = "typical",
    as_json: JsonOption = False,
) -> None:
    """Earliest and latest operating time of one device at given currents."""
    from curves.spec import band_from_spec, parse_inline

    check_basis(basis)
    for i in current:
        if not math.isfinite(i) or i <= 0:
            raise InputError(f"current {i:g} A is not allowed; give a finite positive current",
                             key="--current")
    band = band_from_spec(parse_inline(spec), basis=basis)
    t_lo = band.t_min(current)
    t_hi = band.t_max(current)
    points = [
        {"current_a": float(i), "t_min_s": float(lo), "t_max_s": float(hi)}
        for i, lo, hi in zip(current, t_lo, t_hi, strict=True)
    ]
    if as_json:
        echo_json({"device": band.name, "basis": band.basis,
                   "settings": dict(band.settings), "notes": list(band.notes),
                   "points": points})
        return
    from coordination.tables import times_table

    typer.echo(times_table(band, points))


@app.command()
@guarded
def faults(study_path: StudyArg, as_json: JsonOption = False) -> None:
    """Fault levels at every board and circuit end."""
    from coordination import faults as fault_levels
    from coordination import tables

    s = load_study(study_path)
    levels = fault_levels.compute(s)
    cases = ()
    if s.supply.standby:
        from coordination.standby import case_levels

        cases = tuple(case_levels(s, source) for source in s.supply.standby)
    if as_json:  # FaultLevels.to_json(), its nodes written a block at a time (as in check)
        payload = {"nodes": Records(levels.nodes, fault_levels.NodeFaults.to_json),
                   "origin": levels.origin_json(), "convention": levels.convention}
        if cases:  # one entry per standby source, its nodes carrying "case"
            payload["cases"] = [case.to_json() for case in cases]
        echo_json(payload)
    else:
        typer.echo(tables.fault_table(s, levels))
        for case in cases:
            typer.echo("")
            typer.echo(tables.case_fault_table(s, case))


@app.command()
@guarded
def check(
    study_path: StudyArg,
    as_json: JsonOption = False,
    basis: BasisOption = None,
    every_row: Annotated[bool, typer.Option(
        "--all", help="Print every pair and every check (default: a summary and what fails "
        "or is near its limit).")] = False,
) -> None:
    """Selectivity of every upstream/downstream pair, plus the protection checks."""
    from coordination import checks, engine, rules, tables
    from coordination.pipeline import assess
    from coordination.text import fit_lines

    s = load_study(study_path)
    result = assess(s, check_basis(basis))
    analysis = result.analysis
    verdict(0 if result.ok else 1)
    pairs, results = analysis.all_pairs, result.checks
    for case in result.cases:  # every case's rows after the normal supply's, each with "case"
        pairs, results = (*pairs, *case.analysis.pairs), (*results, *case.checks)
    if as_json:
        payload = {"pairs": Records(pairs, engine.PairResult.to_json),
                   "summary": analysis.summary(),
                   "checks": Records(results, checks.CheckResult.json_record),
                   "rules": rules.json_rules(s.rule_set),
                   "ok": result.ok, "caution": CAUTION}
        if result.cases:
            payload["cases"] = {c.name: {"summary": c.analysis.summary(), "ok": c.ok}
                                for c in result.cases}
        echo_json(payload)
    else:
        typer.echo(tables.check_text(s, result.levels, analysis, result.checks,
                                     every_row=every_row, study_path=str(study_path)))
        typer.echo("")
        for case in result.cases:  # each standby source's pairs and checks, as above
            typer.echo(tables.case_text(s, case, every_row=every_row))
            typer.echo("")
        typer.echo(fit_lines(CAUTION))
    raise typer.Exit(0 if result.ok else 1)


@app.command()
@guarded
def choose(
    study_path: StudyArg,
    circuit: Annotated[str | None, typer.Option("--circuit", help="Circuit id to choose for.")]
    = None,
    board: Annotated[str | None, typer.Option(
        "--board", help="Choose every sub-main and incomer above the final circuits of a "
        "board, bottom up: the board's name as printed or the id of the circuit feeding it "
        "('origin' for the whole study).")] = None,
    family: Annotated[str | None, typer.Option(
        "--family", help="Device family to search: B, C, D (MCB types), gG, tm, electronic.")]
    = None,
    as_json: JsonOption = False,
) -> None:
    """Smallest rating or settings for a circuit's device that meet every requirement."""
    from coordination import choose as chooser

    s = load_study(study_path)
    if (circuit is None) == (board is None):
        raise InputError("give exactly one of --circuit ID or --board ID", key="--circuit")
    if circuit is not None:
        result = chooser.choose(s, circuit, family=family)
        results = [result]
    else:
        results = list(chooser.choose_board(s, board, family=family))
    verdict(0 if all(r.found for r in results) else 1)
    if as_json:
        payload = results[0].to_json() if circuit is not None else {
            "choices": [r.to_json() for r in results]}
        payload["caution"] = CAUTION
        echo_json(payload)
    else:
        typer.echo(chooser.format_results(results))
        typer.echo(CAUTION)
    raise typer.Exit(0 if all(r.found for r in results) else 1)


def _drawing_output(output: Path, study_path: Path, what: str) -> None:
    """Before a command draws: the collector back on (matplotlib's figures hold reference
    cycles, see main), and the output path checked (not the study, a PNG, SVG or PDF)."""
    gc.enable()
    from coordination.io import check_output_path

    check_output_path(output, inputs=(study_path,), key="-o")
    if output.suffix.lower() not in (".png", ".svg", ".pdf"):
        raise InputError(f"unknown {what} format {output.suffix!r}; allowed: .png, .svg, .pdf",
                         key="-o")


@app.command()
@guarded
def plot(
    study_path: StudyArg,
    circuit: Annotated[str, typer.Option("--circuit", help="Circuit id to plot.")],
    output: Annotated[Path, typer.Option("-o", "--output", help="PNG, SVG or PDF file.")],
    basis: BasisOption = None,
    residual: Annotated[bool, typer.Option(
        "--residual", help="Residual-current plot (mA) of the circuit's RCD and the RCDs above "
        "it; the only plot of an RCCB (rcd without device).")] = False,
) -> None:
    """Time-current plot of a circuit and everything above it."""
    _drawing_output(output, study_path, "plot")
    from coordination import plot as plotting
    from coordination.io import save_figure
    from coordination.pipeline import assess

    s = load_study(study_path)
    if circuit not in s.by_id:
        raise InputError(f"no circuit {circuit!r} in the study", key="--circuit")
    result = assess(s, check_basis(basis))
    if residual or s.by_id[circuit].device is None:
        from coordination.plot_residual import plot_residual
        from coordination.residual import rcds_on_path

        if not rcds_on_path(s, circuit):
            raise InputError(f"circuit {circuit!r} has no RCD on it or above it to draw; "
                             "allowed: --residual for a circuit with an rcd on its path",
                             key="--residual")
        fig = plot_residual(s, circuit, levels=result.levels)
    else:
        fig = plotting.plot_circuit(s, result.levels, result.analysis, circuit,
                                    results=result.checks,
                                    cases=[c.case for c in result.cases])
    save_figure(fig, output)
    typer.echo(f"wrote {output}")


@app.command()
@guarded
def diagram(
    study_path: StudyArg,
    output: Annotated[Path, typer.Option("-o", "--output", help="PNG, SVG or PDF file.")],
    board: Annotated[str | None, typer.Option(
        "--board", help="Only this board: its name as printed or the id of the circuit "
        "feeding it ('origin' for the board the supply feeds).")] = None,
    basis: BasisOption = None,
) -> None:
    """Installation diagram: supply, boards and circuits, failing ones marked (a PDF has a
    sheet per board of a large study; an image the first view)."""
    _drawing_output(output, study_path, "diagram")
    from coordination import diagram as drawing
    from coordination.pipeline import assess
    from coordination.text import fit_lines

    s = load_study(study_path)
    if board is not None:
        drawing.plan(s, board=board)  # an unknown board is refused before anything is computed
    result = assess(s, check_basis(basis))
    verdict(0 if result.ok else 1)
    sheets = drawing.write_diagram(s, result.levels, result.analysis, result.checks, output,
                                   board=board, title_block=s.title_block)
    typer.echo(f"wrote {output} ({sheets} sheet{'s' if sheets != 1 else ''})")
    typer.echo(fit_lines(CAUTION))
    raise typer.Exit(0 if result.ok else 1)


@app.command()
@guarded
def report(
    study_path: StudyArg,
    output: Annotated[Path, typer.Option("-o", "--output", help="The PDF to write.")],
    csv: Annotated[bool, typer.Option("--csv", help="Also write the tables as CSV beside it.")]
    = False,
    basis: BasisOption = None,
) -> None:
    """The selectivity report of the whole study (PDF)."""
    gc.enable()  # matplotlib's figures hold reference cycles (see main)
    from coordination.io import check_output_path

    check_output_path(output, inputs=(study_path,), key="-o")
    if output.suffix.lower() != ".pdf":
        raise InputError(f"the report is a PDF; give a file ending in .pdf, not {output.name!r}",
                         key="-o")
    from coordination import report as reporting

    s = load_study(study_path)
    summary = reporting.write_report(s, output, csv=csv, basis=check_basis(basis),
                                     progress=sys.stderr.isatty())
    verdict(0 if summary.ok else 1)
    typer.echo(f"wrote {output}")
    for extra in summary.extra_files:
        typer.echo(f"wrote {extra}")
    raise typer.Exit(0 if summary.ok else 1)


@app.command()
@guarded
def demo(
    output_dir: Annotated[Path, typer.Option("-o", "--output-dir", help="Folder for the report.")]
    = Path("coordination-demo"),
) -> None:
    """Run check and the report on the bundled example installation."""
    gc.enable()  # matplotlib's figures hold reference cycles (see main)
    from coordination import report as reporting

    code = reporting.run_demo(output_dir)
    raise typer.Exit(code)


def main() -> NoReturn:
    """Console entry point: usage errors, like input errors, are one line and exit code 2.

    The tool does no linear algebra, so numpy's BLAS gets one thread (unless the environment
    says otherwise): starting a pool of BLAS threads on import cost 0.01-0.02 s a command
    (docs/performance.md).

    The cyclic garbage collector is off: a check builds a few hundred thousand acyclic objects
    that reference counting frees, and the collector's passes over them cost 0.05 s of a
    2,061-circuit check for nothing freed (docs/performance.md). The commands that draw
    (``plot``, ``diagram``, ``report``, ``demo``) turn it back on: matplotlib's figures hold
    reference cycles. The other commands also keep what they leave alive out of the collection
    the interpreter runs at exit (``gc.freeze``), for the same reason.

    From Python, call the functions the commands call (or ``app`` through typer's test runner).
    """
    global _own_process
    _own_process = True
    for name in BLAS_THREADS:
        os.environ.setdefault(name, "1")
    gc.disable()
    signal.signal(signal.SIGTERM, _terminate)
    code = _flushed(_run())
    if not gc.isenabled():  # a command that did not draw made no reference cycles: what it
        # leaves alive (the caches of bands, pairs and cables) is set aside from the collection
        # the interpreter runs at exit, which would walk it to free nothing (0.03 s of a
        # 2,061-circuit check, docs/performance.md); it is still freed as usual
        gc.freeze()
    sys.exit(code)


def _terminate(signum: int, frame: Any) -> None:
    """SIGTERM: unwind the command as for an error, so that no partial file stays behind
    (``coordination.io.Terminated``; the flag covers an exception Python only reports)."""
    io.terminated = True
    raise io.Terminated()


def _run() -> int:
    """Run the command line; the exit code."""
    try:
        code = app(prog_name="coordination", standalone_mode=False)
    except typer.Abort:
        typer.echo("error: interrupted", err=True)
        return 130
    except io.Terminated:
        typer.echo("error: terminated", err=True)
        return 128 + signal.SIGTERM
    except BrokenPipeError:  # the help or the version into a pipe closed early
        _quiet_stdout()
        return 0
    except OSError as error:  # the help or the version onto a full device
        _quiet_stdout()
        typer.echo(f"error: {_os_message(error)}", err=True)
        return 2
    except Exception as error:  # click's usage errors (vendored by newer typer releases)
        if not (hasattr(error, "format_message") and hasattr(error, "exit_code")):
            raise
        ctx = getattr(error, "ctx", None)
        if type(error).__name__ == "NoArgsIsHelpError":
            # the error made the help page; with rich installed it has printed it already
            page = error.format_message()
            if page.strip():
                typer.echo(page)
            return 0
        hint = f" (see '{ctx.command_path} --help')" if ctx is not None else ""
        typer.echo(f"error: {error.format_message()}{hint}", err=True)
        return int(error.exit_code)
    finally:  # the command is over: a SIGTERM from here on ends the process at once
        signal.signal(signal.SIGTERM, signal.SIG_DFL)
    if io.terminated:  # the signal's exception was swallowed; the command ended regardless
        typer.echo("error: terminated", err=True)
        return 128 + signal.SIGTERM
    return code if isinstance(code, int) else 0


def _flushed(code: int) -> int:
    """Flush stdout and stderr before the interpreter exits; the exit code.

    A reader that closed its end early has what it wanted: the code stays. A write that fails
    (a full disk, say) leaves the output incomplete: one line on stderr and code 2. Either way
    stdout then points at the null device, so that the interpreter's own flush at exit finds
    nothing left to fail on.
    """
    out, err = sys.stdout, sys.stderr  # None where the stream was closed before the start
    try:
        if out is not None:
            out.flush()
    except BrokenPipeError:
        _quiet_stdout()
    except OSError as error:
        _quiet_stdout()
        if err is not None:
            err.write(f"error: the output could not be written: {error.strerror or error}\n")
        code = 2
    try:
        if err is not None:
            err.flush()
    except OSError:
        pass
    return code


if __name__ == "__main__":  # pragma: no cover
    main()
