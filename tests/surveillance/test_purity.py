"""The surveillance package imports only the standard library, and no database (README.md)."""

import ast
import sys
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parents[2] / "clinic_app" / "surveillance"
MODULES = sorted(PACKAGE.glob("*.py"))
# Standard-library modules that would still break purity (I/O the callers must own).
FORBIDDEN_STDLIB = {"sqlite3", "socket", "subprocess", "urllib", "http"}


def forbidden_imports(path: Path) -> set[str]:
    names = set()
    for node in ast.walk(ast.parse(path.read_text(), filename=str(path))):
        if isinstance(node, ast.Import):
            names.update(alias.name for alias in node.names)
        elif isinstance(node, ast.ImportFrom) and node.level == 0:
            names.add(node.module)
    return {
        name
        for name in names
        if not name.startswith("clinic_app.surveillance")
        and (
            name.split(".")[0] not in sys.stdlib_module_names
            or name.split(".")[0] in FORBIDDEN_STDLIB
        )
    }


def test_the_package_has_modules_to_check():
    assert {p.name for p in MODULES} >= {"ears.py", "isoweek.py", "cholera.py", "rules.py"}


@pytest.mark.parametrize("path", MODULES, ids=lambda p: p.name)
def test_it_imports_only_the_standard_library_or_itself(path):
    assert forbidden_imports(path) == set()


def test_the_checker_notices_a_forbidden_import(tmp_path):
    bad = tmp_path / "bad.py"
    bad.write_text(
        "import flask\nfrom clinic_app.storage import db\nimport sqlite3\n"
        "import statistics\nfrom . import rules\n"
    )
    assert forbidden_imports(bad) == {"flask", "clinic_app.storage", "sqlite3"}
