"""The numerical layer: the finite-volume carbon solver, part shapes and grids, root finders, and the
march every cycle planner uses (a solver run that knows its history)."""
