"""Helpers shared by the Python benchmarks: a capped run in a forked child, and the results
file every benchmark writes (its numbers plus the versions and machine facts)."""

from __future__ import annotations

import json
import multiprocessing as mp
import os
import platform
import time

import corral
import scipy


def run_capped(target, args, cap):
    """Runs target(*args, queue) in a forked child and returns what it put on the queue, or
    None when the child was still running after `cap` seconds (it is then killed)."""
    ctx = mp.get_context("fork")
    queue = ctx.Queue()
    proc = ctx.Process(target=target, args=(*args, queue))
    proc.start()
    proc.join(cap)
    if proc.is_alive():
        proc.kill()
        proc.join()
        return None
    return queue.get() if not queue.empty() else None


def write_results(path, benchmark, **fields):
    """Writes benchmarks/results/<name>.json: the fields given, with the corral and scipy
    versions, the LP backends, and the machine (Python, CPU, cores) and date."""
    os.makedirs(os.path.dirname(os.path.abspath(path)), exist_ok=True)
    payload = dict(
        benchmark=benchmark,
        corral=corral.__version__,
        scipy=scipy.__version__,
        backends=corral.backends(),
        python=platform.python_version(),
        machine=platform.machine(),
        processor=platform.processor(),
        cores=os.cpu_count(),
        date=time.strftime("%Y-%m-%d %H:%M:%S"),
        **fields,
    )
    with open(path, "w", encoding="utf-8") as fh:
        json.dump(payload, fh, indent=1)
    print(f"\nwritten: {path}")
