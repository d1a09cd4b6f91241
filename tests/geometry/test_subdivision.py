"""Star subdivisions: the result is a fan refining the old one with the same support
(CLS §3.3, Fulton §2.4 (from memory)); checked with the engine's independent fan
validity test and by sampling lattice points."""
from __future__ import annotations

import itertools

from hypothesis import given, settings, strategies as st

from conelang.geometry.cone import cone_from_rays, contains
from conelang.geometry.fan import check_fan, fan_invariants
from conelang.geometry.subdivision import cone_containing, refine, star_subdivision

P3 = ([(1, 0, 0), (0, 1, 0), (0, 0, 1), (-1, -1, -1)], list(itertools.combinations(range(4), 3)))
vec3 = st.tuples(*[st.integers(-3, 3)] * 3).filter(lambda v: any(v))


def primitive(v):
    from math import gcd
    g = gcd(*v)
    return tuple(x // g for x in v)


@settings(max_examples=30, deadline=None)
@given(st.lists(vec3, min_size=1, max_size=3))
def test_refinements_of_projective_space_are_complete_fans(vectors):
    rays, cones = refine(*P3, 3, [primitive(v) for v in vectors])
    f = check_fan(rays, cones, 3)
    assert f.valid
    inv = fan_invariants(f)
    assert inv.complete and inv.simplicial
    for c in cones:                                   # every new cone lies in an old cone
        assert cone_containing(P3[0], P3[1], 3, tuple(sum(rays[i][k] for i in c) for k in range(3))) is not None


@settings(max_examples=30, deadline=None)
@given(vec3)
def test_star_subdivision_of_a_cone_keeps_its_support(v):
    base = [(1, 0, 0), (0, 1, 0), (1, 1, 3)]
    c = cone_from_rays(base, 3)
    v = primitive(v)
    if not contains(c, v):
        return
    rays, cones = star_subdivision(base, [(0, 1, 2)], 3, v)
    assert check_fan(rays, cones, 3).valid
    for p in itertools.product(range(-2, 4), repeat=3):   # same support, point by point
        inside_new = cone_containing(rays, cones, 3, p) is not None
        assert inside_new == contains(c, p)
