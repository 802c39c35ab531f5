"""The rules of the house, read from the imports of every module with ``ast``.

1. Imports point down the layers only (``docs/architecture.md``): a package
   imports the packages below it, never the ones above; inside a package a
   module imports only modules of a lower level of that package (method
   modules never import each other sideways nor the package's chooser), and
   only the package's ``__init__`` sees everything beneath it.
2. No import inside a function, except the optional dependencies.
3. No ``_private`` name imported from another module.
4. The kernel modules (compiled and pure twins) are reached only through
   ``realquad._backend``.

The checker is tested on small invented modules too, so that it would fail on
an upward, sideways, late or private import.
"""

from __future__ import annotations

import ast
from dataclasses import dataclass
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]

#: Packages and base modules from the bottom up; a module may import only lower ranks
#: (and, within its own package, the lower levels of :data:`LEVELS`).
RANKS: list[tuple[str, ...]] = [
    ("realquad.errors", "realquad.textio", "realquad._version", "realquad._kernels"),
    ("realquad.latex",),
    ("realquad._backend",),
    ("realquad.core",),
    ("realquad.cfrac",),
    ("realquad.infrastructure",),
    ("realquad.relations",),
    ("realquad.units",),
    ("realquad.classgroup",),
    ("realquad.formclasses",),
    ("realquad.splitting",),
    ("realquad.equations",),
    ("realquad.survey",),
    ("realquad",),
    ("realquad_cli", "realquad.__main__"),
]

#: Levels inside each package, from the bottom; a module imports only strictly lower levels
#: (``__init__`` is above every level). Modules of one level are siblings: methods of one
#: problem, or independent pieces.
LEVELS: dict[str, list[set[str]]] = {
    "realquad._kernels": [
        {"form_kernels", "cfrac_kernels", "character_kernels", "elimination_kernels"},
        {"prime_form_kernels", "infrastructure_kernels"},
        {"class_kernels", "definite_kernels"},
        {"survey_kernels", "sieve_kernels", "definite_structure_kernels"},
    ],
    "realquad.core": [
        {"results", "progress", "integers", "linalg", "tokens", "executors", "modular_linalg"},
        {"elimination"},
        {"primes", "lattice"},
        {"orders", "numbers"},
        {"forms", "lfunction"},
        {"ideals"},
    ],
    "realquad.cfrac": [{"parser"}, {"expansion"}, {"approximations"}],
    "realquad.infrastructure": [
        {"ideals", "residues"},
        {"distances"},
        {"table", "compact"},
        {"regulator_search"},
        {"principal"},
    ],
    "realquad.relations": [
        {"factor_base"},
        {"families"},
        {"smooth"},
        {"store", "regulator"},
        {"collect"},
        {"system"},
        {"principal"},
    ],
    "realquad.units": [{"results", "roots_of_unity"}, {"orders"}, {"cfrac", "bsgs", "subexp"}],
    "realquad.classgroup": [
        {"genus", "structure", "theta"},
        {"group"},
        {"exact", "bsgs", "imaginary", "imaginary_bsgs", "subexp"},
        {"orders"},
    ],
    "realquad.formclasses": [
        {"results"},
        {"walks"},
        {"reduction", "composition", "cycles", "location"},
    ],
    "realquad.splitting": [
        {"prime_classes"},
        {"decomposition", "class_polynomial"},
        {"representation"},
    ],
    "realquad.equations": [
        {"parser", "families"},
        {"finite"},
        {"pell", "norm_compact"},
        {"norm"},
        {"binary"},
        {"conics_compact"},
        {"conics"},
    ],
    "realquad.survey": [
        {"ranges", "progress", "conditions", "dbfile"},
        {"compute"},
        {"store", "imaginary"},
        {"tabulate", "stats"},
        {"plots"},
    ],
    "realquad_cli": [
        {"progress", "output", "orders", "formtext", "parallel"},
        {"commands"},
        {"main"},
        {"reference"},
    ],
}

#: Third-party packages that are optional extras: imported where they are used, inside functions.
OPTIONAL = {"distributed", "matplotlib"}
#: Dependencies that are slow to import (sympy about 0.35 s, numpy 0.1 s, against 0.5 s for a
#: whole command): imported inside the functions that use them, so start-up stays short.
DEFERRED = {"sympy", "numpy"}


@dataclass(frozen=True)
class Violation:
    module: str
    line: int
    rule: str
    detail: str

    def __str__(self) -> str:
        return f"{self.module}:{self.line}: {self.rule}: {self.detail}"


def module_name(path: Path) -> str:
    """``realquad.core.forms`` for realquad/core/forms.py, ``realquad_cli.main`` for cli/main.py."""
    parts = list(path.relative_to(ROOT).with_suffix("").parts)
    if parts[0] == "cli":
        parts[0] = "realquad_cli"
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def _rank(name: str) -> tuple[int, str]:
    """``(rank, package)`` of a module: the longest prefix listed in :data:`RANKS`."""
    best: tuple[int, str] | None = None
    for rank, prefixes in enumerate(RANKS):
        for prefix in prefixes:
            if (name == prefix or name.startswith(prefix + ".")) and (
                best is None or len(prefix) > len(best[1])
            ):
                best = (rank, prefix)
    if best is None:
        raise KeyError(f"module {name} is in no layer of RANKS")
    return best


def _level(package: str, name: str) -> int | None:
    """The level of ``name`` in its package (``None`` for the package's ``__init__``)."""
    if name == package:
        return None
    first = name[len(package) + 1 :].split(".")[0]
    for level, members in enumerate(LEVELS.get(package, [])):
        if first in members:
            return level
    raise KeyError(f"module {name} has no level in LEVELS[{package!r}]")


def _type_checking(node: ast.AST) -> bool:
    return (
        isinstance(node, ast.If)
        and isinstance(node.test, ast.Name)
        and node.test.id == "TYPE_CHECKING"
    )


def _imports(tree: ast.Module) -> list[tuple[ast.Import | ast.ImportFrom, bool, bool]]:
    """Every import with (inside a function, under ``if TYPE_CHECKING``)."""
    found: list[tuple[ast.Import | ast.ImportFrom, bool, bool]] = []

    def visit(node: ast.AST, in_function: bool, typing_only: bool) -> None:
        for child in ast.iter_child_nodes(node):
            if isinstance(child, (ast.Import, ast.ImportFrom)):
                found.append((child, in_function, typing_only))
            inner = in_function or isinstance(child, (ast.FunctionDef, ast.AsyncFunctionDef))
            visit(child, inner, typing_only or _type_checking(child))

    visit(tree, False, False)
    return found


def _targets(node: ast.Import | ast.ImportFrom, importer: str) -> list[tuple[str, str | None]]:
    """``(module, name)`` pairs an import refers to (``name`` ``None`` for ``import x``)."""
    if isinstance(node, ast.Import):
        return [(alias.name, None) for alias in node.names]
    base = node.module or ""
    if node.level:  # relative: resolve against the importer's package
        package = importer.rsplit(".", node.level)[0]
        base = f"{package}.{base}" if base else package
    return [(base, alias.name) for alias in node.names]


def _is_module(name: str) -> bool:
    path = ROOT / Path(*name.replace("realquad_cli", "cli", 1).split("."))
    # a compiled module is known by its type stub
    return (
        any(path.with_suffix(ext).exists() for ext in (".py", ".pyi"))
        or (path / "__init__.py").exists()
    )


def _is_package(name: str) -> bool:
    return (
        ROOT / Path(*name.replace("realquad_cli", "cli", 1).split(".")) / "__init__.py"
    ).exists()


def check_module(name: str, source: str) -> list[Violation]:
    """The violations of the four rules in the module ``name`` with this source."""
    out: list[Violation] = []
    rank, package = _rank(name)
    tree = ast.parse(source)
    for node, in_function, typing_only in _imports(tree):
        for target, imported in _targets(node, name):
            top = target.split(".")[0]
            if in_function and top not in OPTIONAL | DEFERRED:
                out.append(Violation(name, node.lineno, "import inside a function", target))
            if top not in ("realquad", "realquad_cli"):
                continue
            submodule = bool(imported) and _is_module(f"{target}.{imported}")
            full = f"{target}.{imported}" if submodule else target
            if (
                imported
                and imported.startswith("_")
                and not submodule
                and imported != "__version__"
            ):
                out.append(Violation(name, node.lineno, "private name", f"{target}.{imported}"))
            if (full == "realquad._kernels" or full.startswith("realquad._kernels.")) and not (
                name in ("realquad._backend",) or name.startswith("realquad._kernels")
            ):
                out.append(Violation(name, node.lineno, "kernels outside _backend", full))
            their_rank, their_package = _rank(full)
            if their_rank > rank:
                out.append(Violation(name, node.lineno, "upward import", full))
            elif full.startswith(name + ".") and _is_package(name):
                continue  # a package's __init__ sees everything beneath it
            elif their_rank == rank and their_package == package and not typing_only:
                mine, theirs = _level(package, name), _level(package, full)
                if theirs is None and mine is not None:
                    out.append(
                        Violation(name, node.lineno, "import of the package's chooser", full)
                    )
                elif mine is not None and theirs is not None and theirs >= mine:
                    out.append(Violation(name, node.lineno, "sideways import", full))
    return out


def _modules() -> list[tuple[str, Path]]:
    paths = sorted((ROOT / "realquad").rglob("*.py")) + sorted((ROOT / "cli").rglob("*.py"))
    return [(module_name(p), p) for p in paths]


@pytest.mark.parametrize(("name", "path"), _modules(), ids=[name for name, _ in _modules()])
def test_module_keeps_the_rules(name: str, path: Path) -> None:
    problems = check_module(name, path.read_text(encoding="utf-8"))
    assert not problems, "\n".join(map(str, problems))


# -- the checker itself ----------------------------------------------------------------------


@pytest.mark.parametrize(
    ("name", "source", "rule"),
    [
        ("realquad.core.forms", "from realquad.units import fundamental_unit", "upward import"),
        ("realquad.units.cfrac", "from realquad.units.bsgs import check_reach", "sideways import"),
        (
            "realquad.units.cfrac",
            "from realquad.units import regulator",
            "import of the package's chooser",
        ),
        (
            "realquad.classgroup.exact",
            "def f():\n    from realquad.core import forms\n",
            "import inside a function",
        ),
        ("realquad.equations.binary", "from realquad.equations.norm import _units", "private name"),
        (
            "realquad.core.forms",
            "from realquad._kernels import form_kernels",
            "kernels outside _backend",
        ),
        (
            "realquad.core.forms",
            "from realquad._kernels.form_kernels import form_reduce",
            "kernels outside _backend",
        ),
    ],
)
def test_checker_finds_each_kind_of_violation(name: str, source: str, rule: str) -> None:
    assert rule in [v.rule for v in check_module(name, source)]


def test_checker_accepts_what_the_rules_allow() -> None:
    allowed = (
        "from realquad.core.orders import Order\n"  # downwards
        "from realquad.units.results import Unit\n"  # a lower level of the same package
        "from realquad._backend import call_kernel\n"
        "def f():\n    import matplotlib\n"  # an optional dependency
    )
    assert check_module("realquad.units.bsgs", allowed) == []
    assert check_module("realquad.units", "from realquad.units.bsgs import regulator_bsgs") == []
