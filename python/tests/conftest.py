"""Shared helpers of the Python tests: the built CLI (EMBZ_CLI) and its JSON output."""

import json
import os
import subprocess

import pytest

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))


@pytest.fixture(scope="session")
def cli():
    exe = os.environ.get("EMBZ_CLI")
    if not exe:
        pytest.skip("EMBZ_CLI (the built embz tool) not set")

    def run(*args, json_out=True):
        res = subprocess.run([exe] + [str(a) for a in args] + (["--json"] if json_out else []),
                             capture_output=True, text=True, timeout=600)
        assert res.returncode == 0, "embz %s: %s" % (" ".join(map(str, args)), res.stderr)
        if not json_out:
            return res.stdout
        out = res.stdout.strip()
        if "\n{" in out and not out.startswith("["):       # one object per line
            return [json.loads(line) for line in out.splitlines() if line.strip()]
        return json.loads(out)
    return run
