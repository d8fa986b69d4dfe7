"""Frames of a moving superposition: one fixed level and box, phase colours, a captioned period."""

from __future__ import annotations

import math
import os
from dataclasses import dataclass, replace
from pathlib import Path

import numpy as np

from orbviz._defaults import DEFAULTS
from orbviz.errors import OutputError, ParameterError
from orbviz.levels.isovalue import Isovalue, enclosing_isovalue
from orbviz.states.dynamics import Beat, beat_period, evolve
from orbviz.states.orbital import Orbital

__all__ = ["Animation", "animate", "write_animation", "write_gltf_animation"]


@dataclass
class Animation:
    """The frames of an animation and what made them.

    Attributes
    ----------
    images : list of (H, W, 4) uint8 arrays
        The rendered frames.
    times : list of float
        Frame times in atomic units (midpoints of equal steps).
    beat : Beat
        The period of the density.
    level : float
        The one density level (bohr^-3) of every frame.
    meshes : list of OrbitalMesh
        The surfaces, one per frame.
    """

    images: list[np.ndarray]
    times: list[float]
    beat: Beat
    level: float
    meshes: list


def _fixed_level(orbital: Orbital, beat: Beat, fraction: float, samples: int = 4) -> Isovalue:
    """One level for the whole period: the geometric mean of the enclosing levels at a few times."""
    levels, reach = [], 0.0
    for k in range(samples):
        iso = enclosing_isovalue(
            evolve(orbital, (k + 0.5) * beat.period / samples), fraction=fraction
        )
        levels.append(iso.level)
        reach = max(reach, iso.max_radius)
    level = math.exp(sum(math.log(v) for v in levels) / samples)
    return Isovalue(level, fraction, float("nan"), reach, "period mean")


def animate(
    orbital: Orbital,
    /,
    *,
    frames: int = 24,
    periods: float = 1.0,
    fraction: float = DEFAULTS.fraction,
    grid: int = 96,
    options=None,
) -> Animation:
    """Render ``frames`` frames over ``periods`` beat periods of a superposition.

    Raises
    ------
    StationaryError
        For a superposition of degenerate states (it does not move).
    """
    from orbviz.figures.render import FigureOptions, _polys, figure
    from orbviz.levels.grid import box_half_width
    from orbviz.surface.mesh import build_mesh

    if not (isinstance(frames, int) and 2 <= frames <= 1000):
        raise ParameterError(f"--frames must be a whole number from 2 to 1000, got {frames!r}")
    if not (math.isfinite(periods) and 0 < periods <= 100):
        raise ParameterError(f"--periods must be in (0, 100], got {periods}")
    beat = beat_period(orbital)
    iso = _fixed_level(orbital, beat, fraction)
    width = box_half_width(orbital, iso, grid)
    opts = (options or FigureOptions()).checked()
    times = [(k + 0.5) * periods * beat.period / frames for k in range(frames)]
    fs = beat.femtoseconds / beat.period
    fig, images, meshes, names = None, [], [], []
    for t in times:
        state = evolve(orbital, t)
        mesh = build_mesh(
            state,
            fraction=fraction,
            grid=grid,
            colors=opts.colors,
            half_width=width,
            level=iso,
            window=False,  # the shared level's reach is sampled at four times, not this one
        )
        caption = f"{orbital.spec}   t = {t * fs:.3f} fs of T = {beat.femtoseconds:.3f} fs" + (
            "" if beat.exact else " (not exactly periodic)"
        )
        frame_opts = replace(opts, title=caption, extent=width)
        if fig is None:  # one plotter for all frames: the EGL context opens once
            fig = figure(state, fraction=fraction, grid=grid, options=frame_opts, mesh=mesh)
            names = list(_polys(mesh))
        else:
            for name in names:
                fig.plotter.remove_actor(name)
            names = []
            for name, poly in _polys(mesh).items():
                fig.plotter.add_mesh(
                    poly,
                    scalars="RGBA",
                    rgb=True,
                    smooth_shading=True,
                    specular=0.25,
                    specular_power=30,
                    ambient=0.18,
                    diffuse=0.85,
                    name=name,
                )
                names.append(name)
            fig.mesh, fig.options = mesh, frame_opts
        images.append(fig.image())
        meshes.append(mesh)
    fig.plotter.close()
    return Animation(images, times, beat, iso.level, meshes)


def write_animation(animation: Animation, path: str | os.PathLike, *, seconds: float = 3.0):
    """Write frames as an animated GIF (looping, one period in ``seconds``) or PNGs in a folder."""
    from PIL import Image

    from orbviz.export import atomic_paths

    path = Path(path)
    if path.suffix.lower() in (".glb", ".gltf"):
        return write_gltf_animation(animation, path, seconds=seconds)
    if path.suffix.lower() == ".mp4":
        return _write_mp4(animation, path, seconds=seconds)
    pictures = [Image.fromarray(img, "RGBA").convert("RGB") for img in animation.images]
    if path.suffix.lower() == ".gif":
        duration = max(20, int(1000 * seconds / len(pictures)))
        with atomic_paths(path) as (temp,):
            pictures[0].save(
                temp,
                format="GIF",
                save_all=True,
                append_images=pictures[1:],
                duration=duration,
                loop=0,
            )
        return [path]
    if path.suffix:
        raise OutputError(
            f"cannot write {str(path)!r}: animations go to .gif, .mp4, .glb or a folder"
        )
    path.mkdir(parents=True, exist_ok=True)
    targets = [path / f"frame_{k:03d}.png" for k in range(len(pictures))]
    with atomic_paths(*targets) as temps:
        for picture, temp in zip(pictures, temps, strict=True):
            picture.save(temp, format="PNG")
    return targets


def write_gltf_animation(
    animation: Animation, path: str | os.PathLike, *, seconds: float = 3.0
) -> list[Path]:
    """Write a GLB/glTF with one node per frame, shown in turn by a STEP scale animation.

    Every frame's bodies hang under a node ``frame-K``. One animation gives each such node a
    scale track that is 1 during its frame's interval and 0 otherwise, so web viewers play the
    frames in turn; the root node turns z up, as in :mod:`orbviz.export.gltf`.
    """
    import trimesh
    from trimesh.exchange.gltf import export_glb

    from orbviz.export import atomic_paths, check_output
    from orbviz.export._scene import body_mesh
    from orbviz.export.gltf import _postprocess

    path = check_output(path, suffixes={".glb": None, ".gltf": None})
    scene = trimesh.Scene()
    count = len(animation.meshes)
    for k, mesh in enumerate(animation.meshes):
        scene.graph.update(frame_from=scene.graph.base_frame, frame_to=f"frame-{k}")
        for body in mesh.bodies:
            scene.add_geometry(
                body_mesh(body, 1.0, material=True),
                geom_name=f"frame-{k}-{body.name}",
                node_name=f"frame-{k}-{body.name}",
                parent_node_name=f"frame-{k}",
            )
    step = seconds / count
    times = (np.arange(count) * step).astype(np.float32)
    accessors: dict[str, int] = {}

    def add_buffers(buffer_items, tree) -> None:
        def append(key: str, array: np.ndarray, kind: str, extra: dict) -> None:
            data = array.astype(np.float32).tobytes()
            data += b"\0" * (-len(data) % 4)
            buffer_items[f"orbviz-{key}"] = data
            view = len(buffer_items) - 1
            tree["accessors"][f"orbviz-{key}"] = {
                "bufferView": view,
                "componentType": 5126,
                "count": int(len(array)),
                "type": kind,
                **extra,
            }
            accessors[key] = len(tree["accessors"]) - 1

        append("times", times, "SCALAR", {"min": [float(times[0])], "max": [float(times[-1])]})
        for k in range(count):
            scale = np.zeros((count, 3), dtype=np.float32)
            scale[k] = 1.0
            append(f"scale-{k}", scale, "VEC3", {})

    def add_animation(tree) -> None:
        _postprocess("bohr")(tree)
        index = {node.get("name"): i for i, node in enumerate(tree["nodes"])}
        samplers, channels = [], []
        for k in range(count):
            node = index[f"frame-{k}"]
            tree["nodes"][node]["scale"] = [1.0, 1.0, 1.0] if k == 0 else [0.0, 0.0, 0.0]
            samplers.append(
                {
                    "input": accessors["times"],
                    "output": accessors[f"scale-{k}"],
                    "interpolation": "STEP",
                }
            )
            channels.append({"sampler": k, "target": {"node": node, "path": "scale"}})
        tree["animations"] = [{"name": "beat", "samplers": samplers, "channels": channels}]

    if path.suffix.lower() == ".glb":
        data = export_glb(
            scene,
            include_normals=True,
            tree_postprocessor=add_animation,
            buffer_postprocessor=add_buffers,
        )
        with atomic_paths(path) as (temp,):
            temp.write_bytes(data)
        return [path]
    raise OutputError("animated glTF is written as .glb (one file); use a .glb name")


def _write_mp4(animation: Animation, path: Path, *, seconds: float) -> list[Path]:
    """H.264 MP4 through imageio's ffmpeg (the binary ships in the imageio-ffmpeg wheel).

    ffmpeg takes the container from the file name, so the temporary file keeps the .mp4
    suffix; it is renamed into place only when complete.
    """
    import tempfile

    import imageio.v2 as imageio

    fps = max(1.0, len(animation.images) / seconds)
    handle, name = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".mp4", dir=path.parent)
    os.close(handle)
    temp = Path(name)
    try:
        writer = imageio.get_writer(
            temp, fps=fps, codec="libx264", quality=8, macro_block_size=2, ffmpeg_log_level="error"
        )
        for img in animation.images:
            rgb = img[..., :3]
            h, w = rgb.shape[:2]
            writer.append_data(np.pad(rgb, ((0, h % 2), (0, w % 2), (0, 0)), mode="edge"))
        writer.close()
        os.chmod(temp, 0o644)
        os.replace(temp, path)
    except BaseException:
        temp.unlink(missing_ok=True)
        raise
    return [path]
