"""Notebook display: a still figure (PNG) and the interactive page (HTML in an iframe).

Jupyter shows an object by calling its ``_repr_html_`` and ``_repr_png_`` methods. The HTML is
the page of :mod:`.build` inside ``<iframe srcdoc=...>``, so it needs no server extension and
survives export of the notebook to HTML; the PNG is a small off-screen figure, for viewers that
do not run scripts. Nothing here imports a notebook library.
"""

from __future__ import annotations

import dataclasses
import html
from collections.abc import Sequence
from typing import Any

from orbviz._defaults import DEFAULTS
from orbviz._options import build
from orbviz.figures.options import FigureOptions
from orbviz.states.state import State

from .options import PageOptions

__all__ = ["Shown", "show"]

_STILL = (480, 360)  # pixels of the still figure


class Shown:
    """Orbitals as a notebook shows them: ``_repr_html_`` (interactive) and ``_repr_png_``.

    Parameters
    ----------
    states : sequence of State
        The orbitals, one panel each.
    figure : FigureOptions
        How they look.
    page : PageOptions
        The page's levels, weight and arrangement.
    fraction : float
        The enclosed fraction shown first.
    """

    def __init__(
        self,
        states: Sequence[State],
        figure: FigureOptions,
        page: PageOptions,
        fraction: float = DEFAULTS.fraction,
    ) -> None:
        self.states = list(states)
        self.figure = figure
        self.page = page
        self.fraction = fraction
        self._html: str | None = None
        self._png: bytes | None = None

    def __repr__(self) -> str:
        labels = ", ".join(s.label for s in self.states)
        return f"Shown({labels}; {100 * self.fraction:g}%)"

    def page_html(self) -> str:
        """Return the whole interactive page (as ``orbviz render ... -o page.html`` writes)."""
        if self._html is None:
            from .build import page_data, page_html

            data = page_data(self.states, self.figure, self.page, fraction=self.fraction)
            self._html = page_html(data).decode("utf-8")
        return self._html

    def _repr_html_(self) -> str:
        doc = html.escape(self.page_html(), quote=True)
        # tall enough for the controls, the canvas, its numbers and alt text
        height = 760 if len(self.states) == 1 else 1500
        return (
            f'<iframe srcdoc="{doc}" style="width: 100%; height: {height}px; border: 0" '
            'sandbox="allow-scripts" title="orbviz interactive figure"></iframe>'
        )

    def _repr_png_(self) -> bytes:
        if self._png is None:
            from orbviz.figures.figure import figure, sheet

            # the figure's looks at a still's size (a printed width would set the pixels)
            opts = dataclasses.replace(self.figure, size=_STILL, scale=1.0, width=None, height=None)
            if len(self.states) == 1:
                made = figure(self.states[0], opts, fraction=self.fraction)
            else:
                made = sheet(self.states, opts, fraction=self.fraction)
            with made as fig:
                self._png = fig.png()
        return self._png


def show(target: Any, /, **options: Any) -> Shown:
    """Return what a notebook displays for orbitals: an interactive page and a still figure.

    Parameters
    ----------
    target : str, State, OrbitalMesh, Figure or a sequence of these
        Spec text (``"3dz2"``, ``"3d"`` for the set), states, a mesh (its state and fraction)
        or a figure (its panels' states).
    **options
        Physics options for spec text (``Z``, ``fraction``, ...), figure options (``grid``,
        ``units``, ``colors``, ...) and page options (``levels``, ``faces``,
        ``arrangement``), checked as everywhere else.

    Returns
    -------
    Shown
        Jupyter displays it; ``.page_html()`` is the page as text.
    """
    from orbviz._options import rules
    from orbviz.errors import OptionError
    from orbviz.states.make import make_states
    from orbviz.states.physics import Physics

    kinds = {cls: set(rules(cls)) for cls in (Physics, FigureOptions, PageOptions)}
    unknown = set(options) - set().union(*kinds.values())
    if unknown:
        known = ", ".join(sorted(set().union(*kinds.values())))
        raise OptionError(sorted(unknown)[0], f"unknown option (known: {known})")
    given = {cls: {k: v for k, v in options.items() if k in keys} for cls, keys in kinds.items()}
    physics = build(Physics, given[Physics])
    fraction = physics.fraction
    states: list[State] = []
    for item in target if isinstance(target, (list, tuple)) else [target]:
        if isinstance(item, str):
            states += make_states(item, physics)
        elif hasattr(item, "panels"):  # a Figure
            states += [p.state for p in item.panels]
        elif hasattr(item, "isovalue") and hasattr(item, "bodies"):  # an OrbitalMesh
            states.append(item.state)
            fraction = item.isovalue.fraction if "fraction" not in options else fraction
        else:
            states.append(item)
    figure = build(FigureOptions, given[FigureOptions])
    page = build(PageOptions, {"levels": (fraction,), **given[PageOptions]})
    return Shown(states, figure, page, fraction)
