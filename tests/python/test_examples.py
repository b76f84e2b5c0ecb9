"""The example scripts run to the end and print what the README shows them printing."""

from __future__ import annotations

import pathlib
import subprocess
import sys

ROOT = pathlib.Path(__file__).resolve().parents[2]


def run(script):
    out = subprocess.run(
        [sys.executable, str(ROOT / "examples" / script)],
        capture_output=True,
        text=True,
        timeout=300,
        check=True,
    )
    return out.stdout


def test_main_job():
    text = run("main_job.py")
    assert "maximal admissible set:" in text
    assert "invariance holds" in text and "admissibility holds" in text
    assert "inside: safe to hand over" in text and "outside: a limit would break" in text


def test_operating_envelope():
    text = run("operating_envelope.py")
    assert "the two methods agree" in text
    assert "the hull of them is the same set: True" in text
