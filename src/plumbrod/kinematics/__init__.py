"""Stage 3, kinematics: the design as a linkage of arrays, drivers, the batched
Newton solver, mobility and redundancy, load routes, sweeps and kinematic figures
(route ratio, ride height, line of action, transmission angles).

Imports: earlier stages only (:mod:`plumbrod.design`, :mod:`plumbrod.geometry`).
"""
