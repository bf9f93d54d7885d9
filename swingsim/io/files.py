"""Safe output files: write to a temporary name in the same folder, then rename.

A killed run never leaves a truncated file under its final name: the final
name appears only by an atomic ``os.replace`` of a complete file.  An output
folder that already holds files is only written into with ``force``, and then
only the files this run produces are replaced.
"""

from __future__ import annotations

import contextlib
import errno
import fcntl
import os
import shutil
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
                if p.is_dir() and not p.is_symlink():
                    shutil.rmtree(p)  # a staging or parts folder of a killed run
                else:
                    p.unlink()


def replace_folder(tmp: Path, target: Path) -> None:
    """Move the folder ``tmp`` onto ``target``, replacing an older folder of that name.

    Parameters
    ----------
    tmp : Path
        The complete new folder (on the same file system as ``target``).
    target : Path
        Its final name.
    """
    if target.is_dir() and not target.is_symlink():
        old = target.with_name(f"{TMP_PREFIX}{target.name}-old-{os.getpid()}")
        os.replace(target, old)
        os.replace(tmp, target)
        shutil.rmtree(old, ignore_errors=True)
    else:
        os.replace(tmp, target)


class Staging:
    """A hidden folder inside the output folder that a run writes into; see :func:`staged_outputs`."""

    def __init__(self, out: Path):
        self.out = out
        out.mkdir(parents=True, exist_ok=True)
        self.path = Path(tempfile.mkdtemp(prefix=TMP_PREFIX + "stage-", dir=out))
        os.chmod(self.path, 0o777 & ~_umask())

    def final(self, path: Path | str) -> Path:
        """The final name of a file written into the staging folder.

        Parameters
        ----------
        path : Path or str
            A path inside :attr:`path`.

        Returns
        -------
        Path
            The same name inside the output folder.
        """
        return self.out / Path(path).relative_to(self.path)

    def publish(self) -> None:
        """Move every entry of the staging folder into the output folder (replacing older ones)."""
        for entry in sorted(self.path.iterdir()):
            target = self.out / entry.name
            if entry.is_dir():
                replace_folder(entry, target)
            else:
                os.replace(entry, target)
            WRITTEN.append(target)
        self.path.rmdir()

    def discard(self) -> None:
        """Remove the staging folder and everything in it."""
        WRITTEN[:] = [p for p in WRITTEN if self.path not in Path(p).parents]
        shutil.rmtree(self.path, ignore_errors=True)


@contextlib.contextmanager
def staged_outputs(out: Path | str):
    """Stage a run's outputs in a hidden folder of ``out``; move them into place only on success.

    On any exception (a failed plot, a full disk, an interruption) the staging
    folder is removed and ``out`` is left as it was.

    Parameters
    ----------
    out : Path or str
        The output folder (it must exist; see :func:`locked_out_dir`).

    Yields
    ------
    Staging
        ``path`` is the folder to write into; ``final(p)`` names a staged file's final path.
    """
    stage = Staging(Path(out))
    try:
        yield stage
    except BaseException:
        stage.discard()
        raise
    stage.publish()


#: Errors of a folder that cannot take the output (the user can fix them: exit 2, not an internal fault).
UNWRITABLE = frozenset({errno.ENOSPC, errno.EDQUOT, errno.EROFS, errno.EACCES, errno.EPERM, errno.EFBIG})


@contextlib.contextmanager
def reported_write_errors(out: Path | str, what: str = "--out"):
    """Turn a full, read-only or forbidden output folder into one line naming the folder and the reason.

    Parameters
    ----------
    out : Path or str
        The output folder, named in the message.
    what : str, optional
        The option that named the folder.

    Yields
    ------
    None
        Write inside the ``with`` block.

    Raises
    ------
    InputError
        For an ``OSError`` whose errno is in :data:`UNWRITABLE`; any other error passes unchanged.
    """
    try:
        yield
    except OSError as exc:
        if exc.errno not in UNWRITABLE:
            raise
        raise InputError(str(out), "", f"{what} folder cannot be written: {exc.strerror}") from None


def _lock_folder(out: Path, what: str) -> int:
    """An exclusive ``flock`` on the folder itself (no lock file is left behind); the descriptor.

    The lock is taken on the folder that ``out`` names *after* locking: when a
    command that created the folder removed it again between our ``open`` and
    our ``flock`` (it was refused and cleaned up), the folder is created anew and
    locked again, so a run never writes into a removed folder.
    """
    for _ in range(5):
        try:
            fd = os.open(out, os.O_RDONLY | os.O_DIRECTORY)
        except FileNotFoundError:
            out.mkdir(parents=True, exist_ok=True)
            continue
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            os.close(fd)
            raise InputError(str(out), "", f"another swingsim command is writing into this {what} folder; "
                             "wait for it to finish or choose another folder") from None
        try:
            same = os.stat(out).st_ino == os.fstat(fd).st_ino
        except FileNotFoundError:
            same = False
        if same:
            return fd
        os.close(fd)  # locked a folder that was removed meanwhile: take the one there now
        out.mkdir(parents=True, exist_ok=True)
    raise InputError(str(out), "", f"{what} folder keeps disappearing; is another program removing it?")


@contextlib.contextmanager
def locked_out_dir(out: Path | str, force: bool, what: str = "--out"):
    """Create ``out`` if needed, lock it for this command alone, and check it (:func:`check_out_dir`).

    The lock is an exclusive ``flock`` on the folder, released when the ``with``
    block ends or the process dies; a second command into the same folder is
    refused at once.  A folder this call created is removed again when it is
    still empty at the end (input refused, or a run that failed).

    Parameters
    ----------
    out, force, what
        The output folder, ``--force`` and the option's name, as for :func:`check_out_dir`.

    Yields
    ------
    Path
        ``out``, locked and with the temporary files of a killed earlier run removed.

    Raises
    ------
    InputError
        When ``out`` is a file, not empty (without ``force``), in use by another
        command, or cannot be created.
    """
    out = check_out_dir(out, True, what)
    created = not out.exists()
    try:
        out.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise InputError(str(out), "", f"{what} folder cannot be created: {exc.strerror or exc}") from None
    fd = _lock_folder(out, what)
    try:
        check_out_dir(out, force, what)
        clean_partials(out)
        yield out
    finally:
        if created:
            # Only while holding the lock: a command refused because another one
            # holds the folder must not remove it from under that one.
            with contextlib.suppress(OSError):
                out.rmdir()  # only when empty
        os.close(fd)


@contextlib.contextmanager
def output_run(out: Path | str, force: bool, what: str = "--out"):
    """The output folder of one command, locked (:func:`locked_out_dir`) and staged (:func:`staged_outputs`).

    Every file the command writes goes into the staging folder; they all appear
    in ``out`` only when the ``with`` block ends without an exception.

    Parameters
    ----------
    out, force, what
        The output folder, ``--force`` and the option's name, as for :func:`check_out_dir`.

    Yields
    ------
    Staging
        Write into its ``path``; its ``final(p)`` names where a file ends up.
    """
    with locked_out_dir(out, force, what) as folder, reported_write_errors(folder, what), \
            staged_outputs(folder) as stage:
        yield stage
