"""orbviz: hydrogen-like orbitals as isosurfaces that enclose a stated probability.

Subpackage map (the pipeline, in order):

- ``orbviz.states.radial``: normalised radial functions R_nl, energies, nodes, closed-form radii
- ``orbviz.states.angular``: spherical harmonics (Condon-Shortley), real combinations, labels
- ``orbviz.states.spec``: the orbital spec grammar (``3dz2``, ``4,2,-1``, ``0.6*2s+0.8*2pz``)
- ``orbviz.states.orbital``: :class:`Orbital`, an eigenstate or normalised superposition
- ``orbviz.levels.isovalue``: the density level that encloses a probability, by grid-free quadrature
- ``orbviz.levels.summary``: the numbers ``orbviz info`` reports
- ``orbviz.cli``: the command line

Units are atomic (bohr, hartree) throughout.
"""

from __future__ import annotations

__version__ = "0.1.0"

from orbviz.errors import OrbvizError, ParameterError, QuantumNumberError, SpecError
from orbviz.levels.isovalue import Isovalue, enclosed_probability, enclosing_isovalue
from orbviz.states.orbital import Orbital

__all__ = [
    "Isovalue",
    "Orbital",
    "OrbvizError",
    "ParameterError",
    "QuantumNumberError",
    "SpecError",
    "__version__",
    "enclosed_probability",
    "enclosing_isovalue",
]
