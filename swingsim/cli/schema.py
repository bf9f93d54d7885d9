"""``swingsim schema``: write the JSON Schemas of the scene and sweep files.

The schemas come from the scene schema (:mod:`swingsim.scene.jsonschema`, the
same table that validates scenes and writes ``docs/scene-reference.md``) and,
for sweeps, the sweep reader's keys and objectives
(:mod:`swingsim.study.variants`).  To have an editor check a scene as it is
typed, put ``#:schema ./scene.schema.json`` (a path relative to the TOML file,
or a URL) on the file's first line: editors built on Taplo (e.g. Even Better
TOML) read it.
"""

from __future__ import annotations

import argparse

from swingsim.cli.options import add_output_arguments, out_folder
from swingsim.io.files import atomic_write_text, output_run
from swingsim.scene.jsonschema import dumps, scene_schema, sweep_schema
from swingsim.study import variants

#: The folder ``swingsim schema`` writes when ``--out`` is not given.
DEFAULT_OUT = "schemas"
#: The files it writes.
SCENE_FILE, SWEEP_FILE = "scene.schema.json", "sweep.schema.json"


def schemas() -> dict:
    """Every schema ``swingsim schema`` writes, by file name, as text.

    Returns
    -------
    dict
        ``{"scene.schema.json": text, "sweep.schema.json": text}``.
    """
    sweep = sweep_schema(variants._TOP, variants.OBJECTIVE_KEYS, "settled_at_s")
    return {SCENE_FILE: dumps(scene_schema()), SWEEP_FILE: dumps(sweep)}


def add_arguments(p: argparse.ArgumentParser) -> None:
    """Options of ``swingsim schema``: the output folder, ``--force``, ``--quiet``.

    Parameters
    ----------
    p : argparse.ArgumentParser
        The subcommand's parser, filled in place.
    """
    add_output_arguments(p, f"output folder (default: {DEFAULT_OUT}, in the current folder)",
                         f"{SCENE_FILE} and {SWEEP_FILE}", quiet_help="do not list the files written")


def main(args: argparse.Namespace) -> int:
    """Run ``swingsim schema``: write the two schema files, list them, say how to use them.

    Parameters
    ----------
    args : argparse.Namespace
        The parsed ``out``, ``force`` and ``quiet``.

    Returns
    -------
    int
        The exit code: 0 (an unusable output folder raises InputError, exit 2).
    """
    out = out_folder(args, DEFAULT_OUT)
    texts = schemas()
    with output_run(out, args.force) as stage:
        paths = [stage.final(atomic_write_text(stage.path / name, text)) for name, text in texts.items()]
    if not args.quiet:
        for path in paths:
            print(path)
        print(f"to check a scene as you type, make its first line '#:schema <path of {SCENE_FILE}, relative "
              f"to the scene file>' ({SWEEP_FILE} for a sweep); editors built on Taplo (e.g. Even Better TOML) "
              "read it")
    return 0
