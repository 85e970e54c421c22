"""The pathway LP: one module per constraint family, assembled in arrays, then as a Pyomo model."""
