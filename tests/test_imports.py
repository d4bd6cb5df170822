"""What may import what, read from the source with ``ast`` (nothing here imports the package).

The graph has an edge for every import statement that runs: at module level and inside
functions, relative imports resolved, and an edge to each package a dotted import passes
through (importing ``a.b.c`` runs ``a.b``'s ``__init__``). ``if TYPE_CHECKING:`` blocks never
run and add no edge. The checks:

- no circle: a circle can only be hidden by imports written inside functions, and makes the
  order of imports matter;
- ``rendering/`` and ``commands/`` display results: they import neither the computations nor
  the history of a machine (a judgement made there would bypass evaluation);
- an import inside a function only where it keeps start-up light, each listed below with
  its reason.
"""

from __future__ import annotations

import ast
from collections.abc import Iterator
from dataclasses import dataclass
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parents[1] / "acceptance"
ROOT = PACKAGE.name

# (importing module, imported module) for each import written inside a function, and why.
# Anything not listed here belongs at the top of its module.
LAZY_IMPORTS: dict[tuple[str, str], str] = {
    # cli.py imports each command with importlib, so 'acceptance check' never pays for the
    # build's modules; no import statement to list.
    ("acceptance.commands.check", "acceptance.evaluation"):
        "check reprints cached sections without the model, the evaluation or YAML",
    ("acceptance.commands.check", "acceptance.results"):
        "check reprints cached sections without the result records",
    ("acceptance.commands.check", "acceptance.loading"):
        "check reprints cached sections without the model (pydantic) or YAML",
    ("acceptance.commands.check", "acceptance.integrity"):
        "integrity imports loading (pydantic, YAML): only when machines are evaluated again",
    ("acceptance.loading.readings", "acceptance.captures"):
        "the capture importer (numpy) only for a job whose readings attach captures",
    ("acceptance.results", "acceptance.captures"):
        "numpy only when a result holds a capture; check imports results",
    ("acceptance.computations.uncertainty._format", "numpy"):
        "numpy's float formatting; check's instrument checks must not import numpy",
    ("acceptance.cli", "traceback"):
        "every command starts through cli.py; the traceback module only for --debug",
    ("acceptance.cli", "shlex"):
        "every command starts through cli.py; shlex only to quote a failed command line",
    ("acceptance.integrity", "cryptography"):
        "cryptography (about 0.1 s) only when a key signs or a signature is verified",
    ("acceptance.build.package", "acceptance.rendering.package"):
        "the PDF stack (WeasyPrint, pypdf) only for a build that renders PDFs",
    ("acceptance.build.package", "acceptance.rendering.pdf"):
        "the PDF stack (WeasyPrint, pypdf) only for a build that renders PDFs",
    ("acceptance.build.pdfs", "acceptance.rendering.package"):
        "the PDF stack (WeasyPrint, pypdf) only for a build that renders PDFs",
    ("acceptance.build.pdfs", "acceptance.rendering.pdf"):
        "the PDF stack (WeasyPrint, pypdf) only for a build that renders PDFs",
    ("acceptance.build.stale", "acceptance.rendering.package"):
        "the PDF stack (WeasyPrint, pypdf) only for a build that renders PDFs",
    ("acceptance.build.stale", "acceptance.rendering.pdf"):
        "the PDF stack (WeasyPrint, pypdf) only for a build that renders PDFs",
    ("acceptance.build.pages", "acceptance.rendering.plots"):
        "numpy only where a page draws a plot; the PDF workers import the build and draw none",
}

# Imports across the layers that the layer rules forbid and that remain, with why. Each
# entry must still be needed: the test fails when one no longer is.
KNOWN_LAYER_BREACHES: dict[tuple[str, str], str] = {}

DISPLAY_LAYERS = (f"{ROOT}.rendering", f"{ROOT}.commands")
JUDGING_LAYERS = (f"{ROOT}.computations", f"{ROOT}.history")


@dataclass(frozen=True)
class Import:
    importer: str
    target: str  # a module of the package, or the top-level name of another package
    line: int
    in_function: bool


def _module_name(path: Path) -> str:
    parts = path.relative_to(PACKAGE.parent).with_suffix("").parts
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def _modules() -> dict[str, Path]:
    return {_module_name(path): path for path in sorted(PACKAGE.rglob("*.py"))
            if "_data" not in path.parts}


MODULES = _modules()


def _is_type_checking(test: ast.expr) -> bool:
    return (isinstance(test, ast.Name) and test.id == "TYPE_CHECKING") or (
        isinstance(test, ast.Attribute) and test.attr == "TYPE_CHECKING")


def _walk(node: ast.AST, in_function: bool = False) -> Iterator[tuple[ast.AST, bool]]:
    for child in ast.iter_child_nodes(node):
        if isinstance(child, ast.If) and _is_type_checking(child.test):
            for other in child.orelse:  # the else branch of TYPE_CHECKING does run
                yield other, in_function
                yield from _walk(other, in_function)
            continue
        inside = in_function or isinstance(child, ast.FunctionDef | ast.AsyncFunctionDef
                                           | ast.Lambda)
        yield child, inside
        yield from _walk(child, inside)


def _resolve(importer: str, node: ast.ImportFrom) -> str:
    if not node.level:
        return node.module or ""
    package = importer if MODULES[importer].name == "__init__.py" else importer.rpartition(".")[0]
    for _ in range(node.level - 1):
        package = package.rpartition(".")[0]
    return f"{package}.{node.module}" if node.module else package


def _imports(module: str) -> list[Import]:
    tree = ast.parse(MODULES[module].read_text(encoding="utf-8"))
    found = []
    for node, in_function in _walk(tree):
        targets: list[str] = []
        if isinstance(node, ast.Import):
            targets = [alias.name for alias in node.names]
        elif isinstance(node, ast.ImportFrom):
            base = _resolve(module, node)
            # 'from . import rules' imports the module rules; 'from .x import name', x.
            targets = [f"{base}.{alias.name}" for alias in node.names
                       if f"{base}.{alias.name}" in MODULES] or [base]
        for target in targets:
            if target.split(".")[0] != ROOT:
                target = target.split(".")[0]
            found.append(Import(module, target, node.lineno, in_function))
    return found


IMPORTS = [found for module in MODULES for found in _imports(module)]


def _graph() -> dict[str, set[str]]:
    """Module → the modules of the package that importing it runs."""
    graph: dict[str, set[str]] = {module: set() for module in MODULES}
    for found in IMPORTS:
        if found.target not in MODULES:
            continue
        own_packages = {found.importer.rsplit(".", n)[0]
                        for n in range(1, found.importer.count(".") + 1)}
        parts = found.target.split(".")
        for end in range(1, len(parts) + 1):
            step = ".".join(parts[:end])
            # The importer's own packages are already initialised before it runs.
            if step in MODULES and step not in own_packages and step != found.importer:
                graph[found.importer].add(step)
    return graph


def _circles(graph: dict[str, set[str]]) -> list[list[str]]:
    """The strongly connected components of more than one module (Tarjan)."""
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    on_stack: set[str] = set()
    circles: list[list[str]] = []

    def visit(node: str) -> None:
        index[node] = low[node] = len(index)
        stack.append(node)
        on_stack.add(node)
        for other in sorted(graph[node]):
            if other not in index:
                visit(other)
                low[node] = min(low[node], low[other])
            elif other in on_stack:
                low[node] = min(low[node], index[other])
        if low[node] == index[node]:
            component = []
            while True:
                member = stack.pop()
                on_stack.discard(member)
                component.append(member)
                if member == node:
                    break
            if len(component) > 1:
                circles.append(sorted(component))

    for node in sorted(graph):
        if node not in index:
            visit(node)
    return circles


def test_the_graph_sees_the_whole_package():
    # A check that reads nothing passes for the wrong reason.
    assert {"acceptance.cli", "acceptance.loading.job", "acceptance.evaluation.registry",
            "acceptance.rule_specs", "acceptance.signature_records"} <= MODULES.keys()
    graph = _graph()
    assert "acceptance.rule_specs" in graph["acceptance.loading.checklists"]
    assert "acceptance.loading" in graph["acceptance.evaluation"]


def test_no_import_circle():
    circles = _circles(_graph())
    assert circles == [], "import circles: " + "; ".join(" ↔ ".join(c) for c in circles)


def test_a_circle_would_be_found():
    graph = {"a": {"b"}, "b": {"c"}, "c": {"a"}, "d": {"a"}}
    assert _circles(graph) == [["a", "b", "c"]]


def _layer_breaches() -> set[tuple[str, str]]:
    return {(found.importer, target)
            for found in IMPORTS if found.importer.startswith(DISPLAY_LAYERS)
            for target in JUDGING_LAYERS
            if found.target == target or found.target.startswith(target + ".")}


def test_display_layers_import_no_computation_or_history():
    breaches = _layer_breaches() - KNOWN_LAYER_BREACHES.keys()
    assert breaches == set(), (
        "rendering/ and commands/ show results; they must not compute or judge: "
        + ", ".join(f"{importer} imports {target}" for importer, target in sorted(breaches)))


def test_every_known_breach_is_still_there():
    stale = KNOWN_LAYER_BREACHES.keys() - _layer_breaches()
    assert stale == set(), f"remove from KNOWN_LAYER_BREACHES: {sorted(stale)}"


# What the lowest modules may import of the package: nothing above them.
LOW_LAYERS: dict[str, tuple[str, ...]] = {
    f"{ROOT}.computations": (f"{ROOT}.computations",),
    f"{ROOT}.units": (),
    f"{ROOT}.errors": (),
    f"{ROOT}.signature_records": (),
    f"{ROOT}.model": (f"{ROOT}.units",),
    f"{ROOT}.rule_specs": (f"{ROOT}.computations", f"{ROOT}.units", f"{ROOT}.model"),
    f"{ROOT}.capacitor_codes": (f"{ROOT}.computations",),
}


@pytest.mark.parametrize("layer", sorted(LOW_LAYERS))
def test_low_layers_import_nothing_above_them(layer):
    allowed = LOW_LAYERS[layer]
    above = sorted({f"{found.importer} imports {found.target}" for found in IMPORTS
                    if (found.importer == layer or found.importer.startswith(layer + "."))
                    and found.target in MODULES
                    and not any(found.target == a or found.target.startswith(a + ".")
                                for a in allowed)})
    assert above == []


def _lazy_key(found: Import) -> tuple[str, str] | None:
    key = (found.importer, found.target)
    return key if key in LAZY_IMPORTS else None


def test_imports_inside_functions_only_where_listed():
    unlisted = [f"{MODULES[f.importer].relative_to(PACKAGE.parent)}:{f.line}: {f.target}"
                for f in IMPORTS if f.in_function and _lazy_key(f) is None]
    assert unlisted == [], ("move these imports to the top of their module, or list them in "
                            "LAZY_IMPORTS with the reason:\n" + "\n".join(unlisted))


def test_every_listed_lazy_import_is_still_there():
    used = {_lazy_key(found) for found in IMPORTS if found.in_function}
    assert LAZY_IMPORTS.keys() - used == set()


@pytest.mark.parametrize("reason", [*LAZY_IMPORTS.values(), *KNOWN_LAYER_BREACHES.values()])
def test_every_exception_says_why(reason):
    assert len(reason.split()) >= 5
