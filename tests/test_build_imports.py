"""What a real build loads: the kernel (OCP) but neither CadQuery nor matplotlib.

Both were dropped from the build for speed (CadQuery's import costs about a second and 170 MB per process on top
of OCP's; matplotlib's import and first figure about 0.35 s), so a stray import of either would quietly bring the
cost back.  The build of the demo rib runs in a new process, which then lists the top-level packages it holds.
"""

from __future__ import annotations

import json
import subprocess
import sys

import pytest
from testing import DEMO_RIB, ROOT


@pytest.mark.slow
@pytest.mark.solid
def test_rib_build_loads_the_kernel_but_not_cadquery_or_matplotlib(tmp_path) -> None:
    probe = (
        "import json, sys\n"
        "from diegen.cli import main\n"
        f"assert main(['build', {str(DEMO_RIB)!r}, '-o', {str(tmp_path)!r}, '-j', '1', '-q']) == 0\n"
        "print(json.dumps(sorted({m.split('.')[0] for m in sys.modules} & {'OCP', 'cadquery', 'matplotlib'})))\n"
    )
    run = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, cwd=ROOT, check=True)
    assert json.loads(run.stdout.strip().splitlines()[-1]) == ["OCP"]
    assert (tmp_path / "T1" / "T1-nose" / "T1-nose-preview.png").is_file()
