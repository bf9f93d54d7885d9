"""The ``swingsim`` command line: the parser, the dispatch to one module per command, ``main``.

``run`` and ``demo`` are in :mod:`swingsim.cli.run`; the other
commands (:data:`COMMANDS`) each have a module with ``add_arguments(parser)``
and ``main(args) -> int``.  No physics here.

Exit codes: 0 done; 1 the run could not give a trustworthy result, a fault
of the disk or system, or an internal fault; 2 bad input or an unusable
output path (one line on stderr naming the path, nothing written); 130
interrupted.
"""

from __future__ import annotations

import argparse
import importlib
import os
import signal
import sys

from swingsim._version import __version__
from swingsim.cli import check, run
from swingsim.errors import InputError, SimulationError, escape_text
from swingsim.io.failures import is_user_fixable, os_error_input
from swingsim.io.files import WRITTEN

#: Extension subcommands: name -> (module, help).  Each module exposes
#: ``add_arguments(parser)`` and ``main(args) -> int``.
COMMANDS: dict[str, tuple[str, str]] = {
    "render": ("swingsim.cli.render", "render a 3D briefing video (MP4/GIF/PNG frames) and stills of a scene"),
    "compare": ("swingsim.cli.compare", "run every variant of a sweep file and rank them "
                "(comparison.csv, report.html)"),
    "export": ("swingsim.cli.export", "export the lift as an animated 3D scene (glTF 2.0 .glb) and a "
               "self-contained viewer.html"),
    "plan-move": ("swingsim.cli.plan", "find the fastest move whose residual swing stays "
                  "under a bound over a range of rope lengths"),
    "schema": ("swingsim.cli.schema", "write the JSON Schemas (Draft 7) of the scene and sweep files, for "
               "editors that check TOML against a schema"),
}


class _Parser(argparse.ArgumentParser):
    def error(self, message):  # one line, exit 2
        sys.stderr.write(f"swingsim: error: {escape_text(message)} (see 'swingsim --help')\n")
        raise SystemExit(2)


def build_parser() -> argparse.ArgumentParser:
    """The ``swingsim`` argument parser with every subcommand.

    Returns
    -------
    argparse.ArgumentParser
        A parser whose errors print one line and exit with code 2; a parsed
        extension command carries its module in ``_module``.
    """
    parser = _Parser(prog="swingsim", description=(
        "Simulate how a crane's hook and load swing during a lift: peak and residual swing, "
        "excursion, rope tension, settling time. A planning and training preview: it does not "
        "replace the lift plan, the manufacturer's data or the competent person."))
    parser.add_argument("--version", action="version", version=f"swingsim {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    run.add_run_arguments(sub.add_parser("run", help="simulate a scene and write summary, time series and plots"))
    run.add_demo_arguments(sub.add_parser("demo", help="run the bundled demo scene"))
    check.add_arguments(sub.add_parser("check", help="validate a scene file without running it: the model, "
                                       "the moves and the warnings seen before simulating"))
    for name, (module_name, help_) in COMMANDS.items():
        try:
            module = importlib.import_module(module_name)
        except ImportError:  # pragma: no cover - an optional part not installed
            continue
        p = sub.add_parser(name, help=help_)
        module.add_arguments(p)
        p.set_defaults(_module=module)
    return parser


def _on_sigterm(signum, frame):
    raise KeyboardInterrupt


def main(argv=None) -> int:
    """The ``swingsim`` console script: parse, run the command, turn errors into one line.

    Parameters
    ----------
    argv : list of str, optional
        The arguments; ``sys.argv[1:]`` when None.

    Returns
    -------
    int
        The exit code: 0 done; 1 the run could not give a trustworthy result, or
        an internal fault; 2 bad input (one line on stderr); 130 interrupted
        (SIGINT or SIGTERM); 141 the output pipe was closed by its reader (nothing said).
    """
    parser = build_parser()
    args = parser.parse_args(argv)
    if not args.command:
        parser.print_help()
        return 2
    old = signal.signal(signal.SIGTERM, _on_sigterm)
    try:
        if hasattr(args, "_module"):
            return int(args._module.main(args) or 0)
        return {"run": run.run, "demo": run.demo, "check": check.check}[args.command](args)
    except InputError as exc:
        sys.stderr.write(f"swingsim: error: {exc.one_line()}\n")
        return 2
    except SimulationError as exc:
        sys.stderr.write(f"swingsim: {escape_text(str(exc))}\n")
        return 1
    except KeyboardInterrupt:
        done = ", ".join(p.name for p in WRITTEN) or "none"
        sys.stderr.write(f"swingsim: interrupted; files finished before the stop: {done}; "
                         "no partial file was left under a final name\n")
        return 130
    except BrokenPipeError:  # the reader of our output closed it (e.g. `swingsim check ... | head`)
        try:  # no further writes to the closed pipe, not even at exit (Python's documented recipe)
            os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        except OSError:
            pass
        return 141  # as a shell reports a command ended by SIGPIPE (128 + 13)
    except OSError as exc:  # a path that cannot be read or written: one line naming it
        if is_user_fixable(exc):
            sys.stderr.write(f"swingsim: error: {os_error_input(exc).one_line()}\n")
            return 2
        sys.stderr.write(f"swingsim: {os_error_input(exc).one_line()} (a fault of the disk or system, "
                         "not of the input)\n")
        return 1
    except Exception as exc:  # an internal fault: one line, traceback on request
        if os.environ.get("SWINGSIM_DEBUG"):
            raise
        sys.stderr.write(f"swingsim: internal error: {type(exc).__name__}: {escape_text(str(exc))} "
                         "(set SWINGSIM_DEBUG=1 for the traceback; please report it)\n")
        return 1
    finally:
        signal.signal(signal.SIGTERM, old)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
