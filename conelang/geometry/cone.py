"""Polyhedral cones in Z^d (lattice coordinates), exact, in a canonical form.

INTERFACE CONTRACT (implementation in progress):

    Vec = tuple[int, ...]

    @dataclass(frozen=True)
    class Cone:
        ambient_dim: int
        rays: tuple[Vec, ...]        # primitive generators of the extremal rays of the pointed
                                     # part (cone = cone(rays) + span(lineality)), sorted
        lineality: tuple[Vec, ...]   # canonical integer basis (HNF rows) of the lineality space
        facets: tuple[Vec, ...]      # primitive inner normals u (in the dual lattice) of the facets,
                                     # sorted; when not full-dimensional they are reduced modulo
                                     # the linear equations in a canonical way
        equations: tuple[Vec, ...]   # canonical integer basis (HNF rows) of span(cone)^perp

        dim: int (property)  pointed, full, simplicial: bool (properties)

    cone_from_rays(gens, d, lineality=()) -> Cone
    cone_from_inequalities(ineqs, eqs, d) -> Cone
    dual(c) -> Cone
    face(c, u) -> Cone            # raises ValueError if u is not in dual(c)
    intersection(a, b) -> Cone
    contains(c, v) -> bool
    ...
"""
