"""An animation's files: a looping GIF, an H.264 MP4, a folder of PNG frames or an animated GLB.

Every output is checked before the frames are computed (:func:`check_animation_output`) and
written all or nothing; a frames folder is replaced as a whole, never topped up.
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Any

import numpy as np

from orbviz.errors import OutputError
from orbviz.export import atomic_folder, check_targets, write_files
from orbviz.figures.animation import Animation

__all__ = ["ANIMATION_SUFFIXES", "check_animation_output", "encode_movie", "write_animation"]

ANIMATION_SUFFIXES = (".gif", ".mp4", ".glb", "")  # "": a folder of PNG frames


def check_animation_output(path: str | os.PathLike[str]) -> Path:
    """Refuse, before any work, an animation output that cannot be written.

    A frames folder (no suffix) is replaced as a whole, so it must be named (not ``.``) and may
    hold only frames (``frame_NNN.png``) already: a folder of other files is never replaced.
    """
    text = os.fspath(path)
    path = Path(path)
    if path.suffix.lower() not in ANIMATION_SUFFIXES:
        raise OutputError(f"cannot write {text!r}: animations go to .gif, .mp4, .glb or a folder")
    check_targets([path], folders=not path.suffix, allowed=("frame_*.png",))
    return path


def _gif_bytes(animation: Animation) -> bytes:
    import io

    from PIL import Image

    pictures = [Image.fromarray(img[..., :3], "RGB") for img in animation.images]
    duration = max(20, int(1000 * animation.seconds / len(pictures)))
    buffer = io.BytesIO()
    pictures[0].save(
        buffer, format="GIF", save_all=True, append_images=pictures[1:], duration=duration, loop=0
    )
    return buffer.getvalue()


def _frames(animation: Animation, path: Path) -> list[Path]:
    from PIL import Image

    names = [f"frame_{k:03d}.png" for k in range(len(animation.images))]
    with atomic_folder(path) as temp:
        for img, name in zip(animation.images, names, strict=True):
            Image.fromarray(img, "RGBA").save(temp / name, format="PNG")
    return [path / name for name in names]


def _mp4_bytes(animation: Animation) -> bytes:
    """H.264 MP4 through imageio's ffmpeg (the binary ships in the imageio-ffmpeg wheel)."""
    import tempfile

    import imageio.v2 as imageio

    fps = max(1.0, len(animation.images) / animation.seconds)
    with tempfile.TemporaryDirectory(prefix="orbviz-mp4-") as folder:
        staging = Path(folder) / "movie.mp4"  # ffmpeg takes the container from the name
        writer = imageio.get_writer(
            staging,
            fps=fps,
            codec="libx264",
            quality=8,
            macro_block_size=2,
            ffmpeg_log_level="error",
        )
        try:
            for img in animation.images:
                rgb = img[..., :3]
                h, w = rgb.shape[:2]
                writer.append_data(np.pad(rgb, ((0, h % 2), (0, w % 2), (0, 0)), mode="edge"))
        finally:
            writer.close()
        return staging.read_bytes()


def encode_movie(animation: Animation, suffix: str) -> bytes:
    """Return the frames as a looping GIF (``.gif``) or an H.264 MP4 (``.mp4``) file's bytes."""
    encoders = {".gif": _gif_bytes, ".mp4": _mp4_bytes}
    if suffix.lower() not in encoders:
        raise OutputError(f"movies are .gif or .mp4, not {suffix!r}")
    return encoders[suffix.lower()](animation)


def _glb(animation: Animation, path: Path) -> list[Path]:
    """One node per frame, shown in turn by a STEP scale animation; the root turns z up."""
    from orbviz.export.gltf import encode_scene, z_up_root
    from orbviz.surface.convert import trimesh_scene

    scene = trimesh_scene([])
    count = len(animation.bodies)
    for k, bodies in enumerate(animation.bodies):
        scene.graph.update(frame_from=scene.graph.base_frame, frame_to=f"frame-{k}")
        for name, geometry in trimesh_scene(
            bodies, prefix=f"frame-{k}-", linear=True
        ).geometry.items():
            scene.add_geometry(
                geometry, geom_name=name, node_name=name, parent_node_name=f"frame-{k}"
            )
    times = (np.arange(count) * animation.seconds / count).astype(np.float32)
    accessors: dict[str, int] = {}

    def add_buffers(buffer_items: dict[str, Any], tree: dict[str, Any]) -> None:
        def append(key: str, array: np.ndarray, kind: str, extra: dict[str, Any]) -> None:
            data = array.astype(np.float32).tobytes()
            buffer_items[f"orbviz-{key}"] = data + b"\0" * (-len(data) % 4)
            tree["accessors"][f"orbviz-{key}"] = {
                "bufferView": len(buffer_items) - 1,
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

    def add_animation(tree: dict[str, Any]) -> None:
        z_up_root("bohr")(tree)
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

    files = encode_scene(scene, path, tree_edit=add_animation, buffer_edit=add_buffers)
    return write_files(files)


def write_animation(animation: Animation, path: str | os.PathLike[str]) -> list[Path]:
    """Write frames as GIF (looping), MP4, an animated GLB, or PNGs in a folder (no suffix)."""
    path = check_animation_output(path)
    suffix = path.suffix.lower()
    if suffix == ".glb":
        if not animation.bodies:
            raise OutputError("this animation kept no bodies: animate(..., keep_bodies=True)")
        return _glb(animation, path)
    if suffix in (".gif", ".mp4"):
        return write_files({path: encode_movie(animation, suffix)})
    return _frames(animation, path)
