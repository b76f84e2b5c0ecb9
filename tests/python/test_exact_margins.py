"""Tests of corral.verify_invariance(..., exact=True): the worst margin of A S ⊆ S in rationals.

Outside references, named beside each check:
- pycddlib's rational LP (cdd.gmp.linprog_solve, GMP), one LP per row of S with the objective
  F_i A formed here in Python fractions from the exact values of the doubles;
- closed forms from the definition: the support function of a box, h(c) = Σ |c_j| u_j for
  the box [-u, u], with the doubles read exactly by fractions.Fraction.
Systems are generated here from seeded numpy generators.
"""

from __future__ import annotations

import math
from fractions import Fraction as Fr

import cdd
import cdd.gmp
import corral
import numpy as np
import pytest
from reference import random_stable


def exact_margins_pycddlib(A, F, t):
    """t_i - max{F_i A x : F x <= t} for every row, in rationals (reference: pycddlib GMP LP).
    None for a row whose LP is unbounded."""
    n = F.shape[1]
    Fq = [[Fr(float(v)) for v in row] for row in F]
    tq = [Fr(float(v)) for v in t]
    Aq = [[Fr(float(v)) for v in row] for row in A]
    rows = [[tq[k]] + [-v for v in Fq[k]] for k in range(len(Fq))]
    out = []
    for i in range(len(Fq)):
        c = [sum(Fq[i][k] * Aq[k][q] for k in range(n)) for q in range(n)]
        lp = cdd.gmp.linprog_from_array(rows + [[Fr(0)] + c], obj_type=cdd.LPObjType.MAX)
        cdd.gmp.linprog_solve(lp)
        if lp.status == cdd.LPStatusType.OPTIMAL:
            out.append(tq[i] - lp.obj_value)
        else:
            assert lp.status in (
                cdd.LPStatusType.DUAL_INCONSISTENT,
                cdd.LPStatusType.STRUC_DUAL_INCONSISTENT,
                cdd.LPStatusType.UNBOUNDED,
            )
            out.append(None)
    return out


def box(n, u=1.0):
    return corral.Polytope.box(-u * np.ones(n), u * np.ones(n))


def test_box_closed_forms():
    """S = [-1, 1]^2; h_S(c) = |c_1| + |c_2| (definition of the support function of a box)."""
    S = box(2)
    # A = diag(1, 0.5): the row x_1 <= 1 maps to itself, margin exactly 0.
    rep = corral.verify_invariance(np.diag([1.0, 0.5]), S, exact=True)
    assert rep.exact and rep.worst_margin_exact == 0
    assert rep.holds and rep.holds_exactly
    # A = diag(1 + 2^-50, 0.5): margin 1 - (1 + 2^-50) = -2^-50 exactly. Within the tolerance
    # (holds) but not exactly (holds_exactly), and the value is not rounded to zero.
    eps = Fr(1, 2**50)
    rep = corral.verify_invariance(np.diag([1 + 2.0**-50, 0.5]), S, exact=True)
    assert rep.worst_margin_exact == -eps
    assert rep.worst_margin == -(2.0**-50)
    assert rep.holds and not rep.holds_exactly
    assert rep.worst_row in (0, 1, 2, 3)
    # A = 1.001 I: margin -0.001 exactly as a double reads; fails at the tolerance too.
    rep = corral.verify_invariance(1.001 * np.eye(2), S, exact=True)
    assert rep.worst_margin_exact == 1 - Fr(1.001)
    assert not rep.holds and not rep.holds_exactly
    # A shear [[0.5, 0.3], [0, 0.5]]: max of 0.5 x_1 + 0.3 x_2 over the box is 0.8, margin 0.2
    # as the doubles read (Fraction(0.3) is not 3/10).
    rep = corral.verify_invariance(np.array([[0.5, 0.3], [0.0, 0.5]]), S, exact=True)
    assert rep.worst_margin_exact == 1 - Fr(0.5) - Fr(0.3)
    assert rep.holds_exactly
    # Without exact, nothing exact is reported.
    rep = corral.verify_invariance(np.diag([1.0, 0.5]), S)
    assert not rep.exact and rep.worst_margin_exact is None and not rep.holds_exactly


@pytest.mark.parametrize("n,radius,seed", [(2, 0.97, 1), (3, 0.95, 2), (4, 0.98, 3), (5, 0.9, 4)])
def test_admissible_sets_match_pycddlib(n, radius, seed):
    """Worst exact margin of maximal admissible sets (rows tight under A up to rounding, so
    margins of either sign near 1e-16) equals the minimum over pycddlib's rational LPs."""
    rng = np.random.default_rng(seed)
    A = random_stable(rng, n, (radius, radius))
    r = corral.max_admissible_set(A, box(n))
    S = r.set
    ref = exact_margins_pycddlib(A, S.A, S.b)  # reference: pycddlib GMP LP per row
    rep = corral.verify_invariance(A, S, certificate=r.certificate.invariance, exact=True)
    assert rep.worst_margin_exact == min(ref)
    assert ref[rep.worst_row] == min(ref)
    assert rep.holds_exactly == (min(ref) >= 0)
    assert abs(min(ref)) < Fr(1, 10**12)  # tight up to rounding, as these sets are
    assert rep.holds
    # The float margin of the certificate lies near the exact one.
    assert abs(rep.certificate.worst_margin - float(min(ref))) < 1e-12


def test_set_with_a_line_uses_relaxations():
    """S = P x R (a polygon times a free coordinate) has no vertex, so every row goes through
    the exact LPs over relaxations; the answer equals pycddlib's and the polygon's own."""
    rng = np.random.default_rng(7)
    A2 = random_stable(rng, 2, (0.96, 0.96))
    P = corral.max_admissible_set(A2, box(2)).set
    F = np.hstack([P.A, np.zeros((P.num_rows, 1))])
    A3 = np.block([[A2, np.zeros((2, 1))], [np.zeros((1, 2)), np.array([[0.5]])]])
    S = corral.Polytope(F, P.b)
    rep = corral.verify_invariance(A3, S, exact=True)
    ref = exact_margins_pycddlib(A3, F, P.b)  # reference: pycddlib GMP LP per row
    assert rep.worst_margin_exact == min(ref)
    assert rep.exact_lps >= P.num_rows
    rep2 = corral.verify_invariance(A2, P, exact=True)
    assert rep2.worst_margin_exact == rep.worst_margin_exact


def test_unbounded_and_empty_sets():
    # A slab |x_1| <= 1 under a shear: F_1 A = (1, 1) is unbounded above on the slab.
    S = corral.Polytope(np.array([[1.0, 0.0], [-1.0, 0.0]]), np.array([1.0, 1.0]))
    rep = corral.verify_invariance(np.array([[1.0, 1.0], [0.0, 1.0]]), S, exact=True)
    assert rep.worst_margin == -math.inf and rep.worst_margin_exact is None
    assert not rep.holds and not rep.holds_exactly
    assert exact_margins_pycddlib(np.array([[1.0, 1.0], [0.0, 1.0]]), S.A, S.b)[0] is None
    # The same slab under diag(0.5, 3): bounded rows, margin 1 - 0.5 exactly.
    rep = corral.verify_invariance(np.diag([0.5, 3.0]), S, exact=True)
    assert rep.worst_margin_exact == Fr(1, 2) and rep.holds_exactly
    # An empty set (x <= -1 and -x <= -1) is invariant: +inf margin.
    E = corral.Polytope(np.array([[1.0], [-1.0]]), np.array([-1.0, -1.0]))
    rep = corral.verify_invariance(np.array([[2.0]]), E, exact=True)
    assert rep.holds and rep.holds_exactly and rep.worst_margin == math.inf


def test_progress_cancels_and_bad_input():
    rng = np.random.default_rng(11)
    A = random_stable(rng, 3, (0.95, 0.95))
    S = corral.max_admissible_set(A, box(3)).set
    stages = []

    def progress(p):
        stages.append(p["stage"])
        return p["stage"] != "exact"

    with pytest.raises(corral.CancelledError):
        corral.verify_invariance(A, S, exact=True, progress=progress)
    assert "exact" in stages
    with pytest.raises(corral.InvalidInputError, match="A"):
        corral.verify_invariance(np.eye(2), S, exact=True)
    with pytest.raises(corral.InvalidInputError, match="A"):
        corral.verify_invariance(np.full((3, 3), np.nan), S, exact=True)
