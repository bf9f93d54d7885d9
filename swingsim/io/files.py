"""Safe output files: write to a temporary name in the same folder, then rename.

A killed run never leaves a truncated file under its final name: the final
name appears only by an atomic ``os.replace`` of a complete file.  An output
folder that already holds files is only written into with ``force``, and then
only the files this run produces are replaced.
"""

from __future__ import annotations

import contextlib
import os
import tempfile
from pathlib import Path

from swingsim.errors import InputError
from swingsim.io.failures import check_output_path

TMP_PREFIX = ".swingsim-partial-"

#: Files completed in this process (for the message after an interruption).
WRITTEN: list = []


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask


@contextlib.contextmanager
def atomic_path(final: Path | str, suffix: str | None = None):
    """Yield a temporary path beside ``final``; rename it to ``final`` on success.

    On any exception (including KeyboardInterrupt) the temporary file is removed.

    Parameters
    ----------
    final : Path or str
        The file's final name; its folder is created when missing.
    suffix : str, optional
        Suffix of the temporary file, for a writer that needs one (e.g. ``.mp4``
        for ffmpeg); that of ``final`` when None.

    Yields
    ------
    Path
        The temporary file to write; it becomes ``final`` (and is listed in
        :data:`WRITTEN`) when the ``with`` block ends without an exception.
    """
    final = Path(final)
    final.parent.mkdir(parents=True, exist_ok=True)
    suffix = final.suffix if suffix is None else suffix
    fd, tmp = tempfile.mkstemp(prefix=TMP_PREFIX + final.stem + "-", suffix=suffix, dir=final.parent)
    os.close(fd)
    tmp = Path(tmp)
    os.chmod(tmp, 0o666 & ~_umask())
    try:
        yield tmp
        os.replace(tmp, final)
        WRITTEN.append(final)
    except BaseException:
        with contextlib.suppress(OSError):
            tmp.unlink()
        raise


def atomic_write_bytes(final: Path | str, data: bytes) -> Path:
    """Write bytes to a file atomically (complete under its final name, or not at all).

    Parameters
    ----------
    final : Path or str
        The file to write.
    data : bytes
        Its whole content.

    Returns
    -------
    Path
        ``final``.
    """
    with atomic_path(final) as tmp:
        with open(tmp, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
    return Path(final)


def atomic_write_text(final: Path | str, text: str) -> Path:
    """Write text as UTF-8 to a file atomically (see :func:`atomic_write_bytes`).

    Parameters
    ----------
    final : Path or str
        The file to write, as for :func:`atomic_write_bytes`.
    text : str
        Its whole content, written as UTF-8.

    Returns
    -------
    Path
        ``final``.
    """
    return atomic_write_bytes(final, text.encode("utf-8"))


def check_out_dir(out: Path | str, force: bool, what: str = "--out") -> Path:
    """Refuse a non-empty output folder unless ``force``; refuse a path that is a file.

    Creates nothing: the folder is made when the first complete file is written.
    Temporary files of a killed earlier run do not count.

    Parameters
    ----------
    out : Path or str
        The output folder.
    force : bool
        Accept a folder that already holds files (``--force``).
    what : str, optional
        The option that named the folder, for the message.

    Returns
    -------
    Path
        ``out`` as a Path.

    Raises
    ------
    InputError
        When ``out`` is a file, or a non-empty folder without ``force``.
    """
    check_output_path(out, what)
    out = Path(out)
    if out.exists() and not out.is_dir():
        raise InputError(str(out), "", f"{what} names an existing file, not a folder")
    if out.is_dir() and any(p for p in out.iterdir() if not p.name.startswith(TMP_PREFIX)) and not force:
        raise InputError(str(out), "", "output folder is not empty; use --force to replace the files "
                         "this run writes (other files are left alone)")
    return out


def clean_partials(out: Path | str) -> None:
    """Remove temporary files left by a killed earlier run in ``out``.

    Parameters
    ----------
    out : Path or str
        The output folder (nothing happens when it does not exist).
    """
    out = Path(out)
    if out.is_dir():
        for p in out.glob(TMP_PREFIX + "*"):
            with contextlib.suppress(OSError):
                p.unlink()
