"""The example scripts run to the end and print what the README shows them printing."""

from __future__ import annotations

import pathlib
import subprocess
import sys

ROOT = pathlib.Path(__file__).resolve().parents[2]


def run(script, *args):
    out = subprocess.run(
        [sys.executable, str(ROOT / "examples" / script), *args],
        capture_output=True,
        text=True,
        timeout=300,
        check=True,
    )
    return out.stdout


def test_main_job(tmp_path):
    png = tmp_path / "regions.png"
    text = run("main_job.py", "--plot", str(png), "--horizons", "1,3")
    assert "maximal admissible set:" in text
    assert "invariance holds" in text and "admissibility holds" in text
    assert "holds at tolerance" in text
    assert "inside: safe to hand over" in text and "outside: a limit would break" in text
    assert "N =  1:" in text and "N =  3:" in text
    assert "cost block diagonal R + B'PB: yes; certificate holds" in text
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_operating_envelope():
    text = run("operating_envelope.py")
    assert "the two methods agree" in text
    assert "the hull of them is the same set: True" in text
