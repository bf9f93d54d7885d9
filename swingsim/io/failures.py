"""File-system failures as one line, and text files read only when they are regular text files.

Every failure of the operating system to read or write a path becomes one
line naming the path and the reason (:func:`os_error_input`); the command line
exits with 2 when the user can fix it (:func:`is_user_fixable`: a read-only or
full filesystem, no permission, a path through a file ...) and 1 otherwise (a
fault of the device).  :func:`read_text_file` reads a file the user named only
when it is a regular file of bounded size holding UTF-8 text, and never quotes
its contents.
"""

from __future__ import annotations

import errno
import os
import re
import stat
from pathlib import Path

from swingsim.errors import InputError

__all__ = ["MAX_TEXT_FILE_BYTES", "USER_FIXABLE_ERRNOS", "is_user_fixable", "os_error_input", "check_output_path",
           "read_text_file"]

#: Largest text file (scene, sweep, table, chart, an earlier comparison) read [bytes].
MAX_TEXT_FILE_BYTES = 256 * 1024 * 1024

#: errno values of a path the user can change (another folder, free space, permissions).
USER_FIXABLE_ERRNOS = frozenset({
    errno.EACCES, errno.EPERM, errno.EROFS, errno.ENOSPC, errno.EDQUOT, errno.EFBIG, errno.ENOTDIR,
    errno.EISDIR, errno.ENOENT, errno.EEXIST, errno.ENAMETOOLONG, errno.ELOOP, errno.ENOTEMPTY,
    errno.EMLINK, errno.EBUSY, errno.ETXTBSY, errno.EINVAL,
})

#: Control characters that no text file of swingsim holds (all of C0 but tab, LF, CR; and DEL).
_CONTROL = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\x7f]")

_HINTS = {
    errno.EACCES: "permission denied; choose a folder you can write to",
    errno.EPERM: "operation not permitted (a system folder?); choose a folder of your own",
    errno.EROFS: "read-only file system; choose a folder on a writable disk",
    errno.ENOSPC: "no space left on device; free some space or choose another disk",
    errno.EDQUOT: "disk quota exceeded; free some space or choose another disk",
    errno.ENOTDIR: "a part of the path is a file, not a folder",
    errno.EISDIR: "is a folder, not a regular file",
    errno.ENOENT: "no such file or directory (a folder that cannot be made here?)",
}


def is_user_fixable(exc: OSError) -> bool:
    """Whether a failure of the operating system is about a path the user can change.

    Parameters
    ----------
    exc : OSError
        The failure.

    Returns
    -------
    bool
        True for a failure naming a path with an errno of :data:`USER_FIXABLE_ERRNOS`
        (exit code 2); False for a fault of the device or the system (exit code 1).
    """
    return exc.filename is not None and exc.errno in USER_FIXABLE_ERRNOS


def os_error_input(exc: OSError) -> InputError:
    """One line for a failure of the operating system: the path and the reason.

    Parameters
    ----------
    exc : OSError
        The failure (its ``filename`` names the path where the system gives one).

    Returns
    -------
    InputError
        The error to report; its message names the path (escaped when it holds
        control characters) and the reason, with what to do where known.
    """
    path = exc.filename if exc.filename is not None else "<file system>"
    reason = _HINTS.get(exc.errno) or (exc.strerror or type(exc).__name__).lower()
    return InputError(os.fsdecode(path), "", reason)


def check_output_path(out: Path | str, what: str = "--out") -> None:
    """Refuse an output folder that cannot be made, before anything is written.

    Looks at the path without creating anything: a name with a NUL byte or
    longer than the file system allows, a part of the path that is a file, and
    an existing folder on the way that cannot be written (read-only or system
    folder, no permission).

    Parameters
    ----------
    out : Path or str
        The output folder (it need not exist).
    what : str, optional
        The option that named the folder, for the message.

    Raises
    ------
    InputError
        One line naming the path and the reason.
    """
    text = os.fspath(out)
    if "\x00" in text:
        raise InputError(text, "", f"{what} holds a NUL character, which no file name may hold")
    path = Path(text)
    existing = path
    while not existing.exists() and existing != existing.parent:
        existing = existing.parent
    if existing.exists() and not existing.is_dir():
        if existing == path:
            return  # the caller says a file is not a folder
        raise InputError(text, "", f"{what}: {_HINTS[errno.ENOTDIR]} ({os.fspath(existing)})")
    name_max = os.pathconf(existing, "PC_NAME_MAX") if hasattr(os, "pathconf") else 255
    for part in path.parts:
        if len(os.fsencode(part)) > name_max:
            raise InputError(text, "", f"{what}: a name in the path is longer than the {name_max} bytes "
                             "the file system allows")
    if existing != path and not os.access(existing, os.W_OK | os.X_OK):
        raise InputError(text, "", f"{what}: {_HINTS[errno.EACCES]} ({os.fspath(existing)} is not writable)")


def read_text_file(path: Path | str, err, max_bytes: int = MAX_TEXT_FILE_BYTES) -> str:
    """A regular file's UTF-8 text; a leading UTF-8 byte-order mark is accepted and removed.

    Refused (with ``err(problem)``, never quoting the file): a missing file, a
    folder, a device, a pipe or other special file, a file over ``max_bytes``,
    bytes that are not UTF-8, and control characters other than tab, CR and LF
    (a binary file, or one of the system's special files).

    Parameters
    ----------
    path : Path or str
        The file.
    err : callable
        ``err(problem) -> Exception``: the caller's error naming the file and key.
    max_bytes : int, optional
        Largest size accepted [bytes].

    Returns
    -------
    str
        The text, without a byte-order mark.

    Raises
    ------
    Exception
        What ``err`` makes, when the file is refused.
    """
    try:
        info = os.stat(path)
    except FileNotFoundError:
        raise err("file not found") from None
    except OSError as exc:
        raise err(f"cannot read: {(exc.strerror or type(exc).__name__).lower()}") from None
    if not stat.S_ISREG(info.st_mode):
        raise err("not a file (a folder, device or other special file; expected a regular text file)")
    if info.st_size > max_bytes:
        raise err(f"file of {info.st_size} bytes is larger than the {max_bytes} bytes allowed")
    try:
        with open(path, "rb") as fh:
            data = fh.read(max_bytes + 1)
    except OSError as exc:
        raise err(f"cannot read: {(exc.strerror or type(exc).__name__).lower()}") from None
    if len(data) > max_bytes:
        raise err(f"file is larger than the {max_bytes} bytes allowed")
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise err(f"not UTF-8 text (byte {exc.start + 1} cannot be decoded); expected a text file") from None
    text = text.removeprefix("\ufeff")
    bad = _CONTROL.search(text)
    if bad is not None:
        raise err(f"holds a control character (U+{ord(bad.group()):04X}, character {bad.start() + 1}); "
                  "expected a text file")
    return text
