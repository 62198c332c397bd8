"""The package's folders are its data flow: imports run down the layers only, and never in a circle.

The contract is read from the source with :mod:`ast` (every import, including the
ones inside functions that keep start-up light), so a new circle or an import from
a lower layer up to a higher one fails here before it reaches a sheet.
"""

import ast
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parent.parent / "windsheet"

#: From the bottom up: a module may import its own layer and the layers below it.
LAYERS = ("common", "physics", "order", "design", "qc", "records", "sheets", "bench", "cli")


def _module_name(path: Path) -> str:
    rel = path.relative_to(PACKAGE.parent).with_suffix("")
    parts = list(rel.parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def _is_module(name: str) -> bool:
    rel = Path(*name.split("."))
    return (PACKAGE.parent / rel).with_suffix(".py").exists() or (PACKAGE.parent / rel / "__init__.py").exists()


def _imports(path: Path) -> set[str]:
    """Every windsheet module that ``path`` imports, at module level or inside a function."""
    me = _module_name(path)
    package = me if path.name == "__init__.py" else me.rpartition(".")[0]
    out = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.Import):
            out.update(a.name for a in node.names if a.name.startswith("windsheet"))
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.split(".")
                base = base[: len(base) - (node.level - 1)]
                source = ".".join(base + ([node.module] if node.module else []))
            else:
                source = node.module or ""
            if not source.startswith("windsheet"):
                continue
            for alias in node.names:
                sub = f"{source}.{alias.name}"
                out.add(sub if _is_module(sub) else source)
    out.discard(me)
    return {m for m in out if _is_module(m)}


def import_graph() -> dict[str, set[str]]:
    return {_module_name(p): _imports(p) for p in sorted(PACKAGE.rglob("*.py"))}


def layer_of(module: str):
    parts = module.split(".")
    return LAYERS.index(parts[1]) if len(parts) > 1 and parts[1] in LAYERS else None


def circles(graph: dict[str, set[str]]) -> list[list[str]]:
    """Strongly connected components of more than one module (Tarjan's algorithm)."""
    index, low, stack, on, out = {}, {}, [], set(), []

    def visit(v):
        index[v] = low[v] = len(index)
        stack.append(v)
        on.add(v)
        for w in graph.get(v, ()):
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
                out.append(sorted(comp))

    for v in sorted(graph):
        if v not in index:
            visit(v)
    return out


def test_every_module_sits_in_a_layer():
    loose = [m for m in import_graph() if m.count(".") and layer_of(m) is None]
    assert loose == []


def test_no_import_runs_up_a_layer():
    up = [f"{m} -> {t}" for m, targets in import_graph().items() for t in sorted(targets)
          if layer_of(m) is not None and layer_of(t) is not None and layer_of(t) > layer_of(m)]
    assert up == []


def test_no_import_circle():
    assert circles(import_graph()) == []


def test_the_package_root_imports_nothing_of_its_own():
    # windsheet/__init__.py holds the version only: importing any layer must not pull in the others.
    assert _imports(PACKAGE / "__init__.py") == set()


@pytest.mark.parametrize("graph, expected", [
    ({"a": {"b"}, "b": {"a"}, "c": set()}, [["a", "b"]]),
    ({"a": {"b"}, "b": {"c"}, "c": set()}, []),
    ({"a": {"b"}, "b": {"c"}, "c": {"a"}, "d": {"a"}}, [["a", "b", "c"]]),
])
def test_the_circle_finder_itself(graph, expected):
    # Hand-drawn graphs: a two-module circle, a chain with none, a three-module circle with a tail.
    assert circles(graph) == expected


def test_the_contract_sees_lazy_imports():
    # An import inside a function counts: it runs just the same, only later.
    text = "def f():\n    from windsheet.cli import app\n"
    fake = PACKAGE / "physics" / "_contract_probe.py"
    try:
        fake.write_text(text)
        assert _imports(fake) == {"windsheet.cli.app"}
    finally:
        fake.unlink()
