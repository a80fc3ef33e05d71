"""The web's constitutive law in plane stress and plate bending: one object instead of (E, nu) in every signature.

Every layer that needs the material's stiffness (the plane-stress solve, the stress recovery, the plate bending
stiffness, the imposed strain of displacement edges) asks an :class:`Elastic` object; nothing below the study
parser reads Young's modulus and Poisson's ratio as loose numbers. A new kind of material (a laminate) is one
subclass (its keys, how it reads them from [material], its checks) and one line in :data:`ELASTIC_KINDS`; the study
parser asks the kind for its keys and its values.

Conventions: stresses MPa, strains dimensionless with the *tensor* shear strain e_xy = gamma_xy / 2, components
ordered (xx, yy, xy); arrays of any shape broadcast element by element.
"""

from __future__ import annotations

import math
from abc import ABC, abstractmethod
from collections.abc import Callable
from dataclasses import dataclass, fields
from typing import Any, ClassVar

# Plausible Young's moduli of structural materials in MPa (N/mm^2): foams and elastomers sit below, nothing
# engineering sits above diamond. A value outside is almost always a unit slip (GPa or Pa typed for MPa).
PLAUSIBLE_MODULUS_MPA = (1.0e3, 1.0e6)  # common practice, no source


class Elastic(ABC):
    """The contract of a material kind. Subclasses are frozen dataclasses whose fields are the study-file keys."""

    kind: ClassVar[str] = ""
    description: ClassVar[str] = ""  # the material model in a few words, as the report's assumptions say it
    headings: ClassVar[dict[str, str]] = {}  # the kind's own keys as the report's tables head them, with units
    reference_key: ClassVar[str] = "modulus"  # the [material] key the reference modulus is read from (warnings)

    @abstractmethod
    def stress(self, exx: Any, eyy: Any, exy: Any) -> tuple[Any, Any, Any]:
        """(sxx, syy, sxy) MPa from the strain components (tensor shear strain exy)."""

    @abstractmethod
    def strain(self, sxx: Any, syy: Any, sxy: Any) -> tuple[Any, Any, Any]:
        """(exx, eyy, exy) from the stress components (the compliance; tensor shear strain)."""

    @abstractmethod
    def stress_tensor(self, eps: Any) -> Any:
        """The stress tensor of a 2 x 2 strain tensor as scikit-fem's form helpers give it (sym_grad(u))."""

    @abstractmethod
    def bending_work(self, thickness: float, ddu: Any, ddv: Any) -> Any:
        """Kirchhoff plate bending energy density M(u) : kappa(v) for the Hessians ``ddu``, ``ddv`` (2 x 2 tensors
        of scikit-fem's form helpers) of a plate of ``thickness`` mm, N mm per mm^2."""

    @property
    @abstractmethod
    def reference_modulus(self) -> float:
        """The modulus (MPa) other members are compared with (a reinforcement of another material, the
        plausibility check)."""

    @abstractmethod
    def parameters(self) -> dict[str, float]:
        """The study-file values of this kind (for inputs.json and the report)."""

    @classmethod
    def keys(cls) -> tuple[str, ...]:
        """The kind's own keys in [material] (default: its dataclass fields)."""
        return tuple(f.name for f in fields(cls))  # type: ignore[arg-type]  # every kind is a dataclass

    @classmethod
    def from_table(cls, table: dict[str, Any], number: Callable[[str], float]) -> Elastic:
        """The kind built from its [material] table; ``number(key)`` reads one required finite number and raises
        the study's one-line error. Default: every key a number, then :meth:`check` (a kind with other values, a
        laminate's plies, overrides this)."""
        made = cls(**{k: number(k) for k in cls.keys()})
        made.check()
        return made

    @abstractmethod
    def check(self) -> None:
        """Raise ``ValueError`` naming the field (``material.<key>``) when the constants are not a valid material."""

    def plausibility(self) -> list[str]:
        """One-line warnings when a value looks like a unit slip (never an error: the user may mean it)."""
        lo, hi = PLAUSIBLE_MODULUS_MPA
        e = self.reference_modulus
        if lo <= e <= hi:
            return []
        guess = e * 1000.0 if e < lo else e / 1.0e6
        return [f"material.{self.reference_key} = {e:g} MPa is outside 1 to 1000 GPa ({lo:g} to {hi:g} MPa), where"
                f" every structural material lies: holeshape works in MPa (N/mm^2); did you mean {guess:g} MPa?"]

    def to_dict(self) -> dict[str, Any]:
        return {"kind": self.kind, **self.parameters()}


@dataclass(frozen=True)
class Isotropic(Elastic):
    """Linear-elastic isotropic material: Young's modulus (MPa) and Poisson's ratio."""

    kind: ClassVar[str] = "isotropic"
    description: ClassVar[str] = "isotropic linear-elastic material"
    headings: ClassVar[dict[str, str]] = {"youngs_modulus": "E (MPa)", "poisson_ratio": "Poisson's ratio"}
    reference_key: ClassVar[str] = "youngs_modulus"
    youngs_modulus: float
    poisson_ratio: float

    @property
    def lame(self) -> tuple[float, float]:
        """Plane-stress Lame constants (lambda*, mu) in MPa.

        Written out here on purpose: scikit-fem 12.0.2 changed ``plane_stress()`` to return these directly, so the
        older idiom ``lame_parameters(*plane_stress(E, nu))`` silently gives wrong stresses (a Kt regression test
        guards this)."""
        e, nu = self.youngs_modulus, self.poisson_ratio
        return e * nu / (1.0 - nu * nu), e / (2.0 * (1.0 + nu))

    @property
    def shear_modulus(self) -> float:
        return self.youngs_modulus / (2.0 * (1.0 + self.poisson_ratio))

    def stress(self, exx: Any, eyy: Any, exy: Any) -> tuple[Any, Any, Any]:
        lam, mu = self.lame
        tr = exx + eyy
        return 2 * mu * exx + lam * tr, 2 * mu * eyy + lam * tr, 2 * mu * exy

    def strain(self, sxx: Any, syy: Any, sxy: Any) -> tuple[Any, Any, Any]:
        e, nu = self.youngs_modulus, self.poisson_ratio
        return (sxx - nu * syy) / e, (syy - nu * sxx) / e, sxy / (2.0 * self.shear_modulus)

    def stress_tensor(self, eps: Any) -> Any:
        from skfem.helpers import eye, trace

        lam, mu = self.lame
        return 2.0 * mu * eps + lam * eye(trace(eps), 2)

    def bending_work(self, thickness: float, ddu: Any, ddv: Any) -> Any:
        from skfem.helpers import ddot, trace

        nu = self.poisson_ratio
        d = self.youngs_modulus * thickness ** 3 / (12.0 * (1.0 - nu ** 2))
        return d * ((1.0 - nu) * ddot(ddu, ddv) + nu * trace(ddu) * trace(ddv))

    @property
    def reference_modulus(self) -> float:
        return float(self.youngs_modulus)

    def parameters(self) -> dict[str, float]:
        return {"youngs_modulus": self.youngs_modulus, "poisson_ratio": self.poisson_ratio}

    def check(self) -> None:
        """Raise ``ValueError`` naming the field when the constants are not a positive-definite material."""
        if not (math.isfinite(self.youngs_modulus) and self.youngs_modulus > 0):
            raise ValueError(f"material.youngs_modulus must be > 0, got {self.youngs_modulus!r}")
        if not -1.0 < self.poisson_ratio < 0.5:
            raise ValueError(f"material.poisson_ratio must lie strictly between -1 and 0.5, got"
                             f" {self.poisson_ratio!r}")


ELASTIC_KINDS: dict[str, type[Elastic]] = {cls.kind: cls for cls in (Isotropic,)}
