"""The one way every output file is written: to a temporary file beside it, then renamed.

``os.replace`` within one folder is atomic on POSIX and Windows, so a reader, a crash or a
killed process sees either the old file or the new one, never a half-written file; each writer
uses its own uniquely named temporary file (``tempfile.mkstemp``), so concurrent runs writing
the same folder never share a temporary name. The output path is checked before any work
starts (:func:`check_output_folder`, :func:`check_output_file`), so a bad path costs nothing.

Layer: the bottom, beside ``units`` and ``errors``; every layer may use it.
"""

from __future__ import annotations

import contextlib
import os
import tempfile
from collections.abc import Iterator
from pathlib import Path
from typing import IO

from compromise.errors import CaseError


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask


@contextlib.contextmanager
def atomic_output(path: str | Path, *, binary: bool = False) -> Iterator[IO]:
    """Open a temporary file beside ``path`` for writing; rename it onto ``path`` on success.

    On any exception the temporary file is removed and ``path`` is left as it was.

    Examples
    --------
    >>> import tempfile, pathlib
    >>> target = pathlib.Path(tempfile.mkdtemp()) / "table.csv"
    >>> with atomic_output(target) as fh:
    ...     _ = fh.write("a,b\\n1,2\\n")
    >>> target.read_text()
    'a,b\\n1,2\\n'
    """
    target = Path(path)
    fd, tmp = tempfile.mkstemp(dir=target.parent, prefix=f".{target.name}.", suffix=".part")
    try:
        os.chmod(tmp, 0o666 & ~_umask())
        mode = "wb" if binary else "w"
        kwargs = {} if binary else {"encoding": "utf-8", "newline": ""}
        with os.fdopen(fd, mode, **kwargs) as fh:
            yield fh
            fh.flush()
            os.fsync(fh.fileno())
        os.replace(tmp, target)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(tmp)
        raise


def write_text(path: str | Path, text: str) -> Path:
    """Write ``text`` (UTF-8) to ``path`` atomically; returns the path."""
    with atomic_output(path) as fh:
        fh.write(text)
    return Path(path)


def write_bytes(path: str | Path, data: bytes) -> Path:
    """Write ``data`` to ``path`` atomically; returns the path."""
    with atomic_output(path, binary=True) as fh:
        fh.write(data)
    return Path(path)


def check_output_folder(folder: str | Path, *, key: str = "-o") -> Path:
    """Check that ``folder`` can receive output files, creating it if missing.

    Raises
    ------
    CaseError
        One line naming the option when the path is an existing file, lies under a file, or is
        not writable.
    """
    p = Path(folder)
    for parent in [p, *p.parents]:
        if parent.exists() and not parent.is_dir():
            what = "is" if parent == p else f"lies under {parent}, which is"
            raise CaseError(f"output folder {p} {what} a file; expected a folder", key=key)
    try:
        p.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise CaseError(f"cannot create output folder {p}: {exc.strerror}", key=key) from None
    if not os.access(p, os.W_OK | os.X_OK):
        raise CaseError(f"output folder {p} is not writable", key=key)
    return p


def check_output_file(path: str | Path, *, force: bool = False, key: str = "-o") -> Path:
    """Check that ``path`` can be written: its folder exists or can be made and is writable,
    it is not a folder, and it exists only when ``force`` allows replacing it."""
    p = Path(path)
    if p.is_dir():
        raise CaseError(f"output {p} is a folder; expected a file name", key=key)
    if p.exists() and not force:
        raise CaseError(f"output {p} exists; use --force to replace it", key=key)
    check_output_folder(p.parent if str(p.parent) else ".", key=key)
    return p
