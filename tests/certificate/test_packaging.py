"""The templates, schema and demo claims ship in a built package, not only in a checkout."""

import os
import shutil
import subprocess
import sys
from pathlib import Path

REPO = Path(__file__).resolve().parents[2]


def test_built_package_finds_templates_schema_and_demo(tmp_path):
    src = tmp_path / "src"
    src.mkdir()
    for name in ("pyproject.toml", "README.md"):
        if (REPO / name).exists():
            shutil.copy(REPO / name, src / name)
    ignore = shutil.ignore_patterns("__pycache__", "*.pyc")
    shutil.copytree(REPO / "certify", src / "certify", symlinks=True, ignore=ignore)
    shutil.copytree(REPO / "templates", src / "templates", ignore=ignore)
    lib = tmp_path / "lib"
    build = subprocess.run([sys.executable, "-c", "import setuptools; setuptools.setup()",
                            "-q", "build_py", "--build-lib", str(lib)],
                           cwd=src, capture_output=True, text=True, timeout=300)
    assert build.returncode == 0, build.stderr[-2000:]
    assert (lib / "certify" / "templates").is_dir() and not (lib / "certify" / "templates").is_symlink()
    code = ("from certify.render.templates import template_dir; "
            "from certify.certificate.schema import load_schema; "
            "from certify.demo import demo_claims_path; import os; "
            "print(template_dir()); load_schema(); assert os.path.isfile(demo_claims_path())")
    run = subprocess.run([sys.executable, "-c", code], cwd=tmp_path, capture_output=True, text=True,
                         env={**os.environ, "PYTHONPATH": str(lib)}, timeout=120)
    assert run.returncode == 0, run.stderr[-2000:]
    assert Path(run.stdout.strip()) == lib / "certify" / "templates"
