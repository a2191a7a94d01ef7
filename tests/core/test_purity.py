"""The core stays pure: importing it pulls in no web framework."""

from __future__ import annotations

import subprocess
import sys


def test_import_core_leaves_web_packages_out() -> None:
    code = "import sys, core; print('fastapi' in sys.modules, 'pydantic' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.split() == ["False", "False"]
