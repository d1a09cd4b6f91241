"""Notebook-style use of conelang from Python (run it as a script, or paste the cells into a
notebook, where every object shows itself as its picture, LaTeX or Markdown).

The working group of ``quotient_classification.cone`` classifies three-dimensional cyclic
quotient singularities 1/r(a,b,c) for a paper: this script prints the numbers of the paper's
table from that file, then builds more cones of the family in code.
"""
from fractions import Fraction
from pathlib import Path

import conelang

# %% the file of the working group (found next to this script, whatever the working folder)
doc = conelang.load(Path(__file__).with_name("quotient_classification.cone"))
assert doc.ok, [str(d) for d in doc.errors]

# %% the table for the paper: one row per cone with a quotient type
print(f"{'cone':8} {'type':14} {'|G|':>4} {'junior':>6} {'index':>5} {'terminal':>8} {'canonical':>9}")
for obj in doc:
    if obj.kind != "cone" or "quotient" not in obj.variety:
        continue
    v = obj.variety
    print(f"{obj.name:8} {v.quotient:14} {v.quotient_order:>4} {len(v.junior):>6} "
          f"{v.gorenstein_index:>5} {str(v.terminal):>8} {str(v.canonical):>9}")

# exact values: the weights of the group generator of 1/7(1,2,4) are Fractions
print("weights of a generator of G for klein:", doc["klein"].variety.quotient_generators[0])

# %% a cone built in code: C^3 / (Z/5) of type 1/5(1,2,2), without writing .cone text
g = (Fraction(1, 5), Fraction(2, 5), Fraction(2, 5))
N = conelang.lattice(3, glue=[g], name="N")
sing = conelang.cone(rays=[(1, 0, 0), (0, 1, 0), (0, 0, 1)], lattice=N, name="quintic")
v = sing.variety
print()
print(repr(sing))
print("type:", v.quotient, "  group:", v.quotient_group)
print("ages:", {age: count for age, count in v.ages.items()})
print("junior points:", v.junior)
print("Gorenstein index:", v.gorenstein_index, " terminal:", v.terminal, " canonical:", v.canonical)
print("generators of the dual monoid:", len(v.generators), "  equations:", len(v.equations))
print("Hilbert basis of sigma ∩ N:", sing.hilbert_basis)

# %% a family: 1/r(1,1,1) for r = 2..6 (Gorenstein exactly when r divides 3)
print()
for r in range(2, 7):
    lat = conelang.lattice(3, glue=[(Fraction(1, r),) * 3], name="L")
    c = conelang.cone(rays=[(1, 0, 0), (0, 1, 0), (0, 0, 1)], lattice=lat, name=f"q{r}")
    print(f"1/{r}(1,1,1): Gorenstein index {c.variety.gorenstein_index}, "
          f"canonical {c.variety.canonical}, {len(c.variety.generators)} generators")
