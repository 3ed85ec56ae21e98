"""Issue 2: one storage package owns every SQL string; nothing else executes SQL."""

from __future__ import annotations

import ast
import re
from pathlib import Path

import clinic_app

PACKAGE = Path(clinic_app.__file__).parent
STORAGE = PACKAGE / "storage"
# SQL as this code base spells it (upper-case keywords), not English prose in docstrings.
SQL = re.compile(r"^\s*(SELECT\s|INSERT\s+(OR\s+\w+\s+)?INTO\s|UPDATE\s+\w+\s+SET\s|"
                 r"DELETE\s+FROM\s|(CREATE|DROP|ALTER)\s+(TABLE|INDEX|TRIGGER|VIEW)\s|PRAGMA\s|"
                 r"BEGIN\b)")
EXECUTE = {"execute", "executemany", "executescript"}


def _offences(path: Path, root: Path = PACKAGE) -> list[str]:
    out = []
    name = path.relative_to(root)
    for node in ast.walk(ast.parse(path.read_text(), filename=str(path))):
        if isinstance(node, ast.Call) and isinstance(node.func, ast.Attribute) \
                and node.func.attr in EXECUTE:
            out.append(f"{name}:{node.lineno} calls .{node.func.attr}()")
        if isinstance(node, ast.Constant) and isinstance(node.value, str) \
                and SQL.match(node.value):
            out.append(f"{name}:{node.lineno} holds SQL {node.value[:40]!r}")
    return out


def test_no_module_outside_storage_executes_or_spells_sql():
    modules = [p for p in PACKAGE.rglob("*.py") if STORAGE not in p.parents]
    assert len(modules) > 30
    offences = [o for path in modules for o in _offences(path)]
    assert offences == []


def test_the_check_would_see_sql_in_a_view(tmp_path):
    sample = PACKAGE / "web" / "home.py"
    assert _offences(sample) == []
    bad = "def view(conn):\n    return conn.execute('SELECT * FROM users').fetchall()\n"
    (tmp_path / "bad.py").write_text(bad)
    assert len(_offences(tmp_path / "bad.py", tmp_path)) == 2
