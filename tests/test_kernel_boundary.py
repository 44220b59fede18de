"""The geometry core never imports the CAD kernel, and --help stays light."""

from __future__ import annotations

import subprocess
import sys

BLOCK = """
import sys
class Block:
    def find_spec(self, name, path=None, target=None):
        if name.split('.')[0] in ('cadquery', 'OCP'):
            raise ImportError('kernel blocked: ' + name)
sys.meta_path.insert(0, Block())
"""


def run(code: str) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-c", BLOCK + code], capture_output=True, text=True)


def test_core_imports_and_works_with_kernel_blocked():
    code = """
import geomgen.sections, geomgen.spec, geomgen.geometry, geomgen.geometry.skin, geomgen.geometry.tessellate
import geomgen.geometry.figures, geomgen.build, geomgen.outputs
from geomgen.spec import load_spec
from geomgen.geometry import build_models
from geomgen.geometry.figures import intended_figures
m = build_models(load_spec('specs/demo-foilset.toml'))
print(round(intended_figures(m[0]).span_mm))
"""
    res = run(code)
    assert res.returncode == 0, res.stderr
    assert res.stdout.strip() == "800"


def test_help_does_not_import_the_kernel():
    code = """
import sys
from click.testing import CliRunner
from geomgen.cli import main
for args in (['--help'], ['build', '--help'], ['schema'], ['new', '--help']):
    r = CliRunner().invoke(main, args)
    assert r.exit_code == 0, (args, r.output)
assert not any(m.split('.')[0] in ('cadquery', 'OCP') for m in sys.modules)
print('ok')
"""
    res = run(code)
    assert res.returncode == 0, res.stderr
