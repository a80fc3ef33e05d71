"""holeshape: lowest-peak-stress cutouts in thin loaded plates (plane stress, mm / N / MPa).

Importing the package stays light: gmsh, scikit-fem, matplotlib and ezdxf load only when used.
"""

__version__ = "0.1.0"

from holeshape.errors import (  # noqa: E402
    GeometryError,
    HoleshapeError,
    MeshError,
    SearchError,
    SolveError,
    StorageError,
    StudyError,
)

CAUTIONS = (
    "Linear-elastic, plane-stress model of a flat panel: no buckling, fatigue-life, fracture or bearing "
    "assessment is made. Results must be reviewed by a qualified engineer; the applicable design codes, "
    "standards and licensed practice govern."
)

STABILITY_CAUTIONS = (
    "Linear-elastic, plane-stress model of a flat panel. The buckling load factor comes from a linear (eigenvalue) "
    "analysis of the perfectly flat plate: it is not conservative for real plates with initial imperfections and "
    "residual stresses, and the knock-down factors come from the applicable codes; post-buckled (tension-field) "
    "webs are a design choice outside this model. No fatigue-life, fracture or bearing assessment is made. Results "
    "must be reviewed by a qualified engineer; the applicable design codes, standards and licensed practice govern."
)


REINFORCEMENT_CAUTION = (
    " The reinforcement is idealised (a fully effective flange without its bend radius, a perfectly bonded doubler"
    " of the web's Poisson's ratio): rivet rows, fastener bearing and flexibility, the bond, and the fatigue of the"
    " doubler or the flange are not assessed."
)


FATIGUE_CAUTION = (
    " The fatigue assessment is safe-life only (Palmgren-Miner on the user's material curve): no crack growth or"
    " damage tolerance; fastener holes, fretting, corrosion and environment are not assessed; the material curve,"
    " the scatter factor and every knock-down come from the applicable code and the user's approved data."
)


def cautions(stability_computed: bool = False, reinforced: bool = False, fatigue_computed: bool = False) -> str:
    """The caution every output carries, saying what this study assessed: with or without a computed buckling
    check, a reinforcement, a fatigue assessment."""
    text = STABILITY_CAUTIONS if stability_computed else CAUTIONS
    if fatigue_computed:
        text = (text.replace("no buckling, fatigue-life, fracture or bearing", "no buckling, fracture or bearing")
                .replace("No fatigue-life, fracture or bearing", "No fracture or bearing"))
        text = text.replace(" Results must be reviewed", FATIGUE_CAUTION + " Results must be reviewed")
    return text + (REINFORCEMENT_CAUTION if reinforced else "")


__all__ = ["CAUTIONS", "FATIGUE_CAUTION", "STABILITY_CAUTIONS", "GeometryError", "HoleshapeError", "MeshError",
           "SearchError", "SolveError", "StorageError", "StudyError", "__version__", "cautions"]
