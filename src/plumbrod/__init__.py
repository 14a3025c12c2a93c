"""plumbrod: route aero loads to the wheel uprights through rods and rockers.

Reads a design of hardpoints, solves the 3D linkage through the suspension travel and
body motion, and checks route ratio, line of action, forces, buckling, clearance.
"""

from plumbrod.errors import AssemblyError, DesignFileError, LocationError, PlumbrodError

__all__ = ["AssemblyError", "DesignFileError", "LocationError", "PlumbrodError", "__version__"]
__version__ = "0.1.0"
