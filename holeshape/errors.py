"""The small exception hierarchy of holeshape.

Every error a user can cause derives from :class:`HoleshapeError`; each subclass is also the matching builtin
so callers that catch ``ValueError`` or ``RuntimeError`` keep working. Library code raises, only the CLI prints.
Exit codes of the command line: 2 ``StudyError``/``GeometryError`` (bad input), 3 ``MeshError``/``SolveError``
(the numerics failed on a valid design), 4 ``StorageError``, 5 ``SearchError``, 1 anything else (a bug: the
message asks for a report), 130 interrupted (Ctrl-C).
"""


class HoleshapeError(Exception):
    """Root of every error holeshape raises on purpose."""


class StudyError(HoleshapeError, ValueError):
    """A study file (or the values in it) breaks a rule; the message names the field, the value and the rule."""


class GeometryError(HoleshapeError, ValueError):
    """A cutout or panel geometry that cannot be built (self-crossing, outside the panel, degenerate)."""


class MeshError(HoleshapeError, RuntimeError):
    """The mesher failed on a geometry that passed the checks."""


class SolveError(HoleshapeError, RuntimeError):
    """The linear solve failed or its result cannot be trusted (singular or ill-conditioned system)."""


class StorageError(HoleshapeError, RuntimeError):
    """The study's storage (journal file or database) cannot be opened, created or written."""


class SearchError(HoleshapeError, RuntimeError):
    """The search ran but cannot give an answer (no feasible design, a worker process stopped)."""


class NoDesignError(SearchError):
    """The search ran to its budget and nothing it found, nor any standard shape, meets every requirement at the
    final level. ``summary`` is the run's summary (written to the run folder before this is raised): the reasons by
    count, the nearest misses and what to change."""

    def __init__(self, message: str, summary: dict | None = None):
        super().__init__(message)
        self.summary = summary or {}
