"""Every public function and method of swingsim documents its parameters (numpydoc).

A public callable is a function or a method of a class, defined in a module of the
package, whose name and whose module's and class's names do not start with an
underscore (dunder methods and properties excepted).  A method that overrides a
documented method of a base class (a protocol's member, a profile's ``evaluate``) may
leave its docstring out: it inherits the base's, as ``inspect.getdoc`` and help() show
it, so the contract is written once.  Each must have a docstring;
each parameter (``self``/``cls`` excepted) must be named in its ``Parameters``
section; a function that returns a value must have a ``Returns`` (or ``Yields``)
section.  The idea is python-control's ``tests/docstrings_test.py``; the section
format is numpydoc's.
"""

from __future__ import annotations

import ast
import re
from pathlib import Path


PACKAGE = Path(__file__).resolve().parents[1] / "swingsim"
SECTION = re.compile(r"^\s*(Parameters|Returns|Yields|Raises|Attributes|Notes|References|Examples|See Also|Other Parameters)\s*\n\s*-{3,}\s*$", re.M)


def _sections(doc: str) -> dict:
    """Section name -> its text."""
    out = {}
    marks = list(SECTION.finditer(doc))
    for i, m in enumerate(marks):
        end = marks[i + 1].start() if i + 1 < len(marks) else len(doc)
        out[m.group(1)] = doc[m.end():end]
    return out


def _documented_names(section: str) -> set:
    names = set()
    lines = section.splitlines()
    indents = [len(ln) - len(ln.lstrip()) for ln in lines if ln.strip()]
    if not indents:
        return names
    base = min(indents)
    for ln in lines:
        if ln.strip() and len(ln) - len(ln.lstrip()) == base:
            head = ln.split(" : ")[0].strip()
            for n in head.split(","):
                names.add(n.strip().lstrip("*"))
    return names


def _own_returns(fn):
    """Return statements of ``fn`` itself, not of nested functions."""
    stack, found = list(fn.body), []
    while stack:
        node = stack.pop()
        if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef, ast.Lambda, ast.ClassDef)):
            continue
        if isinstance(node, (ast.Return, ast.Yield, ast.YieldFrom)):
            found.append(node)
        stack.extend(ast.iter_child_nodes(node))
    return found


def _gives_value(fn) -> bool:
    if fn.returns is not None:
        return not (isinstance(fn.returns, ast.Constant) and fn.returns.value is None)
    return any(getattr(n, "value", None) is not None
               and not (isinstance(n.value, ast.Constant) and n.value.value is None)
               for n in _own_returns(fn))


def _public_callables():
    for path in sorted(PACKAGE.rglob("*.py")):
        rel = path.relative_to(PACKAGE.parent)
        if any(p.startswith("_") and p not in ("__init__.py",) for p in rel.parts):
            continue
        tree = ast.parse(path.read_text(), str(path))
        for node in tree.body:
            if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)) and not node.name.startswith("_"):
                yield f"{rel}:{node.lineno} {node.name}", node
            elif isinstance(node, ast.ClassDef) and not node.name.startswith("_"):
                for item in node.body:
                    if not isinstance(item, (ast.FunctionDef, ast.AsyncFunctionDef)):
                        continue
                    if item.name.startswith("_"):
                        continue
                    decos = {getattr(d, "id", getattr(d, "attr", "")) for d in item.decorator_list}
                    if decos & {"property", "setter", "overload", "cached_property"}:
                        continue
                    yield f"{rel}:{item.lineno} {node.name}.{item.name}", item


CALLABLES = dict(_public_callables())


def _inherited_doc(where: str) -> str | None:
    """The docstring a method without its own inherits from a base class (``inspect.getdoc``)."""
    import importlib
    import inspect

    rel, name = where.split(":")[0], where.split(" ")[1]
    if "." not in name:
        return None
    module = ".".join(Path(rel).with_suffix("").parts)
    module = module.removesuffix(".__init__")
    cls_name, meth = name.split(".")
    cls = getattr(importlib.import_module(module), cls_name)
    return inspect.getdoc(getattr(cls, meth))


def _problems(fn, where="") -> list[str]:
    doc = ast.get_docstring(fn)
    if not doc and where:
        doc = _inherited_doc(where)
    if not doc:
        return ["no docstring"]
    args = [a.arg for a in fn.args.posonlyargs + fn.args.args + fn.args.kwonlyargs]
    if fn.args.vararg:
        args.append(fn.args.vararg.arg)
    if fn.args.kwarg:
        args.append(fn.args.kwarg.arg)
    args = [a for a in args if a not in ("self", "cls")]
    sec = _sections(doc)
    out = []
    if args:
        named = _documented_names(sec.get("Parameters", "")) | _documented_names(sec.get("Other Parameters", ""))
        missing = [a for a in args if a not in named]
        if missing:
            out.append("parameters not in 'Parameters': " + ", ".join(missing))
    if _gives_value(fn) and not ({"Returns", "Yields"} & set(sec)):
        out.append("no 'Returns' section")
    return out


def test_there_are_public_callables():
    assert len(CALLABLES) > 100


def test_every_public_callable_documents_its_parameters():
    bad = [f"{where}: {'; '.join(p)}" for where, fn in CALLABLES.items() if (p := _problems(fn, where))]
    assert not bad, f"{len(bad)} of {len(CALLABLES)} public callables lack numpydoc:\n" + "\n".join(bad)
