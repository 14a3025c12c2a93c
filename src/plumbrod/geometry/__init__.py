"""Stage 2, geometry: solids in the chassis frame (capsules, boxes, cylinders, prisms,
plates) and the rocker plate outline built from a rocker's pickups.

Imports: :mod:`plumbrod.errors`, :mod:`plumbrod.design`, numpy and shapely.
"""
