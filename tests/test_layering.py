"""The architecture's rules, read from the imports of every module (ast): layers, no loops, no private names
crossing modules, module size.  Rules of this project (common practice for layered code, no source)."""

from __future__ import annotations

import ast
import re
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parents[1] / "assaycut"

CORE_RANK = {"units": 0, "errors": 0, "methods": 1, "model": 2, "cutting": 3, "studies": 4, "yields": 5}
"""The computational core, lowest layer first: a core module imports only from its own layer or below."""
EDGE = {"io", "report", "cli", "explore", "files", "__main__", "data"}
GUI_AND_FILE_LIBRARIES = {"typer", "rich", "openpyxl", "matplotlib", "click"}
MAX_LINES = 600
MAX_TOP_LEVEL = 8


def module_name(path: Path, root: Path = PACKAGE) -> str:
    rel = path.relative_to(root.parent).with_suffix("")
    parts = list(rel.parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def imports_of(source: str, name: str, is_package: bool, known: set[str]) -> list[tuple[str, list[str], int]]:
    """(imported module, names taken from it, line) for every import in ``source``, relative ones resolved
    against module ``name``; ``from pkg import mod`` counts as importing the module pkg.mod."""
    out = []
    base = name.split(".") if is_package else name.split(".")[:-1]
    for node in ast.walk(ast.parse(source)):
        if isinstance(node, ast.Import):
            out += [(a.name, [], node.lineno) for a in node.names]
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                anchor = base[: len(base) - (node.level - 1)]
                mod = ".".join(anchor + ([node.module] if node.module else []))
            else:
                mod = node.module or ""
            names = [a.name for a in node.names]
            subs = [n for n in names if f"{mod}.{n}" in known]
            out += [(f"{mod}.{n}", [], node.lineno) for n in subs]
            rest = [n for n in names if n not in subs]
            if rest or not subs:
                out.append((mod, rest, node.lineno))
    return out


def layer(mod: str) -> str:
    parts = mod.split(".")
    return parts[1] if len(parts) > 1 else "__init__"


def project_modules(root: Path = PACKAGE) -> dict[str, tuple[Path, str]]:
    return {module_name(p, root): (p, p.read_text(encoding="utf-8")) for p in sorted(root.rglob("*.py"))}


def violations(modules: dict[str, tuple[Path, str]]) -> list[str]:
    """Every broken rule, one line each."""
    known = set(modules)
    out = []
    graph: dict[str, set[str]] = {m: set() for m in modules}
    for mod, (path, src) in modules.items():
        src_layer = layer(mod)
        for target, names, line in imports_of(src, mod, path.name == "__init__.py", known):
            top = target.split(".")[0]
            where = f"{mod} line {line}"
            in_core = src_layer in CORE_RANK or mod == "assaycut"
            if in_core and top in GUI_AND_FILE_LIBRARIES:
                out.append(f"{where}: the core imports {target}")
            if top != "assaycut":
                continue
            if target in known:
                graph[mod].add(target)
            t_layer = layer(target)
            if in_core and t_layer in EDGE:
                out.append(f"{where}: the core imports {target}")
            if in_core and t_layer in CORE_RANK and src_layer in CORE_RANK \
                    and CORE_RANK[t_layer] > CORE_RANK[src_layer]:
                out.append(f"{where}: {src_layer} imports the higher layer {target}")
            if src_layer == "io" and t_layer in ("report", "cli"):
                out.append(f"{where}: io imports {target}")
            if src_layer == "report" and t_layer in ("io", "cli"):
                out.append(f"{where}: report imports {target}")
            if src_layer == "explore" and t_layer == "cli":
                out.append(f"{where}: the explorer imports the command line {target}")
            if src_layer == "cli" and mod != "assaycut.cli" and target == "assaycut.cli":
                out.append(f"{where}: a command family imports the CLI root back")
            private = [n for n in names if n.startswith("_") and not n.startswith("__")]
            if private and target != mod:
                out.append(f"{where}: private name(s) {', '.join(private)} imported from {target}")
    out += [f"import loop: {' -> '.join(c)}" for c in cycles(graph)]
    return out


def cycles(graph: dict[str, set[str]]) -> list[list[str]]:
    """One cycle through each strongly connected group of modules (Tarjan)."""
    index, low, stack, on, found = {}, {}, [], set(), []
    counter = [0]

    def visit(v):
        index[v] = low[v] = counter[0]
        counter[0] += 1
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
            if len(comp) > 1 or v in graph.get(v, ()):
                found.append(sorted(comp))

    for v in graph:
        if v not in index:
            visit(v)
    return found


def test_package_keeps_the_layering_rules():
    assert violations(project_modules()) == []


ALLOWED_PRIVATE_ATTRIBUTES = {
    ("assaycut.cli.batch_runner", "os._exit"), ("assaycut.cli.common", "os._exit"),  # documented in os
    ("assaycut.explore.server", "os._exit"),  # the explorer's second Ctrl-C
    # openpyxl's sheet parser, pinned (assaycut.io.workbook.OPENPYXL_PARSER_NAMES; tests/io/test_readers.py)
    ("assaycut.io.workbook", "ws._get_source"), ("assaycut.io.workbook", "ws._shared_strings"),
    ("assaycut.io.workbook", "wb._date_formats"), ("assaycut.io.workbook", "wb._timedelta_formats"),
}
"""Private attributes of other modules that a module may use, each with its reason."""


def private_attribute_uses(modules: dict[str, tuple[Path, str]]) -> list[str]:
    """``obj._name`` read or set where ``_name`` is not defined in the module itself (a def, a class, a name or
    ``self.``/``cls.`` attribute assigned, an argument, a slot name): a private attribute of another module's
    object, one line each."""
    out = []
    for mod, (_, src) in modules.items():
        tree = ast.parse(src)
        own = set()
        for n in ast.walk(tree):
            if isinstance(n, (ast.FunctionDef, ast.AsyncFunctionDef, ast.ClassDef)):
                own.add(n.name)
            elif isinstance(n, ast.Name) and isinstance(n.ctx, ast.Store):
                own.add(n.id)
            elif isinstance(n, ast.Attribute) and isinstance(n.ctx, ast.Store) \
                    and isinstance(n.value, ast.Name) and n.value.id in ("self", "cls"):
                own.add(n.attr)
            elif isinstance(n, ast.arg):
                own.add(n.arg)
            elif isinstance(n, ast.Constant) and isinstance(n.value, str):
                own.add(n.value)
        for n in ast.walk(tree):
            if isinstance(n, ast.Attribute) and n.attr.startswith("_") and not n.attr.startswith("__") \
                    and n.attr not in own and (mod, ast.unparse(n)) not in ALLOWED_PRIVATE_ATTRIBUTES:
                out.append(f"{mod} line {n.lineno}: private attribute {ast.unparse(n)} of another module")
    return out


def test_no_private_attribute_crosses_modules():
    assert private_attribute_uses(project_modules()) == []


def test_tests_import_no_private_names():
    # Tests go through the public interface: a private name imported by a test ties it to one implementation.
    found = []
    for path in sorted((PACKAGE.parent / "tests").rglob("*.py")):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.ImportFrom) and (node.module or "").startswith("assaycut"):
                found += [f"{path.name} line {node.lineno}: {a.name}" for a in node.names
                          if a.name.startswith("_") and not a.name.startswith("__")]
    assert found == []


def test_the_private_attribute_check_can_fail(tmp_path):
    mods = _fake_package(tmp_path, {"__init__.py": "", "model/__init__.py": "",
                                    "model/a.py": "def f(s):\n    return s._inv\n\n\ndef g(s):\n    s._inv = 2\n",
                                    "model/b.py": "class S:\n    def __init__(self):\n        self._inv = 1\n"})
    assert private_attribute_uses(mods) == ["assaycut.model.a line 2: private attribute s._inv of another module",
                                            "assaycut.model.a line 6: private attribute s._inv of another module"]


def test_modules_stay_short_and_the_top_level_small():
    long = {m: src.count("\n") for m, (_, src) in project_modules().items() if src.count("\n") > MAX_LINES}
    assert long == {}
    top = sorted(p.name for p in PACKAGE.glob("*.py"))
    assert len(top) <= MAX_TOP_LEVEL, top


def _fake_package(tmp_path: Path, files: dict[str, str]) -> dict[str, tuple[Path, str]]:
    root = tmp_path / "assaycut"
    for rel, src in files.items():
        p = root / rel
        p.parent.mkdir(parents=True, exist_ok=True)
        p.write_text(src, encoding="utf-8")
    return project_modules(root)


@pytest.mark.parametrize("files,expected", [
    ({"__init__.py": "", "model/__init__.py": "", "model/a.py": "import matplotlib\n"}, "the core imports matplotlib"),
    ({"__init__.py": "", "model/__init__.py": "", "model/a.py": "from ..report import plots\n",
      "report/__init__.py": "", "report/plots.py": ""}, "the core imports assaycut.report.plots"),
    ({"__init__.py": "", "methods/__init__.py": "", "methods/a.py": "from ..cutting.b import x\n",
      "cutting/__init__.py": "", "cutting/b.py": "x = 1\n"}, "methods imports the higher layer assaycut.cutting.b"),
    ({"__init__.py": "", "io/__init__.py": "", "io/a.py": "from ..report.b import x\n", "report/__init__.py": "",
      "report/b.py": "x = 1\n"}, "io imports assaycut.report.b"),
    ({"__init__.py": "", "cli/__init__.py": "from . import a\n", "cli/a.py": "from . import b\n",
      "cli/b.py": "from . import a\n"}, "import loop: assaycut.cli.a -> assaycut.cli.b"),
    ({"__init__.py": "", "explore/__init__.py": "", "explore/a.py": "from ..cli import common\n",
      "cli/__init__.py": "", "cli/common.py": ""}, "the explorer imports the command line assaycut.cli.common"),
    ({"__init__.py": "", "model/__init__.py": "", "model/a.py": "from .b import _hidden\n",
      "model/b.py": "_hidden = 1\n"}, "private name(s) _hidden imported from assaycut.model.b"),
])
def test_the_checker_finds_each_kind_of_violation(tmp_path, files, expected):
    # The rules above must be able to fail: each synthetic package breaks one rule.
    found = violations(_fake_package(tmp_path, files))
    assert any(expected in v for v in found), found


def readme_layout(text: str) -> set[str]:
    """The module paths (relative to assaycut/) the README's Layout block names: a line ``  name/`` opens a
    folder, the ``*.py`` names on the lines below it belong to it; names on the lines before any folder
    belong to the package itself."""
    block = text[text.index("\n    assaycut/\n") + 1:text.index("\n    tests/")]
    out, folder = set(), ""
    for line in block.splitlines()[1:]:
        indent = len(line) - len(line.lstrip())
        first = re.split(r"\s{3,}", line.strip())[0]
        if indent == 6:
            folder = first.split()[0] if first.split()[0].endswith("/") else ""
        elif indent != 8:  # a continued description
            continue
        out |= {folder + n for n in re.findall(r"\b\w+\.py\b", first)}
    return out


def test_the_readme_layout_names_every_module():
    text = (PACKAGE.parent / "README.md").read_text(encoding="utf-8")
    named = readme_layout(text)
    tree = {p.relative_to(PACKAGE).as_posix() for p in PACKAGE.rglob("*.py")}
    assert sorted(tree - named) == [] and sorted(named - tree) == []
