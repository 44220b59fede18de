"""The layer contract in pyproject.toml ([tool.importlinter]) holds: imports flow one way
(spec -> geometry -> {hydro, cad} -> build -> check -> {drawings, parts} -> report -> cli)
and only geomgen.cad imports the CAD kernel. Checked with import-linter, which reads every
import statement, those inside functions included."""

from __future__ import annotations

import shutil
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def _lint(root: Path) -> subprocess.CompletedProcess:
    exe = Path(sys.executable).with_name("lint-imports")
    cmd = [str(exe)] if exe.exists() else [shutil.which("lint-imports") or "lint-imports"]
    return subprocess.run(cmd + ["--no-cache", str(root / "pyproject.toml")], capture_output=True, text=True,
                          cwd=root, env={"PYTHONPATH": str(root), "PATH": "/usr/bin:/bin"})


def test_layer_contract_is_kept():
    res = _lint(ROOT)
    assert res.returncode == 0, res.stdout + res.stderr
    assert "2 kept, 0 broken" in res.stdout


def test_contract_catches_an_upward_import_inside_a_function(tmp_path):
    """The contract can fail: a lazy import from cad up into check is reported as broken."""
    copy = tmp_path / "tree"
    shutil.copytree(ROOT / "geomgen", copy / "geomgen")
    shutil.copy(ROOT / "pyproject.toml", copy / "pyproject.toml")
    loft = copy / "geomgen" / "cad" / "loft.py"
    loft.write_text(loft.read_text() + "\n\ndef _upward():\n    from ..check import run  # noqa: F401\n")
    res = _lint(copy)
    assert res.returncode != 0 and "broken" in res.stdout
    assert "geomgen.cad.loft -> geomgen.check.run" in res.stdout
