"""Exceptions that the command line turns into one clear line and an exit code."""

from __future__ import annotations

import reprlib

__all__ = ["QUOTE_LIMIT", "quote", "shown", "escape_text", "InputError", "SceneError", "SimulationError"]

#: Longest quotation of user text in a message [characters].
QUOTE_LIMIT = 60

#: Longest file name or key shown in a message before it is shortened [characters].
NAME_LIMIT = 120

#: Longest problem text of a message [characters].
PROBLEM_LIMIT = 600


def quote(value, limit: int = QUOTE_LIMIT) -> str:
    """A value as a message quotes it: ``repr``-like, escaped and shortened.

    Control characters (terminal escape sequences), bidirectional overrides and
    other invisible characters appear as their escapes (``\\x1b``, ``\\u202e``),
    never raw; long strings and lists are cut with ``...``.

    Parameters
    ----------
    value : object
        The offending value (a string, number, list ...).
    limit : int, optional
        Longest result [characters].

    Returns
    -------
    str
        The quotation, at most ``limit`` characters.
    """
    if isinstance(value, bool):  # as the scene file writes it (TOML)
        return "true" if value else "false"
    shortener = reprlib.Repr()
    shortener.maxstring = shortener.maxother = limit
    shortener.maxlist = shortener.maxtuple = shortener.maxdict = 6
    shortener.maxlevel = 3
    text = shortener.repr(value)
    return text if len(text) <= limit else text[:limit - 3] + "..."


def escape_text(text: str, limit: int = PROBLEM_LIMIT) -> str:
    """Text with every unprintable character escaped, cut to ``limit`` characters.

    Parameters
    ----------
    text : str
        A message part that may hold user text.
    limit : int, optional
        Longest result [characters].

    Returns
    -------
    str
        The text; only its unprintable characters are replaced, by their escapes.
    """
    text = str(text)
    if len(text) > limit:
        text = text[:limit - 3] + "..."
    if text.isprintable():
        return text
    return "".join(ch if ch.isprintable() else repr(ch)[1:-1] for ch in text)


def shown(name: str, limit: int = NAME_LIMIT) -> str:
    """A file name or key as a message shows it: as written when plain, else quoted.

    Parameters
    ----------
    name : str
        A file name or key path that may come from the user.
    limit : int, optional
        Longest name shown as written [characters].

    Returns
    -------
    str
        ``name`` itself when printable and at most ``limit`` long; else its
        escaped, shortened quotation (see :func:`quote`).
    """
    name = str(name)
    if name.isprintable() and len(name) <= limit:
        return name
    return quote(name, limit)


class InputError(ValueError):
    """Bad input: a scene, sweep or table file that cannot be used (exit code 2).

    Parameters
    ----------
    file : str
        The file's name as the user gave it (never resolved to an absolute path).
    key : str
        Dotted key path inside the file, e.g. ``moves[0].accel_m_s2``; may be empty.
    problem : str
        What is wrong and what is allowed.
    value : object, optional
        The offending value, shown with ``repr``.
    line : int, optional
        Line number in the file where known.
    """

    _MISSING = object()

    def __init__(self, file, key, problem, value=_MISSING, line=None):
        self.file = str(file) if file is not None else "<scene>"
        self.key = key
        self.problem = problem
        self.value = value
        self.line = line
        super().__init__(self.one_line())

    def one_line(self) -> str:
        """The message: ``file[:line]: key = value: problem`` (parts left out when unknown).

        Returns
        -------
        str
            One line; the file name and key as written when plain, else quoted
            (:func:`shown`); the value quoted, escaped and cut to
            :data:`QUOTE_LIMIT` characters (:func:`quote`); unprintable
            characters of the problem escaped (:func:`escape_text`).
        """
        where = shown(self.file)
        if self.line:
            where += f":{self.line}"
        parts = [where]
        if self.key:
            if self.value is not InputError._MISSING:
                parts.append(f"{shown(self.key)} = {quote(self.value)}")
            else:
                parts.append(shown(self.key))
        parts.append(escape_text(self.problem))
        return ": ".join(parts)


class SceneError(InputError):
    """A scene file is invalid."""


class SimulationError(RuntimeError):
    """The simulation cannot give a trustworthy result (exit code 1)."""
