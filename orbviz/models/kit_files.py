"""A kit's files: one STL per part, one plate per colour, the assembly sheet and a manifest.

Each part is written in its print pose (flat face on z = 0). A plate lays out all the parts of
one colour on the printer's bed, side by side in rows with a 5 mm gap; parts that do not fit
go on the next plate. ``kit.json`` records every part's code, colour, file, plate and the rigid
motion that takes it from its print pose to its place in the model.
"""

from __future__ import annotations

import io
import json
import zipfile
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from orbviz.errors import ModelError
from orbviz.models.solids import arrays, union

if TYPE_CHECKING:
    from orbviz.models.kit import Kit

__all__ = ["kit_files", "kit_zip", "plates", "write_kit"]

GAP_MM = 5.0  # between parts on a plate (common practice, no source)


def _stl(solid: Any) -> bytes:
    """Return a solid as binary STL bytes (trimesh's writer)."""
    import trimesh
    from trimesh.exchange.stl import export_stl

    v, f = arrays(solid)
    return bytes(export_stl(trimesh.Trimesh(v, f, process=False)))


def plates(kit: Kit, bed: tuple[float, float]) -> list[tuple[str, list[tuple[str, Any]]]]:
    """Lay out each colour's parts on beds of ``bed`` mm; return (colour, [(code, solid)])."""
    out: list[tuple[str, list[tuple[str, Any]]]] = []
    for colour in dict.fromkeys(p.color for p in kit.parts):
        placed: list[tuple[str, Any]] = []
        x = y = row = 0.0
        for part in (p for p in kit.parts if p.color == colour):
            solid = part.printed()
            box = np.asarray(solid.bounding_box())
            w, d = box[3] - box[0], box[4] - box[1]
            if (w > bed[0] or d > bed[1]) and d <= bed[0] and w <= bed[1]:  # turn it a quarter
                solid = solid.rotate((0.0, 0.0, 90.0))
                box = np.asarray(solid.bounding_box())
                w, d = box[3] - box[0], box[4] - box[1]
            if w > bed[0] or d > bed[1]:
                raise ModelError(
                    f"part {part.code} ({w:.0f} x {d:.0f} mm) does not fit the {bed[0]:g} x "
                    f"{bed[1]:g} mm bed: use a smaller size or a larger bed"
                )
            if x + w > bed[0]:
                x, y, row = 0.0, y + row + GAP_MM, 0.0
            if y + d > bed[1]:
                out.append((colour, placed))
                placed, x, y, row = [], 0.0, 0.0, 0.0
            placed.append((part.code, solid.translate((x - box[0], y - box[1], 0.0))))
            x, row = x + w + GAP_MM, max(row, d)
        out.append((colour, placed))
    return out


def kit_files(kit: Kit, bed: tuple[float, float]) -> dict[str, bytes]:
    """Return every file of the kit by its name inside the kit's folder."""
    from orbviz.models.assembly import assembly_sheet

    files: dict[str, bytes] = {}
    where: dict[str, str] = {}
    counts: dict[str, int] = {}
    for colour, placed in plates(kit, bed):
        counts[colour] = counts.get(colour, 0) + 1
        name = f"plate-{colour}-{counts[colour]}.stl"
        files[name] = _stl(union([s for _, s in placed]))
        where.update({code: name for code, _ in placed})
    manifest = {
        "kit": kit.name,
        "clearance_mm": kit.clearance,
        "bed_mm": list(bed),
        "parts": [
            {
                "code": p.code,
                "colour": p.color,
                "rgb": "#{:02X}{:02X}{:02X}".format(*kit.model.colors.get(p.color, (190,) * 3)[:3]),
                "file": "parts/" + p.file,
                "plate": where[p.code],
                "partner": p.partner,
                "code_height_mm": round(p.code_mm, 3),
                "volume_mm3": round(p.solid.volume(), 3),
                "flat_face_mm2": round(p.flat_area(), 3),
                "print_to_model": np.linalg.inv(p.pose).round(9).tolist(),
            }
            for p in kit.parts
        ],
        "joints": [
            {
                "kind": j.kind,
                "centre_mm": np.round(j.centre, 6).tolist(),
                "axis": np.round(j.axis, 9).tolist(),
                "along": np.round(j.along, 9).tolist(),
                "size_mm": list(j.size),
                "parts": list(j.parts),
            }
            for j in kit.joints
        ],
        "notes": kit.notes,
    }
    files.update({"parts/" + p.file: _stl(p.printed()) for p in kit.parts})
    sheet = assembly_sheet(kit)
    files["assembly.png"], files["assembly.pdf"] = sheet["png"], sheet["pdf"]
    files["kit.json"] = json.dumps(manifest, indent=2).encode()
    return files


def kit_zip(files: dict[str, bytes], folder: str) -> bytes:
    """Return the kit's files as a .zip holding one folder of that name."""
    buffer = io.BytesIO()
    with zipfile.ZipFile(buffer, "w", zipfile.ZIP_DEFLATED) as archive:
        for name, data in sorted(files.items()):
            info = zipfile.ZipInfo(f"{folder}/{name}", date_time=(1980, 1, 1, 0, 0, 0))
            info.compress_type = zipfile.ZIP_DEFLATED
            archive.writestr(info, data)
    return buffer.getvalue()


def write_kit(files: dict[str, bytes], target: Path) -> list[Path]:
    """Write the kit as a folder (replaced as a whole) or one .zip; all or nothing."""
    from orbviz.export import atomic_folder, write_files

    if target.suffix.lower() == ".zip":
        return write_files({target: kit_zip(files, target.stem)})
    with atomic_folder(target) as temp:
        for name, data in files.items():
            path = temp / name
            path.parent.mkdir(parents=True, exist_ok=True)
            path.write_bytes(data)
    return [target]
