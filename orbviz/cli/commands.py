"""One function per command. Each checks every output it will write before any work."""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path
from typing import Any

from orbviz.cli.arguments import options_from
from orbviz.states.make import make_state, make_states
from orbviz.states.physics import Physics

__all__ = ["COMMANDS"]


def note(text: str, level: str = "note") -> None:
    """Print a remark for the user, on stderr with the orbviz prefix."""
    print(f"orbviz: {level}: {text}", file=sys.stderr)


def _physics(args: argparse.Namespace) -> Physics:
    return options_from(args, Physics)


def _keep(args: argparse.Namespace, targets: list[Path], *, folders: bool = False) -> None:
    """With --no-clobber, refuse before any work if a file to be written exists."""
    from orbviz.export import check_targets

    if getattr(args, "no_clobber", False):
        check_targets(targets, folders=folders, clobber=False)


def _report_target(path: str | None) -> Path | None:
    if path is None:
        return None
    from orbviz.export import check_output

    (target,) = check_output(path, [".json"])
    return target


def _json(data: dict[str, Any]) -> bytes:
    return (json.dumps(data, indent=2) + "\n").encode()


def _states(specs: list[str], physics: Physics) -> tuple[list[Any], bool]:
    """Return the states several specs name (sets expanded), and whether any was a set."""
    from orbviz.states.make import set_members

    states, oriented = [], False
    for text in specs:
        oriented = oriented or set_members(text) is not None
        states += make_states(text, physics)
    return states, oriented


def info(args: argparse.Namespace) -> int:
    """Print energy, nodes, radii and the enclosing isovalue (a row per member of a set)."""
    from orbviz.levels.report import ReportOptions, format_summary, format_table, summarise

    physics, units = _physics(args), options_from(args, ReportOptions).units
    states, oriented = _states(args.spec, physics)
    summaries = [summarise(s, fraction=physics.fraction) for s in states]
    if args.json:
        print(
            json.dumps(summaries[0] if len(states) == 1 and not oriented else summaries, indent=2)
        )
    elif len(states) == 1:
        print(format_summary(summaries[0], units))
    else:
        print(format_table(summaries, units))
    return 0


def mesh(args: argparse.Namespace) -> int:
    """Write closed phase-coloured isosurface bodies, in the format the suffix names."""
    from orbviz.export import (
        check_display,
        check_output,
        display_scale,
        encode_bodies,
        unit_scale,
        write_files,
    )
    from orbviz.surface.mesh import build_mesh
    from orbviz.surface.options import MeshOptions

    physics, options = _physics(args), options_from(args, MeshOptions)
    targets = check_output(args.output)
    check_display(targets[0], options.display_size)
    report_path = _report_target(args.report)
    _keep(args, targets + ([report_path] if report_path else []))
    target = targets[0]
    state = make_state(args.spec, physics)
    result = build_mesh(state, options, fraction=physics.fraction)
    scale, units = unit_scale(options.units), options.units
    if options.display_size is not None:  # the longest side at this size, in metres
        scale = display_scale([b.vertices for b in result.bodies], options.display_size)
        units = "m"
    files = encode_bodies(result.bodies, target, scale=scale, units=units)
    if report_path is not None:  # the full report adds the level's check and the box's outside
        report = {**result.report(), "files": [str(p) for p in files], "units": units}
        bodies = report["bodies"]
        files[report_path] = _json(report)
    else:
        bodies = result.body_facts()
    written = write_files(files)
    pieces = ", ".join(
        f"{b['name']} ({b['pieces']} piece{'s' * (b['pieces'] != 1)})" for b in bodies
    )
    watertight = all(b["watertight"] for b in bodies)
    print(
        f"wrote {', '.join(str(p) for p in written)}: {sum(b['faces'] for b in bodies)} faces, "
        f"{pieces}; isovalue {result.isovalue.level:.4e} bohr^-3 encloses "
        f"{100 * physics.fraction:g}%; watertight: {'yes' if watertight else 'NO'}"
    )
    for text in result.notes:
        note(text)
    return 0


def render(args: argparse.Namespace) -> int:
    """Render a figure of one orbital, or a sheet of several (sets expanded), off-screen."""
    from orbviz.export import check_output, write_files
    from orbviz.figures.figure import figure, sheet
    from orbviz.figures.options import FigureOptions
    from orbviz.figures.page import PAGE_SUFFIXES

    physics, options = _physics(args), options_from(args, FigureOptions)
    (target,) = check_output(args.output, [*PAGE_SUFFIXES, ".html"])
    _keep(args, [target])
    states, oriented = _states(args.spec, physics)
    if target.suffix.lower() == ".html":
        return _page(args, states, options, physics, target, oriented)
    _page_options_unused(args)
    if len(states) == 1 and not oriented:
        made = figure(states[0], options, fraction=physics.fraction)
    else:
        made = sheet(states, options, fraction=physics.fraction, oriented=oriented)
    with made as fig:
        write_files({target: fig.encode(target.suffix)})
        notes = [n for p in fig.panels for n in p.mesh.notes]
        w, h = fig.page_size
        alt = fig.alt_text if args.alt_text else None
    what = states[0].label if len(states) == 1 else f"{len(states)} orbitals"
    what += " in one panel" if options.overlay and len(states) > 1 else ""
    print(f"wrote {target} ({w}x{h}): {what}, {100 * physics.fraction:g}% isovalue")
    if alt is not None:
        print(alt)
    for text in dict.fromkeys(notes):
        note(text)
    return 0


def _page_options_unused(args: argparse.Namespace) -> None:
    """Note page options given for a still image, which does not use them."""
    given = [k.split(".", 1)[1] for k in vars(args) if k.startswith("PageOptions.")]
    if given:
        flags = ", ".join(f"--{'page-faces' if g == 'faces' else g}" for g in given)
        verb = "applies" if len(given) == 1 else "apply"
        note(f"{flags} {verb} to .html pages; this image does not use them")


def _page(
    args: argparse.Namespace,
    states: list[Any],
    options: Any,
    physics: Physics,
    target: Path,
    oriented: bool,
) -> int:
    """Write an interactive page of the states: one offline HTML file."""
    from orbviz.export import write_files
    from orbviz.pages.build import ignored_options, page_data, page_html
    from orbviz.pages.options import PageOptions

    page = options_from(args, PageOptions)
    unused = ignored_options(options)
    data = page_data(states, options, page, fraction=physics.fraction, oriented=oriented)
    body = page_html(data)
    write_files({target: body})
    levels = ", ".join(f"{100 * f:g}%" for f in data["levels"])
    what = states[0].label if len(states) == 1 else f"{len(states)} orbitals"
    print(f"wrote {target} ({len(body) / 1e6:.2f} MB): {what}, levels {levels}")
    if args.alt_text:
        print(" ".join(p["alt"] for p in data["panels"]))
    for text in dict.fromkeys(n for p in data["panels"] for n in p["notes"]):
        note(text)
    if unused:
        flags = ", ".join("--" + name.replace("_", "-") for name in unused)
        verb = "applies" if len(unused) == 1 else "apply"
        note(f"{flags} {verb} to still figures; a page does not use them")
    return 0


def sample(args: argparse.Namespace) -> int:
    """Write exact samples of |psi|^2 as a point cloud, in bohr or at a physical size."""
    from orbviz.export import check_output, write_files
    from orbviz.export.points import POINT_SUFFIXES, encode_points
    from orbviz.levels.sampling import sample as draw
    from orbviz.models.engraving import SampleOptions, prepare

    physics, options = _physics(args), options_from(args, SampleOptions)
    (target,) = check_output(args.output, list(POINT_SUFFIXES))
    _keep(args, [target])
    state = make_state(args.spec, physics)
    drawn = draw(state, options.points, seed=options.seed)
    points, units, notes = prepare(drawn, state, options)
    write_files(encode_points(points, target, units))
    low, high = points.positions.min(axis=0), points.positions.max(axis=0)
    box = " x ".join(f"{v:.3g}" for v in high - low)
    print(
        f"wrote {target}: {len(points):,} points of {state.label} ({box} {units}); "
        f"{100 * drawn.acceptance:.3g}% of candidates kept"
    )
    for text in [*state.notes, *notes]:
        note(text)
    return 0


def plot(args: argparse.Namespace) -> int:
    """Plot slices or radial distributions of one or several orbitals."""
    from orbviz.export import check_output
    from orbviz.figures.options import PlotOptions
    from orbviz.figures.page import PAGE_SUFFIXES
    from orbviz.figures.plots import describe_plot, save_figure
    from orbviz.figures.plots import plot as make_plot
    from orbviz.states.make import set_members

    physics, options = _physics(args), options_from(args, PlotOptions)
    (target,) = check_output(args.output, list(PAGE_SUFFIXES))
    _keep(args, [target])
    labels = None
    if options.kind == "radial":  # a subshell's members share one radial distribution
        firsts = {(set_members(s) or [s])[0]: s.strip() for s in args.spec}
        states, labels = [make_state(s, physics) for s in firsts], list(firsts.values())
    else:
        states, _ = _states(args.spec, physics)
    one = states if len(states) > 1 else states[0]
    fig, data = make_plot(one, options, fraction=physics.fraction, labels=labels)
    alt = describe_plot(data, options.units)
    save_figure(fig, target, alt_text=alt, title=options.title or "")
    names = labels or [s.label for s in states]
    print(f"wrote {target}: {options.kind} plot of {', '.join(names)}")
    if args.alt_text:
        print(alt)
    return 0


def _write_kit(built: Any, options: Any, states: list, target: Path) -> int:
    """Split a built model into a kit and write its folder or .zip."""
    from orbviz.models.kit import build_kit
    from orbviz.models.kit_files import kit_files, write_kit

    prefix = states[0].label.split("[")[0] if len(states) > 1 else states[0].label
    kit = build_kit(built, options, prefix)
    for text in kit.notes:
        note(text, "note")
    write_kit(kit_files(kit, options.bed_mm), target)
    colours = sorted({p.color for p in kit.parts})
    print(
        f"wrote {target}: a kit of {len(kit.parts)} parts ({', '.join(colours)}), "
        f"{sum(j.kind == 'pin' for j in kit.joints)} pins, clearance {kit.clearance:g} mm; "
        "assembly.pdf shows how they go together"
    )
    return 0


def model(args: argparse.Namespace) -> int:
    """Write a printable model in millimetres (STL, split STLs, or 3MF with colour parts)."""
    from orbviz.errors import OptionError
    from orbviz.export import write_files
    from orbviz.models.build import build_model, model_targets
    from orbviz.models.options import ModelOptions

    physics, options = _physics(args), options_from(args, ModelOptions)
    plain = ModelOptions()
    for flag, name in (
        ("--magnets", "magnets"),
        ("--clearance", "clearance_mm"),
        ("--bed", "bed_mm"),
    ):
        if getattr(options, name) != getattr(plain, name) and not options.kit:
            raise OptionError(flag, "it shapes a kit's parts: add --kit")
    targets = model_targets(args.output, options)
    report_path = _report_target(args.report)
    _keep(args, targets + ([report_path] if report_path else []))
    states = make_states(args.spec, physics)  # a hybrid set (2sp3) makes one model
    built = build_model(
        states if len(states) > 1 else states[0], options, fraction=physics.fraction
    )
    for check in built.checks:
        note(check.message, check.level)
    if options.kit:
        return _write_kit(built, options, states, targets[0])
    files = built.files(args.output)
    facts = built.facts()
    if report_path is not None:
        files[report_path] = _json(
            {
                "spec": args.spec,
                "size_mm": options.size_mm,
                "rod_mm": built.rod_mm,
                "mm_per_bohr": built.mm_per_bohr,
                "volume_mm3": facts.volume,
                "watertight": facts.watertight,
                "solids": facts.solids,
                "cavities": facts.cavities,
                "parts": sorted(built.parts),
                "checks": [vars(c) for c in built.checks],
                "files": [str(p) for p in files],
            }
        )
    written = write_files(files)
    print(
        f"wrote {', '.join(str(p) for p in written)}: {options.size_mm:g} mm, one body of "
        f"{facts.volume / 1000:.3g} cm^3, rod {built.rod_mm:.2g} mm, parts "
        f"{', '.join(sorted(built.parts))}"
    )
    return 0


def animate(args: argparse.Namespace) -> int:
    """Write a superposition in motion, to GIF, MP4, an animated GLB or a folder of frames."""
    from orbviz.figures.animation import animate as make_animation
    from orbviz.figures.animation_files import check_animation_output, write_animation
    from orbviz.figures.options import AnimationOptions

    physics, options = _physics(args), options_from(args, AnimationOptions)
    target = check_animation_output(args.output)
    _keep(args, [target], folders=not target.suffix)
    state = make_state(args.spec, physics)
    movie = make_animation(
        state, options, fraction=physics.fraction, keep_bodies=target.suffix.lower() == ".glb"
    )
    write_animation(movie, target)
    print(
        f"wrote {target}: {len(movie.images)} frames over {options.periods:g} period(s) of "
        f"T = {movie.beat.femtoseconds:.4g} fs; level {movie.level:.4e} bohr^-3 throughout"
    )
    return 0


def _check_jobs(args: argparse.Namespace) -> None:
    """Refuse, before any work, a worker count outside 1 to LIMITS.jobs_max."""
    from orbviz._defaults import LIMITS
    from orbviz.errors import OptionError

    if args.jobs is not None and not 1 <= args.jobs <= LIMITS.jobs_max:
        raise OptionError(
            "--jobs", f"expected a whole number from 1 to {LIMITS.jobs_max}, got {args.jobs}"
        )


def _run_batch(scene: Any, out: str, args: argparse.Namespace) -> int:
    from orbviz.scenes.runner import run_scene

    manifest = run_scene(
        scene.items,
        out,
        jobs=args.jobs,
        force=args.force,
        progress=not args.no_progress,
        title=scene.title,
        note=note,
    )
    states = [e["status"] for e in manifest["items"]]
    failed = [e for e in manifest["items"] if e["status"] == "failed"]
    for entry in failed:
        print(f"orbviz: failed: {entry['name']}: {entry['error']}", file=sys.stderr)
    print(
        f"{states.count('done')} done, {states.count('skipped')} skipped, {len(failed)} failed;"
        f" see {Path(out) / 'index.html'} and {Path(out) / 'manifest.json'}"
    )
    return 1 if failed else 0


def _folder(path: str) -> str:
    from orbviz.export import check_targets

    check_targets([Path(path)], folders=True)
    return path


def batch(args: argparse.Namespace) -> int:
    """Every item of a scene file, in parallel, resumable, with a contact sheet."""
    from orbviz.scenes.load import load_scene

    _check_jobs(args)
    out = _folder(args.output)
    return _run_batch(load_scene(args.scene, tables_anywhere=args.tables_anywhere), out, args)


def demo(args: argparse.Namespace) -> int:
    """Make the demo set shipped inside orbviz."""
    from importlib.resources import files

    from orbviz.scenes.load import parse_scene

    _check_jobs(args)
    out = _folder(args.output)
    text = files("orbviz").joinpath("data/demo.toml").read_text(encoding="utf-8")
    scene = parse_scene(text, "demo.toml")
    print(
        f"orbviz demo: {len(scene.items)} items into {out}/ (figures, meshes, pages and a "
        "printable model)"
    )
    return _run_batch(scene, out, args)


COMMANDS = {
    "info": info,
    "mesh": mesh,
    "render": render,
    "plot": plot,
    "model": model,
    "animate": animate,
    "sample": sample,
    "batch": batch,
    "demo": demo,
}
