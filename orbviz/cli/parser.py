"""The command-line parser: every command's flags come from the options model."""

from __future__ import annotations

import argparse
from collections.abc import Callable, Sequence

from orbviz import __version__
from orbviz.cli.arguments import add_options
from orbviz.errors import UsageError

__all__ = ["SPEC_HELP", "build_parser"]

SPEC_HELP = """\
orbital spec grammar (labels are case-insensitive, spaces are free):
  2pz  3dx2-y2  4fxyz     real orbital: N followed by s, px, py, pz, dz2, dxz, dyz, dx2-y2,
                          dxy, fz3, fxz2, fyz2, fz(x2-y2), fxyz, fx(x2-3y2), fy(3x2-y2)
  4,2,-1                  complex eigenstate of Lz with n, l, m (the real combination with --real:
                          m > 0 cosine type, m < 0 sine type); n up to 100
  0.6*2s + 0.8*2pz        superposition; weights are real (0.5, 1e-3), imaginary (2j) or complex
  (1+1j)*2,1,1 - 3dxy     in parentheses, and are normalised for you
  2sp3[1]  3sp3d2[6]      one named hybrid of a shell: sp, sp2, sp3, sp3d, sp3d2
  2sp3                    the whole hybrid set (render and model draw every member)
  Na:3s  Fe:3d  C:2p      screened hydrogen-like orbital of an element (H to Xe), with the
                          effective charge from Slater's rules
  bond(1s,1s,R=2.0,+)     a two-centre LCAO shape, nuclei R bohr apart on z, bonding (+) or
                          antibonding (-); not a molecular calculation
Quote the spec in the shell; one that starts with '-' goes after '--'."""


class _Parser(argparse.ArgumentParser):
    def error(self, message: str) -> None:  # type: ignore[override]  # noqa: D102 - argparse hook
        raise UsageError(f"{message} (see '{self.prog} --help')")


def _spec(parser: argparse.ArgumentParser, *, many: bool = False) -> None:
    """Add the orbital argument(s) and the physics flags of a command that takes them."""
    from orbviz.states.physics import Physics

    if many:
        parser.add_argument(
            "spec",
            nargs="+",
            help="one or more orbitals or sets, e.g. 3dz2, 3d (the five real 3d orbitals), "
            "2sp3, C:2p",
        )
    else:
        parser.add_argument(
            "spec", help="the orbital, e.g. 3dz2, 4,2,-1, '0.6*2s+0.8*2pz' or bond(1s,1s,R=2,+)"
        )
    add_options(parser, Physics)


def _output(parser: argparse.ArgumentParser, what: str, metavar: str = "FILE") -> None:
    parser.add_argument("-o", "--output", required=True, metavar=metavar, help=what)
    parser.add_argument(
        "--no-clobber",
        action="store_true",
        help="refuse to replace existing files (by default a run replaces the whole set of files "
        "it writes, and only when all are complete)",
    )


def _report(parser: argparse.ArgumentParser, what: str) -> None:
    parser.add_argument("--report", metavar="FILE.json", help=f"also write {what} as JSON")


def _run_flags(parser: argparse.ArgumentParser) -> None:
    parser.add_argument(
        "--jobs",
        type=int,
        metavar="N",
        help="worker processes (default: one per core, fewer if memory is short)",
    )
    parser.add_argument("--force", action="store_true", help="redo unchanged items too")
    parser.add_argument("--no-progress", action="store_true", help="no progress bar")


def _info(parser: argparse.ArgumentParser) -> None:
    from orbviz.levels.report import ReportOptions

    _spec(parser, many=True)
    add_options(parser, ReportOptions)
    parser.add_argument(
        "--json", action="store_true", help="print one JSON object (keys in docs/info.md)"
    )


def _mesh(parser: argparse.ArgumentParser) -> None:
    from orbviz.surface.options import MeshOptions

    _spec(parser)
    _output(parser, "output: .stl .obj .glb .gltf .ply .3mf")
    add_options(parser, MeshOptions)
    _report(parser, "the mesh statistics")


def _render(parser: argparse.ArgumentParser) -> None:
    from orbviz.figures.options import FigureOptions
    from orbviz.pages.options import PageOptions

    _spec(parser, many=True)
    _output(
        parser,
        "output: .png, .tiff, .pdf or .svg (labels as vector text in PDF and SVG), or .html "
        "(an interactive page that works offline)",
    )
    add_options(parser, FigureOptions)
    add_options(parser, PageOptions)
    _alt_text(parser)


def _alt_text(parser: argparse.ArgumentParser) -> None:
    parser.add_argument(
        "--alt-text", action="store_true", help="also print the figure's alt text (its description)"
    )


def _plot(parser: argparse.ArgumentParser) -> None:
    from orbviz.figures.options import PlotOptions

    _spec(parser, many=True)
    _output(parser, "output: .png, .tiff, .pdf or .svg (text stays text in PDF and SVG)")
    add_options(parser, PlotOptions)
    _alt_text(parser)


def _model(parser: argparse.ArgumentParser) -> None:
    from orbviz.models.options import ModelOptions

    _spec(parser)
    _output(parser, "output: .stl or .3mf")
    add_options(parser, ModelOptions)
    _report(parser, "the model facts")


def _animate(parser: argparse.ArgumentParser) -> None:
    from orbviz.figures.options import AnimationOptions

    _spec(parser)
    _output(parser, "output: .gif, .mp4, .glb, or a folder", "FILE.gif|FILE.mp4|FILE.glb|DIR")
    add_options(parser, AnimationOptions)


def _sample(parser: argparse.ArgumentParser) -> None:
    from orbviz.models.engraving import SampleOptions

    _spec(parser)
    _output(parser, "output: .ply (binary, with phase colours), .csv, .xyz or .npy")
    add_options(parser, SampleOptions)


def _batch(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("scene", help="scene file (.toml)")
    parser.add_argument("-o", "--output", required=True, metavar="DIR", help="output folder")
    _run_flags(parser)
    parser.add_argument(
        "--tables-anywhere",
        action="store_true",
        help="allow potential tables outside the scene's folder",
    )


def _demo(parser: argparse.ArgumentParser) -> None:
    parser.add_argument(
        "-o",
        "--output",
        default="orbviz-demo",
        metavar="DIR",
        help="output folder (default: ./orbviz-demo)",
    )
    _run_flags(parser)
    parser.set_defaults(tables_anywhere=False)


# name: (one-line summary, description, whether it takes an orbital, what adds its flags)
_COMMANDS: dict[str, tuple[str, str, bool, Callable[[argparse.ArgumentParser], None]]] = {
    "info": (
        "energy, nodes, radii and the enclosing isovalue of an orbital",
        "Energy, nodes, radii and the isovalue enclosing --fraction of the probability. "
        "Energies in hartree (eV from CODATA), radii in --units (--json: atomic units).",
        True,
        _info,
    ),
    "mesh": (
        "closed phase-coloured isosurface meshes (STL, OBJ, glTF/GLB, PLY, 3MF)",
        "Closed isosurface bodies enclosing --fraction of the probability, one per phase, "
        "written in the format the output suffix names (an .obj gets a .mtl, a .gltf a .bin "
        "beside it). Coordinates in bohr unless --units says otherwise; nucleus at the "
        "origin, z the quantisation axis.",
        True,
        _mesh,
    ),
    "render": (
        "a publication figure of isosurfaces, rendered off-screen (PNG, TIFF, PDF, SVG)",
        "An orthographic, phase-coloured figure of the isosurface enclosing --fraction, "
        "rendered without a display, with a key of the phases (a phase wheel for complex "
        "states). Several specs or a set (3d, 2p, 2sp3) make one sheet of panels on one "
        "scale; --overlay draws a set in one panel, each member in its own colour. --width "
        "and --dpi size it for print.",
        True,
        _render,
    ),
    "plot": (
        "2D companions: a density slice or the radial distribution (PNG, TIFF, PDF, SVG)",
        "A density slice through the nucleus with the isovalue and nodes, or the radial "
        "distribution with nodes, <r> and the most probable radius. Several specs (or a set "
        "such as 3d) make slice panels on one scale, or radial curves on one axes.",
        True,
        _plot,
    ),
    "model": (
        "a printable model in millimetres (STL, or 3MF with colour parts)",
        "The isosurface as one watertight solid, its longest side --size mm, phases joined "
        "by a rod along z with a nucleus bead (and spokes to off-axis lobes). A .3mf (or "
        "--split) carries each phase and the support as separate colour parts. "
        "Printability is checked before writing. Read docs/printing.md for the safety notes.",
        True,
        _model,
    ),
    "animate": (
        "a superposition in motion: frames of psi(t), one level, the period in fs",
        "Plays psi(t) = sum c_k psi_k exp(-i E_k t) over its beat period T = 2 pi / dE, "
        "at one fixed isovalue for every frame, coloured by phase. Writes an animated "
        "GIF (.gif), an H.264 video (.mp4), an animated glTF binary (.glb) or, for a "
        "name without a suffix, a folder of PNG frames (replaced as a whole). A "
        "superposition of degenerate states does not move and is refused.",
        True,
        _animate,
    ),
    "sample": (
        "exact samples of |psi|^2: point clouds (PLY, CSV, XYZ, NPY), for engraving too",
        "Independent positions distributed exactly as |psi|^2 (not a histogram of the grid), "
        "each with the sign of psi (real states) or its phase angle (complex). In bohr, or "
        "--units angstrom; --size or --block scale the cloud to millimetres (the far 0.1% "
        "left out), --min-spacing thins it for an engraver, --inside keeps the points inside "
        "the surface enclosing that fraction.",
        True,
        _sample,
    ),
    "batch": (
        "run a scene file: figures, meshes and models of many orbitals in parallel",
        "Runs every item of a TOML scene file (see docs/scenes.md) in parallel worker "
        "processes, keeps DIR/manifest.json up to date, skips unchanged items on a rerun, "
        "and writes a contact sheet DIR/index.html. Exit status 1 if any item failed.",
        False,
        _batch,
    ),
    "demo": (
        "make a demo set: the orbitals of n = 1-3, a complex state, a mixture, a model",
        "Runs the scene shipped inside orbviz (orbviz/data/demo.toml) into DIR.",
        False,
        _demo,
    ),
}


def build_parser(argv: Sequence[str] | None = None) -> _Parser:
    """Return the ``orbviz`` parser.

    Every command is listed; only the one named in ``argv`` (every one, without ``argv``) gets
    its flags, so a command imports only its own options.
    """
    chosen = set(_COMMANDS) if argv is None else {a for a in argv if a in _COMMANDS}
    parser = _Parser(
        prog="orbviz",
        description="Hydrogen-like orbitals as isosurfaces that enclose a stated probability.",
        epilog=SPEC_HELP,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    parser.add_argument("--version", action="version", version=f"orbviz {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    for name, (summary, description, spec, flags) in _COMMANDS.items():
        command: _Parser = sub.add_parser(
            name,
            help=summary,
            description=description,
            epilog=SPEC_HELP if spec else None,
            formatter_class=argparse.RawDescriptionHelpFormatter,
        )
        command.set_defaults(command=name)
        if name in chosen:
            flags(command)
    return parser
