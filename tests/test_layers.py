"""The package's imports go one way.

Every module of ``swingsim`` belongs to a layer (its first name below ``swingsim``);
a module may import its own layer and the layers below it, never one above, and no
group of modules may import each other in a circle.  The order is written once here
and once in DEVELOPERS.md ("Architecture"); there is no list of exceptions.
Imports inside functions count too: a lazy import still ties the two modules.
"""

from __future__ import annotations

import ast
import sys
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parents[1] / "swingsim"

#: Lowest first.  A module may import only from its own layer or a lower one.
LAYERS = (
    ("errors", "constants", "_version"),
    ("io",),
    ("motion",),
    ("dynamics",),
    ("scene",),
    ("simulation",),
    ("metrics",),
    ("batch",),
    ("scene3d",),
    ("report",),
    ("study",),
    ("render",),
    ("export",),
    ("cli",),
    ("__init__", "__main__"),
)
RANK = {name: i for i, names in enumerate(LAYERS) for name in names}

#: What the physics and the 3D layer may import from outside the package.
THIRD_PARTY_ALLOWED = {
    "motion": {"numpy", "scipy"},
    "dynamics": {"numpy", "scipy"},
    "scene3d": {"numpy", "scipy"},
}


def _modules():
    for path in sorted(PACKAGE.rglob("*.py")):
        rel = path.relative_to(PACKAGE.parent).with_suffix("")
        parts = list(rel.parts)
        if parts[-1] == "__init__":
            parts = parts[:-1]
        yield ".".join(parts), path


def _imports(path: Path, name: str):
    """``(target, line)`` for every import of a module, module-level or inside a function.

    ``from a.b import c`` names ``a.b.c`` when that is a module, else ``a.b``.
    """
    tree = ast.parse(path.read_text(), str(path))
    base = name.split(".") if path.name == "__init__.py" else name.split(".")[:-1]
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            for a in node.names:
                yield a.name, node.lineno
        elif isinstance(node, ast.ImportFrom):
            mod = node.module or ""
            if node.level:
                mod = ".".join(base[: len(base) - node.level + 1] + ([mod] if mod else []))
            for a in node.names:
                sub = f"{mod}.{a.name}"
                yield (sub if sub in MODULES else mod), node.lineno


def _layer(module: str) -> str:
    parts = module.split(".")
    return parts[1] if len(parts) > 1 else "__init__"


def _graph():
    edges = {}
    for name, path in MODULES.items():
        out = {}
        for target, line in _imports(path, name):
            if target in MODULES and target != name:
                out.setdefault(target, line)
        edges[name] = out
    return edges


MODULES = dict(_modules())
EDGES = _graph()


def test_every_module_has_a_layer():
    unknown = sorted({_layer(m) for m in MODULES} - set(RANK))
    assert not unknown, f"add these to LAYERS (and to DEVELOPERS.md): {unknown}"


def test_no_import_from_a_higher_layer():
    bad = []
    for src, targets in EDGES.items():
        for dst, line in targets.items():
            if RANK[_layer(dst)] > RANK[_layer(src)]:
                bad.append(f"{src}:{line} imports {dst} ({_layer(src)} is below {_layer(dst)})")
    assert not bad, "\n".join(bad)


def test_no_import_cycles():
    # Tarjan's strongly connected components over the module graph
    index, low, stack, on, comps, counter = {}, {}, [], set(), [], [0]
    sys.setrecursionlimit(10_000)

    def visit(v):
        index[v] = low[v] = counter[0]
        counter[0] += 1
        stack.append(v)
        on.add(v)
        for w in EDGES.get(v, {}):
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            comp = []
            while True:
                w = stack.pop()
                on.discard(w)
                comp.append(w)
                if w == v:
                    break
            if len(comp) > 1:
                comps.append(sorted(comp))

    for v in EDGES:
        if v not in index:
            visit(v)
    assert not comps, "import cycles: " + "; ".join(" <-> ".join(c) for c in comps)


@pytest.mark.parametrize("layer", sorted(THIRD_PARTY_ALLOWED))
def test_physics_and_3d_import_numpy_and_scipy_only(layer):
    std = set(sys.stdlib_module_names)
    bad = []
    for name, path in MODULES.items():
        if _layer(name) != layer:
            continue
        for target, line in _imports(path, name):
            top = target.split(".")[0]
            if top in ("swingsim", "") or top in std or top == "__future__":
                continue
            if top not in THIRD_PARTY_ALLOWED[layer]:
                bad.append(f"{name}:{line} imports {target}")
    assert not bad, "\n".join(bad)


def test_package_root_holds_only_the_public_api():
    root = sorted(p.stem for p in PACKAGE.glob("*.py"))
    assert root == ["__init__", "__main__", "_version", "constants", "errors"], root
