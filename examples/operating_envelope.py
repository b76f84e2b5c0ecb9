"""The certified operating envelope of an invented 4-state machine (polytope tools).

An invented scenario of our own: a pick-and-place head whose state is
(x position [m], z height [m], x velocity [m/s], z velocity [m/s]). Its limits come from several
specification sheets written by different teams, so the list repeats itself: some limits are
scaled copies of others, some are implied by the rest. The script builds the polytope, removes
the redundant limits, enumerates the vertices, finds the Chebyshev centre (the state with the
largest margin to every limit) and solves one LP, then prints a summary.

scripts/demo runs examples/main_job.py; this script shows the polytope tools on their own.
"""

from __future__ import annotations

import argparse

import corral
import numpy as np

# (label, row of A, b): each limit reads a·s <= b for the state s = (x, z, vx, vz).
LIMITS = [
    ("x travel, right stop", [1, 0, 0, 0], 0.40),
    ("x travel, left stop", [-1, 0, 0, 0], 0.40),
    ("z above the table", [0, -1, 0, 0], 0.00),
    ("z below the gantry", [0, 1, 0, 0], 0.25),
    ("x speed, forward", [0, 0, 1, 0], 1.20),
    ("x speed, backward", [0, 0, -1, 0], 1.20),
    ("z speed, up", [0, 0, 0, 1], 0.60),
    ("z speed, down", [0, 0, 0, -1], 0.60),
    # Braking distance: stop before the end stops (v * t_brake + x <= limit).
    ("brake before right stop", [1, 0, 0.15, 0], 0.42),
    ("brake before left stop", [-1, 0, -0.15, 0], 0.42),
    ("brake before the table", [0, -1, 0, -0.12], 0.02),
    # Cable carrier: far out and high at once is not allowed.
    ("cable carrier reach", [1, 1.5, 0, 0], 0.55),
    ("cable carrier reach, left", [-1, 1.5, 0, 0], 0.55),
    # Motor power: combined speed.
    ("drive power", [0, 0, 1, 1], 1.50),
    ("drive power, reverse", [0, 0, -1, -1], 1.50),
    # Copies from the safety sheet (in mm and mm/s: scaled rows) and looser duplicates.
    ("safety sheet: right stop [mm]", [1000, 0, 0, 0], 400.0),
    ("safety sheet: z top [mm]", [0, 1000, 0, 0], 260.0),
    ("old x speed limit", [0, 0, 1, 0], 1.50),
    ("old drive power", [0, 0, 1, 1], 1.90),
    ("loose envelope", [1, 1, 1, 1], 3.00),
]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--backend", default=None, help="LP backend (see corral.backends())")
    args = parser.parse_args()
    if args.backend is not None:
        corral.set_defaults(backend=args.backend)
    labels = [row[0] for row in LIMITS]
    A = np.array([row[1] for row in LIMITS], dtype=float)
    b = np.array([row[2] for row in LIMITS], dtype=float)
    envelope = corral.Polytope(A, b)
    print(f"corral {corral.__version__}; LP backends in this build: {', '.join(corral.backends())}")
    print(f"operating envelope: {envelope.num_rows} limits in {envelope.dim} states")

    tight, info = envelope.irredundant(return_info=True)
    redundant = envelope.redundant_rows()
    print(
        f"irredundant form: {tight.num_rows} limits "
        f"({info.lp_solves} LPs, {info.mean_lp_rows:.1f} rows each on average, "
        f"{info.seconds * 1e3:.2f} ms, method {info.method})"
    )
    for i in redundant:
        print(f"  redundant: {labels[i]}")

    exact_rows = envelope.redundant_rows(exact=True)
    agree = "agree" if list(exact_rows) == list(redundant) else "DISAGREE"
    print(
        f"exact check (GMP rationals): {len(exact_rows)} redundant limits, the two methods {agree}"
    )

    V = tight.vertices()
    print(
        f"vertices: {V.shape[0]}; the hull of them is the same set: "
        f"{corral.Polytope.from_vertices(V).same_set(envelope)}"
    )

    ball = envelope.chebyshev_center()
    centre = ", ".join(f"{v:+.3f}" for v in ball.center)
    print(f"Chebyshev centre (largest margin to every limit): ({centre}), margin {ball.radius:.3f}")

    # One LP: the highest forward speed allowed anywhere in the envelope.
    best = corral.maximize([0, 0, 1, 0], tight.A, tight.b)
    print(
        f"highest forward speed in the envelope: {best.value:.3f} m/s ({best.status}, "
        f"backend {best.backend})"
    )
    lo, hi = envelope.bounding_box()
    print("bounding box: " + ", ".join(f"[{a:+.3f}, {c:+.3f}]" for a, c in zip(lo, hi)))


if __name__ == "__main__":
    main()
