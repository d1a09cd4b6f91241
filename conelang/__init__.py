"""conelang: a declarative language for lattice cones, lattice maps and fans."""
__version__ = "0.1.0"
