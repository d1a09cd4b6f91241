"""Pure exact mathematics for conelang: no I/O, no syntax.

Conventions shared by every module in this package
--------------------------------------------------
* All computations happen in *lattice coordinates*: a lattice of rank d is Z^d with the
  standard basis, its dual is Z^d with the standard pairing <u, v> = sum u_i v_i.
  The semantics layer converts user coordinates (e.g. of an overlattice Z^2 + 1/7 (1,3))
  to lattice coordinates with :mod:`conelang.geometry.lattice` and back for output.
* A vector is a tuple of Python ints (rationals only appear in :mod:`lattice`, as
  ``fractions.Fraction``).  Values are immutable; functions are small and pure.
* A :class:`~conelang.geometry.cone.Cone` is stored in a canonical form, so two cones are
  equal as sets iff they are equal as Python values.
* Heavy functions accept an optional :class:`~conelang.geometry.budget.Budget` and call
  ``budget.tick(n)``; it raises :class:`~conelang.geometry.budget.BudgetExceeded` (with a
  message saying what was too large) when the work goes over the limit or when the
  computation was cancelled.

Modules
-------
budget      Budget, BudgetExceeded, Cancelled
linalg      exact integer linear algebra: hnf, snf, kernel, rank, primitive, solve
lattice     Lattice (Z^d and overlattices), coordinates, dual lattice
cone        Cone, double description, dual, face, intersection, containment
monoid      Hilbert bases of cone ∩ lattice
toric       toric ideals (minimal binomial generators), affine toric varieties, torus action
invariants  smoothness, Gorenstein index, class group, multiplicity
characters  from characters of a torus action back to a cone; normality and holes
maps        lattice maps, images and preimages of cones, toric morphisms and pullbacks
fan         fans, validity, orbits, Picard and class groups, resolutions
"""
