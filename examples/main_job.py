"""Main job: certified sets for the predictive control of a belt drive.

An invented scenario of our own: a carriage pulled along a rail by a motor through a toothed
belt that stretches a little. The state is
    (carriage position error [m], carriage speed [m/s], belt stretch [mm], motor speed [m/s]),
the input is the motor force [N]. The carriage runs under the LQR law u = -K x, and the job
is the set of states from which the closed loop never breaks a limit: position, speeds, belt
stretch and motor force. The script prints the set's size, its determinedness index, the LP
work, the time, and whether the certificates (Farkas multipliers for A S ⊆ S and S ⊆ limits)
check out.

Then the dual-mode predictive controller: u_k = -K x_k + c_k for the first N steps, the LQR law
after. For a few horizons N it computes the constraints of the online QP in (x, c), its cost
matrix, and the region of states where the QP is feasible, and draws (PNG, --plot) two 2-D
projections of those regions with the terminal set inside them and closed-loop trajectories
under the LQR law from states of the terminal set.

The numbers are made up for the example; the model is a nominal one, and a set computed from
it certifies that model only.
"""

from __future__ import annotations

import argparse
import os
import pathlib
import time

import corral
import numpy as np

# Invented plant parameters.
CARRIAGE_MASS = 2.0  # kg
MOTOR_MASS = 0.5  # kg (rotor inertia seen at the belt)
BELT_STIFFNESS = 4.0e3  # N/m
BELT_DAMPING = 8.0  # N s/m
SAMPLE = 0.01  # s
MM = 1e3  # belt stretch is stated in mm


def continuous_model():
    """dx/dt = Ac x + Bc u for x = (p, v, s [mm], w): p' = v, m v' = k s + c (w - v),
    s' = w - v, M w' = u - k s - c (w - v); s is carried in mm."""
    k, c, m, M = BELT_STIFFNESS, BELT_DAMPING, CARRIAGE_MASS, MOTOR_MASS
    Ac = np.array(
        [
            [0.0, 1.0, 0.0, 0.0],
            [0.0, -c / m, k / m / MM, c / m],
            [0.0, -MM, 0.0, MM],
            [0.0, c / M, -k / M / MM, -c / M],
        ]
    )
    Bc = np.array([[0.0], [0.0], [0.0], [1.0 / M]])
    return Ac, Bc


def zero_order_hold(Ac, Bc, dt):
    """Exact discretisation: the exponential of [[Ac, Bc], [0, 0]] dt, by scaling and squaring
    a Taylor series (the matrix is small and its norm is brought below 1/2 first)."""
    n, m = Bc.shape
    M = np.zeros((n + m, n + m))
    M[:n, :n], M[:n, n:] = Ac * dt, Bc * dt
    squarings = max(0, int(np.ceil(np.log2(max(np.abs(M).sum(axis=1).max(), 1e-300) / 0.5))))
    M = M / 2**squarings
    E, term = np.eye(n + m), np.eye(n + m)
    for j in range(1, 20):
        term = term @ M / j
        E = E + term
    for _ in range(squarings):
        E = E @ E
    return E[:n, :n], E[:n, n:]


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument(
        "--plot",
        default=str(pathlib.Path(__file__).resolve().parents[1] / "build" / "main_job.png"),
        help="PNG file for the picture of the regions (default: build/main_job.png)",
    )
    parser.add_argument(
        "--horizons", default="2,5,10", help="comma-separated horizons N (default 2,5,10)"
    )
    args = parser.parse_args()
    print(f"corral {corral.__version__}; LP backends in this build: {', '.join(corral.backends())}")

    A, B = zero_order_hold(*continuous_model(), SAMPLE)
    n, m = B.shape
    # LQR weights: position and belt stretch matter most.
    Q = np.diag([400.0, 1.0, 0.5, 0.1])
    R = np.array([[1e-3]])
    gain = corral.lqr(A, B, Q, R)
    print(
        f"plant: belt drive, {n} states, {m} input, sampled at {SAMPLE * 1e3:.0f} ms; LQR "
        f"closed-loop spectral radius {gain.spectral_radius:.4f}"
    )

    # Limits: position error, carriage speed, belt stretch, motor speed; motor force.
    X = corral.Polytope.box([-0.05, -0.5, -2.0, -0.8], [0.05, 0.5, 2.0, 0.8])
    U = corral.Polytope.box([-4.0], [4.0])
    t0 = time.perf_counter()
    result = corral.closed_loop_admissible_set(A, B, gain.K, X, U)
    seconds = time.perf_counter() - t0
    S = result.set
    print(
        f"maximal admissible set: {S.num_rows} irredundant rows, determinedness index "
        f"t* = {result.steps}, {result.lp_solves} LPs, {seconds * 1e3:.1f} ms"
    )
    c = result.conditions
    print(
        f"conditions: origin margin {c.origin_margin:.3f}, bounded up to a subspace "
        f"{c.bounded_up_to_subspace}, observable part {c.observable_dim}-D with spectral "
        f"radius {c.observable_spectral_radius:.4f}"
    )
    cert = result.certificate
    print(
        f"certificates: invariance {'holds' if cert.invariance.holds else 'FAILS'} "
        f"({len(cert.invariance.rows)} rows), admissibility "
        f"{'holds' if cert.admissibility.holds else 'FAILS'} ({len(cert.admissibility.rows)} "
        f"rows); worst margin {result.worst_margin:.1e} (rounding level: tight rows are normal)"
    )
    exact = corral.verify_invariance(A - B @ gain.K, S, certificate=cert.invariance, exact=True)
    margin = float(exact.worst_margin_exact)
    print(
        f"exact re-check of A S ⊆ S in rationals: worst margin {margin:.2e}"
        f" ({'>= 0 exactly' if exact.holds_exactly else 'below 0 at rounding level'}; "
        f"{'holds' if exact.holds else 'FAILS'} at tolerance {exact.tolerance:.0e})"
    )
    lo, hi = S.bounding_box()
    names = ["position [m]", "speed [m/s]", "stretch [mm]", "motor speed [m/s]"]
    print("reachable range inside the set:")
    for name, a, b in zip(names, lo, hi):
        print(f"  {name:>18}: [{a:+.4f}, {b:+.4f}]")
    # The set's use: a start state is safe for the closed loop exactly when it is inside.
    for start in ([0.015, -0.1, 0.0, -0.1], [0.03, -0.2, 0.0, 0.0]):
        inside = bool(S.contains(np.array(start)))
        verdict = "inside: safe to hand over" if inside else "outside: a limit would break"
        print(f"start state {start}: {verdict}")
    # From outside, the closed loop breaks a limit within t* + 1 steps of the nominal model.
    x = np.array([0.03, -0.2, 0.0, 0.0])
    for k in range(result.steps + 1):
        u = -gain.K @ x
        if not (X.contains(x) and U.contains(u)):
            print(f"  simulated from the outside state: first limit broken at step {k}")
            break
        x = A @ x + B @ u

    horizons = [int(h) for h in args.horizons.split(",")]
    regions = dual_mode_regions(A, B, gain, Q, R, X, U, horizons)
    plot_regions(args.plot, A, B, gain, S, regions)
    print(f"picture: {os.path.relpath(args.plot)}")


def dual_mode_regions(A, B, gain, Q, R, X, U, horizons):
    """The dual-mode regions for the given horizons, with a line each."""
    print("dual-mode predictive control, u_k = -K x_k + c_k for k < N, the LQR law after:")
    regions = []
    for N in horizons:
        t0 = time.perf_counter()
        reg = corral.dual_mode_region(A, B, gain.K, X, U, N, Q=Q, R=R)
        seconds = time.perf_counter() - t0
        blk = R + B.T @ gain.P @ B
        diag_ok = np.allclose(reg.H, np.kron(np.eye(N), blk), rtol=1e-8) and np.allclose(
            reg.H_xc, 0.0, atol=1e-8 * np.abs(reg.H).max()
        )
        cert = "holds" if reg.certificate.holds else "FAILS"
        print(
            f"  N = {N:2d}: QP {reg.F_c.shape[1]} variables, {reg.augmented.num_rows} irredundant "
            f"rows (index {reg.steps}); feasible states {reg.state_region.num_rows} rows; "
            f"{reg.lp_solves} LPs, {seconds * 1e3:.1f} ms; cost block diagonal R + B'PB: "
            f"{'yes' if diag_ok else 'NO'}; certificate {cert}"
        )
        regions.append(reg)
    return regions


def plot_regions(path, A, B, gain, S, regions):
    """Two projections of the regions (largest horizon first), the terminal set S, and
    closed-loop trajectories under u = -K x from states of S."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    views = [
        ((0, 1), ("position error [m]", "carriage speed [m/s]")),
        ((1, 3), ("carriage speed [m/s]", "motor speed [m/s]")),
    ]
    fig, axes = plt.subplots(1, 2, figsize=(11, 4.6))
    colours = plt.cm.Blues(np.linspace(0.25, 0.7, len(regions)))
    # Starts: the vertices of S farthest along a few directions, pulled in by 2 %.
    V = S.vertices()
    dirs = np.vstack([np.eye(4), -np.eye(4)])
    starts = 0.98 * V[np.unique(np.argmax(V @ dirs.T, axis=0))]
    paths = []
    for x in starts:
        xs = [x]
        for _ in range(400):
            x = A @ x - B @ (gain.K @ x)
            xs.append(x)
        paths.append(np.array(xs))
    for ax, (dims, labels) in zip(axes, views):
        for reg, col in sorted(zip(regions, colours), key=lambda rc: -rc[0].horizon):
            draw(ax, reg.state_region.project(list(dims)), col, f"feasible, N = {reg.horizon}")
        draw(ax, S.project(list(dims)), "#f2a65a", "terminal set (LQR law)")
        for k, xs in enumerate(paths):
            ax.plot(
                xs[:, dims[0]],
                xs[:, dims[1]],
                color="#7a3b00",
                lw=0.8,
                label="closed loop from the terminal set" if k == 0 else None,
            )
        ax.set_xlabel(labels[0])
        ax.set_ylabel(labels[1])
        ax.grid(alpha=0.3)
    handles, labels = axes[0].get_legend_handles_labels()
    fig.legend(handles, labels, loc="lower center", ncol=len(labels), fontsize=8, frameon=False)
    fig.suptitle("Belt drive: where the dual-mode controller is feasible (2-D projections)")
    fig.tight_layout(rect=(0, 0.06, 1, 1))
    pathlib.Path(path).parent.mkdir(parents=True, exist_ok=True)
    fig.savefig(path, dpi=110)
    plt.close(fig)


def draw(ax, P, colour, label):
    """Fills a 2-D polytope (vertices in angular order)."""
    V = P.vertices()
    c = V.mean(axis=0)
    V = V[np.argsort(np.arctan2(V[:, 1] - c[1], V[:, 0] - c[0]))]
    ax.fill(V[:, 0], V[:, 1], color=colour, alpha=0.9, label=label, ec="k", lw=0.5)


if __name__ == "__main__":
    main()
