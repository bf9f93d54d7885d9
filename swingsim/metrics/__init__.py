"""Summary numbers of a simulated lift: one set of definitions, the safety cautions."""
