"""The physics options: which state a spec names and which probability its surface encloses.

:class:`Physics` is built the same way by the command line, scene files and the API
(:func:`orbviz._options.build`), and it makes the state: ``Physics(Z=2).state("3dz2")``.
"""

from __future__ import annotations

from dataclasses import dataclass

from orbviz._defaults import DEFAULTS, LIMITS
from orbviz._options import boolean, number, option, text
from orbviz.codata import ELECTRON_MASS_U, PROTON_ELECTRON_MASS_RATIO
from orbviz.states.potentials import check_potential_text
from orbviz.states.spec import split_element
from orbviz.states.state import State

__all__ = ["Physics", "electron_mass_u", "proton_mass_ratio"]


def proton_mass_ratio() -> float:
    """Reduced mass over electron mass for hydrogen, 1 / (1 + m_e/m_p), from CODATA 2022."""
    return 1.0 / (1.0 + 1.0 / PROTON_ELECTRON_MASS_RATIO)


def electron_mass_u() -> float:
    """Return the electron mass in daltons (CODATA 2022, :mod:`orbviz.codata`)."""
    return ELECTRON_MASS_U


@dataclass(frozen=True)
class Physics:
    """Which state a spec names, and the probability its surface encloses.

    Attributes
    ----------
    Z : float or None, default: None (1, or the element's Slater charge)
        Nuclear charge.
    real : bool, default: False
        Read ``n,l,m`` states as real combinations (m > 0 cosine type, m < 0 sine type).
    reduced_mass : bool, default: False
        Correct lengths and energies for the proton's finite mass (hydrogen, Z = 1).
    nuclear_mass : float or None, default: None
        Correct for a nucleus of this mass, in daltons.
    potential : str or None, default: None
        Solve the radial part numerically in ``coulomb``, ``yukawa:LENGTH`` (bohr),
        ``harmonic:OMEGA`` (hartree) or ``table:FILE`` (columns r/bohr, V/hartree).
    fraction : float, default: 0.9
        Probability enclosed by the isosurface.
    """

    Z: float | None = option(
        None,
        "nuclear charge, 0.001 to 1000 (default 1; an element prefix such as Na: sets it)",
        number(LIMITS.Z_min, LIMITS.Z_max, allow_none=True),
        metavar="Z",
        flag="--Z",
    )
    real: bool = option(
        False, "read n,l,m states as real combinations (m > 0 cosine, m < 0 sine type)", boolean()
    )
    reduced_mass: bool = option(
        False, "correct for the proton's finite mass (CODATA; hydrogen, Z = 1)", boolean()
    )
    nuclear_mass: float | None = option(
        None,
        "correct for a nucleus of this mass, 0.00054 to 1e6",
        number(LIMITS.nuclear_mass_min_u, LIMITS.nuclear_mass_max_u, allow_none=True, unit="u"),
        unit="u",
        metavar="U",
    )
    potential: str | None = option(
        None,
        "solve the radial part numerically in: coulomb, yukawa:LENGTH (bohr), harmonic:OMEGA "
        "(hartree), or table:FILE (columns r/bohr, V/hartree)",
        lambda raw: None if raw is None else check_potential_text(text(4096)(raw)),
        metavar="P",
    )
    fraction: float = option(
        DEFAULTS.fraction,
        "probability the surface encloses, 0.01 to 0.999",
        number(LIMITS.fraction_min, LIMITS.fraction_max),
        metavar="F",
    )

    def relations(self) -> list[tuple[str, str]]:
        """Cross-option problems, as (field, message); ``{name}`` stands for a field's key."""
        if self.reduced_mass and self.nuclear_mass is not None:
            return [("reduced_mass", "give {reduced_mass} or {nuclear_mass}, not both")]
        if self.reduced_mass and self.Z not in (None, 1.0):
            return [
                (
                    "reduced_mass",
                    f"uses the proton's mass, so it needs Z = 1 (got Z = {self.Z:g}); "
                    "give {nuclear_mass} for another nucleus",
                )
            ]
        return []

    def mass_ratio(self, spec: str = "") -> float:
        """Reduced mass over electron mass for the nucleus of ``spec`` (1.0: infinitely heavy).

        Raises
        ------
        ParameterError
            If ``reduced_mass`` is asked for an element other than hydrogen.
        """
        if self.nuclear_mass is not None:
            return 1.0 / (1.0 + electron_mass_u() / self.nuclear_mass)
        if not self.reduced_mass:
            return 1.0
        symbol, _ = split_element(spec)
        if symbol is not None and symbol.lower() != "h":
            from orbviz.errors import ParameterError

            raise ParameterError(
                f"{spec!r}: the reduced-mass correction uses the proton's mass, which is "
                f"hydrogen's, not {symbol}'s; give the nucleus's mass in daltons instead"
            )
        return proton_mass_ratio()

    def state(self, spec: str, /) -> State:
        """Make the state ``spec`` names under these physics (see :mod:`orbviz.states.make`)."""
        from orbviz.states.make import make_state

        return make_state(spec, self)
