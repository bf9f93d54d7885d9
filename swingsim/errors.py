"""Exceptions that the command line turns into one clear line and an exit code."""

from __future__ import annotations


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
            One line; a value's ``repr`` is cut to 60 characters.
        """
        where = self.file
        if self.line:
            where += f":{self.line}"
        parts = [where]
        if self.key:
            if self.value is not InputError._MISSING:
                v = repr(self.value)
                if len(v) > 60:
                    v = v[:57] + "..."
                parts.append(f"{self.key} = {v}")
            else:
                parts.append(self.key)
        parts.append(self.problem)
        return ": ".join(parts)


class SceneError(InputError):
    """A scene file is invalid."""


class SimulationError(RuntimeError):
    """The simulation cannot give a trustworthy result (exit code 1)."""
