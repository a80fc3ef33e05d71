"""holeshape: lowest-peak-stress cutouts in thin loaded plates (plane stress, mm / N / MPa).

Importing the package stays light: gmsh, scikit-fem, matplotlib and ezdxf load only when used.
"""

__version__ = "0.1.0"

from holeshape.errors import GeometryError, HoleshapeError, MeshError, SolveError, StudyError  # noqa: E402

CAUTIONS = (
    "Linear-elastic, plane-stress model of a flat panel: no buckling, fatigue-life, fracture or bearing "
    "assessment is made. Results must be reviewed by a qualified engineer; the applicable design codes, "
    "standards and licensed practice govern."
)

__all__ = ["CAUTIONS", "GeometryError", "HoleshapeError", "MeshError", "SolveError", "StudyError", "__version__"]
