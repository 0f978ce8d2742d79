"""The example notebook examples/embezzlement.ipynb runs headless without errors
(jupyter nbconvert --execute, Debian's jupyter-nbconvert and python3-ipykernel), the kernel
importing embz from the build tree (PYTHONPATH and EMBZ_LIBRARY are inherited)."""

import json
import os
import shutil
import subprocess
import sys

HERE = os.path.dirname(os.path.abspath(__file__))
NOTEBOOK = os.path.join(HERE, "..", "..", "examples", "embezzlement.ipynb")


def test_notebook_executes(tmp_path):
    jupyter = shutil.which("jupyter")
    cmd = ([jupyter] if jupyter else [sys.executable, "-m", "jupyter"]) + [
        "nbconvert", "--to", "notebook", "--execute", "--ExecutePreprocessor.timeout=600",
        "--output-dir", str(tmp_path), "--output", "executed.ipynb", NOTEBOOK]
    env = dict(os.environ, MPLBACKEND="Agg")
    res = subprocess.run(cmd, capture_output=True, text=True, env=env, timeout=900,
                         cwd=str(tmp_path))
    assert res.returncode == 0, res.stderr[-4000:]
    nb = json.load(open(tmp_path / "executed.ipynb"))
    outputs = [o for c in nb["cells"] if c["cell_type"] == "code" for o in c.get("outputs", [])]
    assert not [o for o in outputs if o.get("output_type") == "error"]
    text = "".join("".join(o.get("text", "")) for o in outputs)
    assert "cheapest resource" in text and "sweep cancelled" in text
    assert any("image/svg+xml" in o.get("data", {}) for o in outputs)
