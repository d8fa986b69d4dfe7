"""Command line: ``orbviz SUBCOMMAND ...``; :func:`main` is testable in-process."""

from __future__ import annotations

import argparse
import json
import math
import os
import sys
from collections.abc import Callable, Sequence

from orbviz import __version__
from orbviz._defaults import DEFAULTS
from orbviz.errors import OrbvizError, ParameterError

__all__ = ["main"]

SPEC_HELP = """\
orbital spec grammar (labels are case-insensitive, spaces are free):
  2pz  3dx2-y2  4fxyz     real orbital: N followed by s, px, py, pz, dz2, dxz, dyz, dx2-y2,
                          dxy, fz3, fxz2, fyz2, fz(x2-y2), fxyz, fx(x2-3y2), fy(3x2-y2)
  4,2,-1                  complex eigenstate of Lz with n, l, m (the real combination with --real:
                          m > 0 cosine type, m < 0 sine type)
  0.6*2s + 0.8*2pz        superposition; weights are real (0.5, 1e-3), imaginary (2j) or complex
  (1+1j)*2,1,1 - 3dxy     in parentheses, and are normalised for you
  Na:3s  Fe:3d  C:2p      screened hydrogen-like orbital of an element (H to Xe), with the
                          effective charge from Slater's rules
Quote the spec in the shell; one that starts with '-' goes after '--'."""


class UsageError(OrbvizError, ValueError):
    """A command line that argparse could not read."""


class _Parser(argparse.ArgumentParser):
    def error(self, message: str) -> None:  # noqa: D102 - argparse hook
        raise UsageError(f"{message} (see '{self.prog} --help')")


def _finite(kind: str) -> Callable[[str], float]:
    def parse(text: str) -> float:
        try:
            value = float(text)
        except ValueError:
            raise argparse.ArgumentTypeError(f"{kind} must be a number, got {text!r}") from None
        if not math.isfinite(value):
            raise argparse.ArgumentTypeError(f"{kind} must be finite, got {text!r}")
        return value

    return parse


def _add_orbital_options(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("spec", help="the orbital, e.g. 3dz2, 4,2,-1 or '0.6*2s+0.8*2pz'")
    parser.add_argument(
        "--Z",
        type=_finite("Z"),
        default=None,
        help="nuclear charge (default 1; an element prefix like Na: sets it)",
    )
    parser.add_argument(
        "--real", action="store_true", help="read n,l,m states as real combinations"
    )
    parser.add_argument(
        "--fraction",
        type=_finite("fraction"),
        default=DEFAULTS.fraction,
        help=f"probability the surface encloses, in (0, 1) (default {DEFAULTS.fraction})",
    )
    parser.add_argument(
        "--potential",
        metavar="P",
        help="solve the radial part numerically in: coulomb, yukawa:LENGTH (bohr), "
        "harmonic:OMEGA (hartree), or table:FILE (columns r/bohr, V/hartree)",
    )
    mass = parser.add_mutually_exclusive_group()
    mass.add_argument(
        "--reduced-mass",
        action="store_true",
        help="correct for a finite nuclear mass: the proton's (CODATA) for Z = 1",
    )
    mass.add_argument(
        "--nuclear-mass",
        type=_finite("nuclear mass"),
        metavar="U",
        help="correct for a nucleus of this mass in daltons (u)",
    )


def _orbital(args: argparse.Namespace):
    from orbviz.states.orbital import Orbital, proton_mass_ratio

    ratio = 1.0
    if args.nuclear_mass is not None:
        if args.nuclear_mass <= 0:
            raise ParameterError(f"--nuclear-mass must be > 0 u, got {args.nuclear_mass}")
        from scipy.constants import physical_constants

        electron_u = physical_constants["electron mass in u"][0]
        ratio = 1.0 / (1.0 + electron_u / args.nuclear_mass)
    elif args.reduced_mass:
        if args.Z not in (None, 1.0):
            raise ParameterError(
                f"--reduced-mass uses the proton mass, so it needs Z = 1 (got Z={args.Z:g}); "
                "give --nuclear-mass U for another nucleus"
            )
        ratio = proton_mass_ratio()
    potential = None
    if getattr(args, "potential", None):
        from orbviz.states.potentials import parse_potential

        potential = parse_potential(args.potential, Z=1.0 if args.Z is None else args.Z)
        return Orbital.from_spec(args.spec, real=args.real, mass_ratio=ratio, potential=potential)
    return Orbital.from_spec(args.spec, Z=args.Z, real=args.real, mass_ratio=ratio)


def _set_orbitals(args: argparse.Namespace):
    """Return the members of a hybrid set named without an index (``2sp3``), or None."""
    from argparse import Namespace

    from orbviz.states.hybrids import hybrid_set

    members = hybrid_set(args.spec)
    if members is None:
        return None
    return [_orbital(Namespace(**{**vars(args), "spec": member})) for member in members]


def _cmd_info(args: argparse.Namespace) -> int:
    from orbviz.levels.summary import format_summary, summarise

    info = summarise(_orbital(args), fraction=args.fraction)
    if args.json:
        print(json.dumps(info, indent=2))
    else:
        print(format_summary(info))
    return 0


def _positive_int(kind: str) -> Callable[[str], int]:
    def parse(text: str) -> int:
        try:
            value = int(text)
        except ValueError:
            raise argparse.ArgumentTypeError(
                f"{kind} must be a whole number, got {text!r}"
            ) from None
        if value <= 0:
            raise argparse.ArgumentTypeError(f"{kind} must be > 0, got {value}")
        return value

    return parse


def _write_json(path: str, data: dict) -> None:
    from pathlib import Path

    from orbviz.export import atomic_paths

    with atomic_paths(Path(path)) as (temp,):
        temp.write_text(json.dumps(data, indent=2) + "\n")


def _cmd_mesh(args: argparse.Namespace) -> int:
    from orbviz.export import check_output, unit_scale, write_bodies
    from orbviz.surface.colors import DEFAULT_PAIR, parse_colors

    out = check_output(args.output)
    if args.report:
        check_output(args.report, suffixes={".json": None})
    unit_scale(args.units)
    colors = parse_colors(args.colors) if args.colors else DEFAULT_PAIR
    orbital = _orbital(args)
    from orbviz.surface.mesh import build_mesh

    result = build_mesh(
        orbital,
        fraction=args.fraction,
        grid=args.grid,
        smoothing=args.smooth,
        faces=args.faces,
        colors=colors,
    )
    written = write_bodies(result.bodies, out, units=args.units)
    if args.report:  # the full report adds the level's check and the outside of the window
        report = result.report()
        report["files"] = [str(p) for p in written]
        report["units"] = args.units
        _write_json(args.report, report)
        bodies = report["bodies"]
    else:
        bodies = result.body_facts()
    pieces = ", ".join(
        f"{b['name']} ({b['pieces']} piece{'s' * (b['pieces'] != 1)})" for b in bodies
    )
    watertight = all(b["watertight"] for b in bodies)
    print(
        f"wrote {', '.join(str(p) for p in written)}: {sum(b['faces'] for b in bodies)} faces, "
        f"{pieces}; isovalue {result.isovalue.level:.4e} bohr^-3 encloses "
        f"{100 * args.fraction:g}%; watertight: {'yes' if watertight else 'NO'}"
    )
    _print_notes(result.notes)
    return 0


def _print_notes(notes: list[str]) -> None:
    for note in notes:
        print(f"orbviz: note: {note}", file=sys.stderr)


def _size(text: str) -> tuple[int, int]:
    try:
        w, h = (int(v) for v in text.lower().split("x"))
    except ValueError:
        raise argparse.ArgumentTypeError(
            f"size must be WIDTHxHEIGHT like 1600x1200, got {text!r}"
        ) from None
    return w, h


def _cmd_render(args: argparse.Namespace) -> int:
    from orbviz.export import check_output
    from orbviz.surface.colors import DEFAULT_PAIR, parse_colors

    out = check_output(args.output, suffixes={".png": None})
    from orbviz.figures.render import FigureOptions, parse_view

    options = FigureOptions(
        size=args.size,
        scale=args.scale,
        view=parse_view(args.view),
        transparent=args.transparent,
        background=args.background,
        axes=not args.no_axes,
        scale_bar=None if args.scale_bar == "none" else args.scale_bar,
        title=args.title,
        lighting=args.lighting,
        nodes=args.nodes,
        cut=args.cut,
        outer=args.outer,
        extent=args.extent,
        colors=parse_colors(args.colors) if args.colors else DEFAULT_PAIR,
    ).checked()
    orbitals = _set_orbitals(args)
    if orbitals:  # a whole hybrid set in one figure
        from orbviz.figures.render import render_png, set_figure

        fig = set_figure(orbitals, fraction=args.fraction, grid=args.grid, options=options)
        render_png(fig, out)
        print(f"wrote {out}: the {len(orbitals)} {args.spec} hybrids in one figure")
        return 0
    orbital = _orbital(args)
    from orbviz.figures.render import figure, render_png

    fig = figure(orbital, fraction=args.fraction, grid=args.grid, options=options)
    _print_notes(fig.mesh.notes)
    render_png(fig, out)
    w, h = (round(v * options.scale) for v in options.size)
    print(f"wrote {out} ({w}x{h}): {orbital.label}, {100 * args.fraction:g}% isovalue")
    return 0


def _cmd_plot(args: argparse.Namespace) -> int:
    from orbviz.export import check_output

    out = check_output(args.output, suffixes={".png": None, ".svg": None, ".pdf": None})
    orbital = _orbital(args)
    from orbviz.figures.plot import radial_figure, save_figure, slice_figure

    if args.kind == "slice":
        fig, _ = slice_figure(
            orbital, plane=args.plane, fraction=args.fraction, extent=args.extent, title=args.title
        )
    else:
        fig, _ = radial_figure(orbital, title=args.title)
    save_figure(fig, out)
    print(f"wrote {out}: {args.kind} plot of {orbital.label}")
    return 0


def _cmd_model(args: argparse.Namespace) -> int:
    from pathlib import Path

    from orbviz.export import check_output
    from orbviz.surface.colors import DEFAULT_PAIR, parse_colors

    out = check_output(args.output, suffixes={".stl": None, ".3mf": None})
    if args.split and out.suffix.lower() != ".stl":
        raise ParameterError("--split writes one STL per part: give an .stl output")
    if args.report:
        check_output(args.report, suffixes={".json": None})
    colors = parse_colors(args.colors) if args.colors else DEFAULT_PAIR
    orbital = _set_orbitals(args) or _orbital(args)  # a hybrid set (2sp3) makes one model
    from orbviz.models.model import build_model

    model = build_model(
        orbital,
        size=args.size,
        rod=args.rod,
        min_feature=args.min_feature,
        stand=args.stand,
        cut=args.cut,
        fraction=args.fraction,
        grid=args.grid,
        colors=colors,
    )
    for check in model.checks:
        print(f"{check.level}: {check.message}")
    from orbviz.export import atomic_paths
    from orbviz.export.stl import write as write_stl
    from orbviz.export.threemf import write as write_3mf

    if out.suffix.lower() == ".3mf":
        written = write_3mf(model.bodies("parts"), out, scale=1.0, units="mm")
    elif args.split:
        bodies = model.bodies("parts")
        targets = [out.with_name(f"{out.stem}-{b.name}.stl") for b in bodies]
        from trimesh.exchange.stl import export_stl

        from orbviz.export._scene import combined_mesh

        with atomic_paths(*targets) as temps:
            for body, temp in zip(bodies, temps, strict=True):
                temp.write_bytes(export_stl(combined_mesh([body], 1.0)))
        written = targets
    else:
        written = write_stl(model.bodies("solid"), out, scale=1.0, units="mm")
    facts = model.facts()
    report = {
        "spec": args.spec,
        "size_mm": args.size,
        "rod_mm": model.rod_mm,
        "mm_per_bohr": model.mm_per_bohr,
        "volume_mm3": facts.volume,
        "watertight": facts.watertight,
        "solids": facts.solids,
        "cavities": facts.cavities,
        "parts": sorted(model.parts),
        "checks": [vars(c) for c in model.checks],
        "files": [str(p) for p in written],
    }
    if args.report:
        _write_json(args.report, report)
    print(
        f"wrote {', '.join(str(Path(p)) for p in written)}: {args.size:g} mm, one body of "
        f"{facts.volume / 1000:.3g} cm^3, rod {model.rod_mm:.2g} mm, parts "
        f"{', '.join(sorted(model.parts))}"
    )
    return 0


def _run_batch(items, out: str, args: argparse.Namespace, title: str) -> int:
    from orbviz.scenes.batch import run_scene

    manifest = run_scene(
        items, out, jobs=args.jobs, force=args.force, progress=not args.no_progress, title=title
    )
    states = [e["status"] for e in manifest["items"]]
    failed = [e for e in manifest["items"] if e["status"] == "failed"]
    for entry in failed:
        print(f"failed: {entry['name']}: {entry['error']}", file=sys.stderr)
    print(
        f"{states.count('done')} done, {states.count('skipped')} skipped, {len(failed)} failed;"
        f" see {out}/index.html and {out}/manifest.json"
    )
    return 1 if failed else 0


def _batch_folder(path: str) -> str:
    from pathlib import Path

    folder = Path(path)
    if folder.exists() and not folder.is_dir():
        raise ParameterError(f"output {path!r} exists and is not a folder")
    parent = folder.resolve().parent
    if not parent.is_dir():
        raise ParameterError(f"cannot create {path!r}: folder {str(parent)!r} does not exist")
    if not os.access(parent if not folder.exists() else folder, os.W_OK):
        raise ParameterError(f"cannot write into {path!r}: not writable")
    return path


def _cmd_batch(args: argparse.Namespace) -> int:
    import tomllib
    from pathlib import Path

    from orbviz.scenes.scene import load_scene

    out = _batch_folder(args.output)
    items = load_scene(args.scene)
    title = tomllib.loads(Path(args.scene).read_text()).get("title", Path(args.scene).stem)
    return _run_batch(items, out, args, str(title))


def _cmd_demo(args: argparse.Namespace) -> int:
    import tomllib
    from importlib.resources import files

    from orbviz.scenes.scene import parse_scene

    out = _batch_folder(args.output)
    text = files("orbviz").joinpath("data/demo.toml").read_text()
    items = parse_scene(text, source="demo.toml")
    print(f"orbviz demo: {len(items)} items into {out}/ (figures, meshes and a printable model)")
    return _run_batch(items, out, args, tomllib.loads(text)["title"])


def _subcommand(sub, name: str, summary: str, description: str, *, spec: bool = True) -> _Parser:
    """Add a sub-command; those that take an orbital show the spec grammar in their help."""
    return sub.add_parser(
        name,
        help=summary,
        description=description,
        epilog=SPEC_HELP if spec else None,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )


def _add_colors(parser: argparse.ArgumentParser) -> None:
    parser.add_argument(
        "--colors",
        metavar="POS,NEG",
        help="phase colours as hex, e.g. '#0072B2,#D55E00' (the default)",
    )


def _cmd_animate(args: argparse.Namespace) -> int:
    from pathlib import Path

    out = Path(args.output)
    if out.suffix.lower() not in ("", ".gif", ".glb", ".mp4"):
        from orbviz.errors import OutputError

        raise OutputError(
            f"cannot write {args.output!r}: animations go to .gif, .mp4, .glb or a folder"
        )
    parent = out.parent if out.suffix else out.resolve().parent
    if not parent.is_dir():
        raise ParameterError(f"cannot write {args.output!r}: folder {str(parent)!r} does not exist")
    from orbviz.figures.render import FigureOptions

    orbital = _orbital(args)
    from orbviz.figures.animate import animate, write_animation

    movie = animate(
        orbital,
        frames=args.frames,
        periods=args.periods,
        fraction=args.fraction,
        grid=args.grid,
        options=FigureOptions(size=args.size),
    )
    written = write_animation(movie, out)
    where = written[0] if out.suffix else out
    print(
        f"wrote {where}: {len(movie.images)} frames over {args.periods:g} period(s) of "
        f"T = {movie.beat.femtoseconds:.4g} fs; level {movie.level:.4e} bohr^-3 throughout"
    )
    return 0


def _build_parser() -> _Parser:
    parser = _Parser(
        prog="orbviz",
        description="Hydrogen-like orbitals as isosurfaces that enclose a stated probability.",
        epilog=SPEC_HELP,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    parser.add_argument("--version", action="version", version=f"orbviz {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    info = _subcommand(
        sub,
        "info",
        "energy, nodes, radii and the enclosing isovalue of an orbital",
        "Energy, nodes, radii and the isovalue enclosing --fraction of the "
        "probability. Atomic units: bohr, hartree (eV from CODATA).",
    )
    _add_orbital_options(info)
    info.add_argument("--json", action="store_true", help="print one JSON object")
    info.set_defaults(run=_cmd_info)
    mesh = _subcommand(
        sub,
        "mesh",
        "closed phase-coloured isosurface meshes (STL, OBJ, glTF/GLB, PLY, 3MF)",
        "Closed isosurface bodies enclosing --fraction of the probability, one per "
        "phase, written in the format the output suffix names. Coordinates in bohr unless "
        "--units says otherwise; nucleus at the origin, z the quantisation axis.",
    )
    _add_orbital_options(mesh)
    mesh.add_argument(
        "-o",
        "--output",
        required=True,
        metavar="FILE",
        help="output: .stl .obj .glb .gltf .ply .3mf",
    )
    mesh.add_argument(
        "--grid",
        type=_positive_int("grid"),
        default=DEFAULTS.grid,
        help=f"samples per axis (default {DEFAULTS.grid})",
    )
    mesh.add_argument(
        "--faces", type=_positive_int("faces"), metavar="N", help="decimate to about N faces in all"
    )
    mesh.add_argument(
        "--smooth",
        type=int,
        nargs="?",
        const=10,
        default=0,
        metavar="ITER",
        help="Taubin smoothing (10 iterations if no number is given)",
    )
    mesh.add_argument(
        "--units",
        default="bohr",
        choices=["bohr", "angstrom", "nm", "pm"],
        help="length unit of the coordinates (default bohr)",
    )
    _add_colors(mesh)
    mesh.add_argument("--report", metavar="FILE.json", help="write mesh statistics as JSON")
    mesh.set_defaults(run=_cmd_mesh)

    render = _subcommand(
        sub,
        "render",
        "a publication figure of the isosurface, rendered off-screen to PNG",
        "An orthographic, phase-coloured figure of the isosurface enclosing "
        "--fraction, rendered without a display. Complex states get a phase wheel.",
    )
    _add_orbital_options(render)
    render.add_argument("-o", "--output", required=True, metavar="FILE.png")
    render.add_argument("--grid", type=_positive_int("grid"), default=DEFAULTS.grid)
    render.add_argument(
        "--size",
        type=_size,
        default=(1600, 1200),
        metavar="WxH",
        help="image size in pixels (default 1600x1200)",
    )
    render.add_argument(
        "--scale",
        type=_finite("scale"),
        default=1.0,
        help="resolution multiplier, e.g. 2 for print (default 1)",
    )
    render.add_argument("--view", default="iso", help="iso, x, y, z or AZ,EL in degrees")
    render.add_argument("--transparent", action="store_true", help="transparent background")
    render.add_argument("--background", default="white", help="background colour")
    render.add_argument("--no-axes", action="store_true", help="leave out the axes triad")
    render.add_argument("--scale-bar", default="angstrom", choices=["angstrom", "bohr", "none"])
    render.add_argument("--title", help="a label at the top left")
    render.add_argument("--lighting", default="soft", choices=["soft", "studio", "flat"])
    render.add_argument(
        "--nodes",
        action="store_true",
        help="draw the radial and angular nodal surfaces translucent",
    )
    render.add_argument(
        "--cut", choices=["half", "quarter"], help="cut away x > 0 (half) or x > 0, y > 0 (quarter)"
    )
    render.add_argument(
        "--outer",
        type=_finite("outer"),
        metavar="F",
        help="add a translucent surface enclosing this larger fraction",
    )
    render.add_argument(
        "--extent",
        type=_finite("extent"),
        metavar="L",
        help="fix the box and the view to half-width L bohr (comparable sets)",
    )
    _add_colors(render)
    render.set_defaults(run=_cmd_render)

    plot = _subcommand(
        sub,
        "plot",
        "2D companions: a density slice or the radial distribution (PNG, SVG, PDF)",
        "A density slice through the nucleus with the isovalue and nodes, or the "
        "radial distribution with nodes, <r> and the most probable radius.",
    )
    _add_orbital_options(plot)
    plot.add_argument("--kind", required=True, choices=["slice", "radial"])
    plot.add_argument("-o", "--output", required=True, metavar="FILE")
    plot.add_argument("--plane", default="xz", choices=["xz", "xy", "yz"])
    plot.add_argument(
        "--extent", type=_finite("extent"), metavar="L", help="half-width of the slice in bohr"
    )
    plot.add_argument("--title")
    plot.set_defaults(run=_cmd_plot)

    model = _subcommand(
        sub,
        "model",
        "a printable one-piece model in millimetres (STL, or 3MF with colour parts)",
        "The isosurface as one watertight solid, its longest side --size mm, phases "
        "joined by a rod along z with a nucleus bead (and spokes to off-axis lobes). A .3mf "
        "(or --split) carries each phase and the support as separate colour parts. "
        "Printability is checked before writing. Read docs/printing.md for the safety notes.",
    )
    _add_orbital_options(model)
    model.add_argument("-o", "--output", required=True, metavar="FILE", help=".stl or .3mf")
    model.add_argument(
        "--size",
        type=_finite("size"),
        required=True,
        metavar="MM",
        help="longest side of the model in millimetres",
    )
    model.add_argument(
        "--rod",
        type=_finite("rod"),
        metavar="MM",
        help="rod and spoke diameter (default 4%% of --size)",
    )
    model.add_argument(
        "--min-feature",
        type=_finite("min-feature"),
        default=1.2,
        metavar="MM",
        help="thinnest printable feature (default 1.2 mm, common FDM practice)",
    )
    model.add_argument("--stand", action="store_true", help="add a round base plate")
    model.add_argument(
        "--cut", choices=["half", "quarter"], help="cut away x > 0 (half) or x > 0, y > 0 (quarter)"
    )
    model.add_argument("--split", action="store_true", help="one STL per colour part")
    model.add_argument("--grid", type=_positive_int("grid"), default=DEFAULTS.grid)
    _add_colors(model)
    model.add_argument("--report", metavar="FILE.json", help="write the model facts as JSON")
    model.set_defaults(run=_cmd_model)

    animate = _subcommand(
        sub,
        "animate",
        "a superposition in motion: frames of psi(t), one level, the period in fs",
        "Plays psi(t) = sum c_k psi_k exp(-i E_k t) over its beat period T = 2 pi / dE, at one "
        "fixed isovalue for every frame, coloured by phase; writes an animated GIF or a folder "
        "of PNG frames. A superposition of degenerate states does not move and is refused.",
    )
    _add_orbital_options(animate)
    animate.add_argument("-o", "--output", required=True, metavar="FILE.gif|FILE.mp4|FILE.glb|DIR")
    animate.add_argument("--frames", type=_positive_int("frames"), default=24)
    animate.add_argument("--periods", type=_finite("periods"), default=1.0)
    animate.add_argument("--grid", type=_positive_int("grid"), default=96)
    animate.add_argument("--size", type=_size, default=(800, 600), metavar="WxH")
    animate.set_defaults(run=_cmd_animate)

    batch = sub.add_parser(
        "batch",
        help="run a scene file: figures, meshes and models of many orbitals in parallel",
        description="Runs every item of a TOML scene file (see docs/scenes.md) in parallel "
        "worker processes, keeps DIR/manifest.json up to date, skips unchanged items on a "
        "rerun, and writes a contact sheet DIR/index.html. Exit status 1 if any item failed.",
    )
    batch.add_argument("scene", help="scene file (.toml)")
    batch.add_argument("-o", "--output", required=True, metavar="DIR", help="output folder")
    batch.add_argument(
        "--jobs", type=_positive_int("jobs"), help="worker processes (default: one per core)"
    )
    batch.add_argument("--force", action="store_true", help="redo unchanged items too")
    batch.add_argument("--no-progress", action="store_true", help="no progress bar")
    batch.set_defaults(run=_cmd_batch)

    demo = sub.add_parser(
        "demo",
        help="make a demo set: the orbitals of n = 1-3, a complex state, a mixture, a model",
        description="Runs the scene embedded in orbviz (orbviz/data/demo.toml) into DIR.",
    )
    demo.add_argument(
        "-o",
        "--output",
        default="orbviz-demo",
        metavar="DIR",
        help="output folder (default ./orbviz-demo)",
    )
    demo.add_argument("--jobs", type=_positive_int("jobs"))
    demo.add_argument("--force", action="store_true")
    demo.add_argument("--no-progress", action="store_true")
    demo.set_defaults(run=_cmd_demo)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; return the exit status (0 ok, 2 bad input, 1 internal error)."""
    parser = _build_parser()
    try:
        args = parser.parse_args(argv)
        if not getattr(args, "command", None):
            parser.print_help()
            return 2
        return args.run(args)
    except SystemExit as stop:  # --help and --version
        return int(stop.code or 0)
    except OrbvizError as error:
        print(f"orbviz: error: {error}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print("orbviz: interrupted", file=sys.stderr)
        return 130
    except Exception as error:  # a bug, not bad input: one line, unless debugging
        if os.environ.get("ORBVIZ_DEBUG"):
            raise
        print(
            f"orbviz: internal error: {type(error).__name__}: {error} "
            "(set ORBVIZ_DEBUG=1 for the traceback)",
            file=sys.stderr,
        )
        return 1
