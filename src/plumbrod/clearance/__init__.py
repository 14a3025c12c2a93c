"""Stage 5, clearance: exact least distances between solids, batched over poses, and
the clearance survey of every moving member against zones, tyres and each other.

Imports: earlier stages only (design, geometry, kinematics, mechanics).
"""
