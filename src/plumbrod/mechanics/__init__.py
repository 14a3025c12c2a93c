"""Stage 4, mechanics: rods as members, load cases, statics from the constraint
Jacobian, the :class:`~plumbrod.mechanics.analysis.Analysis` that solves everything
once, and the reserves, masses and compliance built on it.

Imports: earlier stages only (design, geometry, kinematics).
"""
