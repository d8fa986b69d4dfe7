"""orbviz: hydrogen-like orbitals as isosurfaces that enclose a stated probability.

Subpackage map (the pipeline, in order):

- ``orbviz.radial``: normalised radial functions R_nl, energies, nodes, closed-form radii
- ``orbviz.angular``: spherical harmonics (Condon-Shortley), real combinations, labels
- ``orbviz.spec``: the orbital spec grammar (``3dz2``, ``4,2,-1``, ``0.6*2s+0.8*2pz``)
- ``orbviz.orbital``: :class:`Orbital`, an eigenstate or normalised superposition
- ``orbviz.isovalue``: the density level that encloses a probability, by grid-free quadrature
- ``orbviz.summary``: the numbers ``orbviz info`` reports
- ``orbviz.cli``: the command line

Units are atomic (bohr, hartree) throughout.
"""

from __future__ import annotations

__version__ = "0.1.0"

from orbviz.errors import OrbvizError, ParameterError, QuantumNumberError, SpecError
from orbviz.isovalue import Isovalue, enclosed_probability, enclosing_isovalue
from orbviz.orbital import Orbital

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
