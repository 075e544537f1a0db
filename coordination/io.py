"""Writing output files safely: atomically, never over the study, never half-written."""

from __future__ import annotations

import contextlib
import os
from collections.abc import Callable, Iterator
from pathlib import Path
from typing import TYPE_CHECKING

from curves.errors import InputError

if TYPE_CHECKING:  # matplotlib is imported only by the commands that draw
    from matplotlib.figure import Figure


class Terminated(BaseException):
    """The process was asked to stop (SIGTERM, see ``coordination.cli.main``): raised through
    the command so that every ``finally`` and :func:`atomic_path` clean up as for an error."""


#: Set when the process was asked to stop. Python runs a signal handler between any two
#: steps, in a finaliser too, where its exception is only reported: :func:`atomic_path` looks
#: at this flag before it moves a file into place, so a stop never ends in a new file.
terminated = False


def check_output_path(out: str | os.PathLike, *, inputs: tuple[str | os.PathLike, ...] = (),
                      key: str = "output") -> Path:
    """Refuse an output path that is an input file, a folder, an existing file that is not a
    regular file (a FIFO, a device), or whose folder does not exist or is not writable.

    Raises
    ------
    InputError
        Naming the path and what is allowed.
    """
    path = Path(out)
    for source in inputs:
        if source is not None and path.exists() and Path(source).exists():
            if path.resolve() == Path(source).resolve():
                raise InputError(f"output path {str(path)!r} is the input study; choose another",
                                 key=key)
    parent = path.parent if str(path.parent) else Path(".")
    if not parent.is_dir():
        raise InputError(f"folder {str(parent)!r} does not exist; create it or choose another",
                         key=key)
    if path.is_dir():
        raise InputError(f"{str(path)!r} is a folder; give a file name", key=key)
    if path.exists() and not path.is_file():
        # a FIFO, a device or a socket: replacing it would remove something that is not ours
        raise InputError(f"{str(path)!r} exists and is not a regular file (a device, pipe or "
                         "socket); give a file name", key=key)
    if not os.access(parent, os.W_OK):
        raise InputError(f"folder {str(parent)!r} is not writable", key=key)
    return path


@contextlib.contextmanager
def atomic_path(out: str | os.PathLike) -> Iterator[Path]:
    """A temporary path beside ``out`` that replaces ``out`` only if the block succeeds.

    On any exception the temporary file is removed and ``out`` (if it existed) is untouched.
    The command line turns SIGTERM into :class:`Terminated` (and sets :data:`terminated`), so
    a terminated command cleans up here too.
    """
    import tempfile  # here: every command imports this module for Terminated, few write files

    target = Path(out)
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=target.suffix or ".tmp",
                               dir=target.parent if str(target.parent) else ".")
    tmp_path = Path(tmp)
    try:  # from the moment the file exists: a signal may interrupt any line below
        os.close(fd)
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp_path, 0o666 & ~umask)  # an ordinary file, not mkstemp's private 0600
        yield tmp_path
        if terminated:
            raise Terminated()
        os.replace(tmp_path, target)
    except BaseException:
        with contextlib.suppress(OSError):
            tmp_path.unlink()
        raise


def atomic_write_text(out: str | os.PathLike, text: str) -> None:
    """Write text to ``out`` atomically."""
    with atomic_path(out) as tmp:
        tmp.write_text(text, encoding="utf-8")


def atomic_write(out: str | os.PathLike, writer: Callable[[Path], None]) -> None:
    """Call ``writer(tmp_path)`` and move the result onto ``out`` atomically."""
    with atomic_path(out) as tmp:
        writer(tmp)


def save_figure(fig: Figure, path: str | os.PathLike) -> None:
    """Save a figure atomically; PNG, SVG or PDF by the file's suffix.

    On any error the target is left as it was (absent, or the previous file).

    Examples
    --------
    >>> import tempfile
    >>> from pathlib import Path
    >>> from matplotlib.figure import Figure
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     target = Path(folder) / "empty.png"
    ...     save_figure(Figure(figsize=(2, 1)), target)
    ...     print(target.read_bytes()[1:4], target.stat().st_size > 0)
    b'PNG' True
    """
    import matplotlib

    suffix = os.fspath(path).rsplit(".", 1)[-1].lower() if "." in os.fspath(path) else ""
    if suffix not in ("png", "svg", "pdf"):
        raise InputError(f"unknown plot format {suffix!r}; allowed: png, svg, pdf", key="-o")
    with matplotlib.rc_context({"pdf.fonttype": 42, "svg.fonttype": "none"}), \
            atomic_path(path) as tmp:
        fig.savefig(tmp, format=suffix, dpi=150)
