"""Intersection numbers, Mori and nef cones of complete simplicial fans.

Sources: Cox–Little–Schenck, Toric Varieties, §6.3 and §12.5; Fulton, Introduction to Toric
Varieties, §2.5 and §5.1 (all from memory).  Independent references: the self-intersection
formula on smooth complete surfaces, Noether's formula K^2 = 12 - #rays, the weighted
projective plane formula, and ampleness by strict convexity of the support function.
"""
from __future__ import annotations

import itertools
import random
from fractions import Fraction

from conelang.geometry import linalg
from conelang.geometry.intersection import IntersectionRing, mori_data


def projective_space(n):
    rays = [tuple(int(i == j) for j in range(n)) for i in range(n)] + [tuple([-1] * n)]
    cones = list(itertools.combinations(range(n + 1), n))
    return rays, cones


def product(f, g, d, e):
    (r1, c1), (r2, c2) = f, g
    rays = [tuple(v) + (0,) * e for v in r1] + [(0,) * d + tuple(v) for v in r2]
    cones = [tuple(a) + tuple(len(r1) + b for b in bb) for a in c1 for bb in c2]
    return rays, cones


def check_linear_equivalence(ring):
    """div χ^m = Σ <m, v_ρ> D_ρ ~ 0 meets every product of d-1 divisors in 0."""
    r, d = len(ring.rays), ring.d
    for rest in itertools.combinations_with_replacement(range(r), d - 1):
        for j in range(d):
            assert sum(v[j] * ring.top(list(rest) + [rho]) for rho, v in enumerate(ring.rays)) == 0


def test_projective_spaces():
    """P^n: every top product of the D_i is 1 (each D_i is a hyperplane); (-K)^n = (n+1)^n."""
    for n in range(1, 5):
        ring = IntersectionRing(*projective_space(n), n)
        for key in itertools.combinations_with_replacement(range(n + 1), n):
            assert ring.top(key) == 1
        assert ring.anticanonical_degree() == (n + 1) ** n
        md = mori_data(ring)
        assert md.projective and len(md.mori.rays) == 1 and len(md.nef.rays) == 1
        check_linear_equivalence(ring)


def hirzebruch(a):
    return [(1, 0), (0, 1), (-1, a), (0, -1)], [(0, 1), (1, 2), (2, 3), (0, 3)]


def surface_self_intersections(rays):
    """Fulton §2.5: on a smooth complete surface, v_{i-1} + v_{i+1} = b_i v_i and D_i^2 = -b_i
    (rays in cyclic order)."""
    out = []
    for i, v in enumerate(rays):
        s = tuple(x + y for x, y in zip(rays[i - 1], rays[(i + 1) % len(rays)]))
        b = next(Fraction(s[j], v[j]) for j in range(2) if v[j])
        out.append(-b)
    return out


def test_hirzebruch_surfaces():
    """Fulton §2.5 (from memory): on H_a, D_2^2 = -a, D_4^2 = a, the fibres D_1, D_3 have
    square 0, K^2 = 8; Mori and nef cones have two rays each, H_a is projective."""
    for a in range(0, 6):
        ring = IntersectionRing(*hirzebruch(a), 2)
        assert [ring.top((i, i)) for i in range(4)] == [0, -a, 0, a]
        assert [ring.top((i, i)) for i in range(4)] == surface_self_intersections(hirzebruch(a)[0])
        assert ring.anticanonical_degree() == 8
        md = mori_data(ring)
        assert md.projective and len(md.mori.rays) == 2 and len(md.nef.rays) == 2
        check_linear_equivalence(ring)


def blow_up(rays, i):
    """The blow-up of a smooth complete surface at the fixed point of the cone (i, i+1):
    insert v_i + v_{i+1} between them (rays in cyclic order)."""
    j = (i + 1) % len(rays)
    new = tuple(x + y for x, y in zip(rays[i], rays[j]))
    return rays[:i + 1] + [new] + rays[i + 1:]


def cyclic_cones(n):
    return [(i, (i + 1) % n) for i in range(n)]


def test_blow_ups_of_the_plane():
    """Noether's formula for smooth toric surfaces, K^2 = 12 - #rays (Fulton §2.5); the
    exceptional curve of a blow-up has square -1; all are projective."""
    rng = random.Random(7)
    for _ in range(12):
        rays = [(1, 0), (0, 1), (-1, -1)]
        for _ in range(rng.randint(1, 5)):
            rays = blow_up(rays, rng.randrange(len(rays)))
        ring = IntersectionRing(rays, cyclic_cones(len(rays)), 2)
        assert ring.anticanonical_degree() == 12 - len(rays)
        assert [ring.top((i, i)) for i in range(len(rays))] == surface_self_intersections(rays)
        assert mori_data(ring).projective
    ring = IntersectionRing(blow_up([(1, 0), (0, 1), (-1, -1)], 0), cyclic_cones(4), 2)
    assert ring.top((1, 1)) == -1        # the exceptional curve over the point of cone(e1, e2)


def test_weighted_projective_planes():
    """P(q0, q1, q2) (well formed): D_i · D_j = q_i q_j / (q0 q1 q2) (CLS §12.5 / Fulton §5.1,
    from memory), here with rays v1 = e1, v2 = e2, v0 = -(q1 e1 + q2 e2)/q0."""
    for q in [(1, 1, 2), (1, 2, 3), (1, 1, 3), (1, 3, 5)]:
        q0, q1, q2 = q
        assert q0 == 1
        rays = [(-q1, -q2), (1, 0), (0, 1)]
        ring = IntersectionRing(rays, [(0, 1), (1, 2), (0, 2)], 2)
        for i, j in itertools.combinations_with_replacement(range(3), 2):
            assert ring.top((i, j)) == Fraction(q[i] * q[j], q0 * q1 * q2)
        assert ring.anticanonical_degree() == Fraction(sum(q) ** 2, q0 * q1 * q2)


def test_products():
    """P^1 × P^2: (-K)^3 = 3·2·3^2 = 54; Mori and nef cones are simplicial with 2 rays."""
    ring = IntersectionRing(*product(projective_space(1), projective_space(2), 1, 2), 3)
    assert ring.anticanonical_degree() == 54
    md = mori_data(ring)
    assert md.projective and len(md.mori.rays) == 2 and len(md.nef.rays) == 2
    check_linear_equivalence(ring)
    ring = IntersectionRing(*product(projective_space(1), product(projective_space(1), projective_space(1), 1, 1), 1, 2), 3)
    assert ring.anticanonical_degree() == 48 and len(mori_data(ring).mori.rays) == 3


def prism(twisted: bool):
    a = [(1, 0, 1), (0, 1, 1), (-1, -1, 1)]
    rays = a + [(x, y, -1) for x, y, _ in a]
    cones = [(0, 1, 2), (3, 4, 5)]
    for i in range(3):
        j = (i + 1) % 3
        if twisted or i < 2:
            cones += [(i, j, 3 + j), (i, 3 + j, 3 + i)]      # diagonal a_i b_{i+1}
        else:
            cones += [(i, j, 3 + i), (j, 3 + j, 3 + i)]      # diagonal a_{i+1} b_i
    return rays, cones


def strictly_convex(rays, cones, a):
    """CLS Lemma 6.1.13 (from memory): D = Σ a_ρ D_ρ is ample iff for each maximal σ the m_σ
    with <m_σ, v_ρ> = -a_ρ on σ has <m_σ, v_ρ> > -a_ρ for the other rays."""
    for c in cones:
        m = linalg.solve_rational([rays[i] for i in c], [-a[i] for i in c], 3)
        if any(sum(x * y for x, y in zip(m, v)) <= -a[k] for k, v in enumerate(rays) if k not in c):
            return False
    return True


def test_a_complete_fan_that_is_not_projective():
    """The boundary of a triangular prism with the three side squares cut by diagonals turning
    the same way.  Our own argument (common practice, no source): a_i - b_i is the same vector
    for every i, so a_i + b_{i+1} = a_{i+1} + b_i; a strictly convex support function φ would need
    φ(a_i) + φ(b_{i+1}) < φ(a_{i+1}) + φ(b_i) for the diagonal a_i b_{i+1} of each square, and
    summing over i gives 0 < 0.  With one diagonal turned the other way an ample class exists."""
    ring = IntersectionRing(*prism(True), 3)
    md = mori_data(ring)
    assert not md.projective and md.mori.lineality
    check_linear_equivalence(ring)
    rays, cones = prism(False)
    ring = IntersectionRing(rays, cones, 3)
    md = mori_data(ring)
    assert md.projective
    x = [sum(col) for col in zip(*md.nef.rays)]           # interior point of the nef cone
    a = [0] * len(rays)
    for b, xb in zip(md.basis, x):
        a[b] = xb
    assert strictly_convex(rays, cones, a)
    for r in md.nef.rays:                                  # nef rays are on the boundary: not ample
        a = [0] * len(rays)
        for b, xb in zip(md.basis, r):
            a[b] = xb
        assert not strictly_convex(rays, cones, a)


def test_curve_classes_are_relations():
    """A curve C gives the relation Σ_ρ (D_ρ · C) v_ρ = 0 (CLS Prop. 6.4.1, from memory)."""
    for rays, cones, d in [(*hirzebruch(3), 2), (*prism(False), 3), (*projective_space(3), 3)]:
        ring = IntersectionRing(rays, cones, d)
        for w in ring.walls():
            cv = ring.curve_vector(w)
            assert all(sum(c * v[j] for c, v in zip(cv, rays)) == 0 for j in range(d))


def test_star_subdivision_of_a_smooth_fan_is_a_blow_up():
    """Star subdivision at v_i + v_j of a smooth complete surface is the blow-up of a fixed point
    (Fulton §2.4, from memory): K^2 drops by one and the new divisor has square -1; compared
    with the cyclic insertion done by hand above."""
    from conelang.geometry.subdivision import star_subdivision
    rays = [(1, 0), (0, 1), (-1, -1)]
    cones = cyclic_cones(3)
    rng = random.Random(3)
    for _ in range(6):
        c = rng.choice(cones)
        v = tuple(rays[c[0]][k] + rays[c[1]][k] for k in range(2))
        rays, cones = map(list, star_subdivision(rays, cones, 2, v))
        ring = IntersectionRing(rays, cones, 2)
        assert ring.anticanonical_degree() == 12 - len(rays)
        assert ring.top((len(rays) - 1,) * 2) == -1
