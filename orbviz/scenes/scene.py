"""Scene files: TOML describing a set of figures, meshes and models (format in docs/scenes.md).

A scene has a ``[defaults]`` table, ``[[orbital]]`` items (one spec each), and ``[[shells]]``
items that expand to every real orbital of the listed shells. This module reads and validates
the file into plain :class:`Item` records; :mod:`orbviz.scenes.batch` runs them.
"""

from __future__ import annotations

import hashlib
import json
import math
import re
import tomllib
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from orbviz import __version__
from orbviz._defaults import DEFAULTS
from orbviz.errors import OrbvizError
from orbviz.states.angular import LABELS

__all__ = ["OUTPUTS", "Item", "SceneError", "load_scene", "parse_scene"]

OUTPUTS = ("png", "glb", "gltf", "obj", "stl", "ply", "3mf", "model.stl", "model.3mf")
_NAME = re.compile(r"[A-Za-z0-9][A-Za-z0-9._-]{0,99}")
_HEADER = re.compile(r"^\s*\[\[\s*(orbital|shells)\s*\]\]", re.M)
_RENDER_KEYS = {
    "size": str,
    "scale": float,
    "view": str,
    "transparent": bool,
    "background": str,
    "axes": bool,
    "scale_bar": str,
    "title": str,
    "lighting": str,
    "nodes": bool,
    "cut": str,
    "outer": float,
    "extent": float,
}
_MODEL_KEYS = {"size": float, "rod": float, "min_feature": float, "stand": bool, "cut": str}
_COMMON_KEYS = {
    "Z": float,
    "real": bool,
    "fraction": float,
    "grid": int,
    "outputs": list,
    "colors": str,
    "potential": str,
    "atom": str,
}


class SceneError(OrbvizError, ValueError):
    """A scene file that cannot be used; the message names the file, the item and the key."""


@dataclass(frozen=True)
class Item:
    """One entry of a scene, with every setting resolved.

    Attributes
    ----------
    name : str
        Output file stem, safe to use inside the output folder.
    spec : str
        Orbital spec text.
    settings : dict
        Z, real, fraction, grid, outputs, colors, and the ``render`` and ``model`` tables.
    """

    name: str
    spec: str
    settings: dict[str, Any]

    @property
    def digest(self) -> str:
        """Content hash of everything that decides the outputs (and the orbviz version)."""
        text = json.dumps(
            {"spec": self.spec, "settings": self.settings, "version": __version__}, sort_keys=True
        )
        return hashlib.sha256(text.encode()).hexdigest()[:16]


def _where(source: str, what: str) -> str:
    return f"{source}: {what}"


def _typed(value: Any, kind: type, where: str, key: str) -> Any:
    if kind is float and isinstance(value, int) and not isinstance(value, bool):
        value = float(value)
    if kind is int and isinstance(value, bool) or not isinstance(value, kind):
        raise SceneError(f"{where}: key {key!r} must be {kind.__name__}, got {value!r}")
    if kind is float and not math.isfinite(value):
        raise SceneError(f"{where}: key {key!r} must be finite, got {value!r}")
    return value


def _settings(table: dict, where: str, *, allow: set[str]) -> dict[str, Any]:
    out: dict[str, Any] = {}
    for key, value in table.items():
        if key in ("render", "model"):
            if not isinstance(value, dict):
                raise SceneError(f"{where}: key {key!r} must be a table")
            schema = _RENDER_KEYS if key == "render" else _MODEL_KEYS
            sub = {}
            for k, v in value.items():
                if k not in schema:
                    raise SceneError(
                        f"{where}: unknown key '{key}.{k}' (known: {', '.join(sorted(schema))})"
                    )
                sub[k] = _typed(v, schema[k], where, f"{key}.{k}")
            out[key] = sub
        elif key in _COMMON_KEYS:
            out[key] = _typed(value, _COMMON_KEYS[key], where, key)
        elif key not in allow:
            known = sorted(set(_COMMON_KEYS) | {"render", "model"} | allow)
            raise SceneError(f"{where}: unknown key {key!r} (known: {', '.join(known)})")
    if "outputs" in out:
        bad = [o for o in out["outputs"] if o not in OUTPUTS]
        if bad or not out["outputs"]:
            raise SceneError(
                f"{where}: key 'outputs' takes a non-empty list of "
                f"{', '.join(OUTPUTS)}; got {out['outputs']!r}"
            )
    if "fraction" in out and not 0 < out["fraction"] < 1:
        raise SceneError(f"{where}: key 'fraction' must be strictly between 0 and 1")
    if "Z" in out and not out["Z"] > 0:
        raise SceneError(f"{where}: key 'Z' must be > 0, got {out['Z']}")
    if "grid" in out and not 16 <= out["grid"] <= 2048:
        raise SceneError(f"{where}: key 'grid' must be between 16 and 2048")
    return out


def _merge(defaults: dict, own: dict) -> dict:
    merged = {
        "Z": None,
        "real": False,
        "fraction": DEFAULTS.fraction,
        "grid": DEFAULTS.grid,
        "outputs": ["png", "glb"],
        "render": {},
        "model": {},
    }
    for layer in (defaults, own):
        for key, value in layer.items():
            if key in ("render", "model"):
                merged[key] = {**merged[key], **value}
            else:
                merged[key] = value
    if any(o.startswith("model.") for o in merged["outputs"]) and "size" not in merged["model"]:
        merged["model"] = {**merged["model"], "size": 60.0}
    return merged


def _slug(spec: str, Z: float) -> str:
    stem = re.sub(r"[^A-Za-z0-9.-]+", "_", spec.replace("*", "x")).strip("._-") or "orbital"
    if Z not in (None, 1.0):
        stem += f"-Z{Z:g}"
    return stem[:100]


def _shell_specs(n: int) -> list[str]:
    specs = []
    for l in range(n):
        labels = [name for name, (ll, _) in LABELS.items() if ll == l]  # the real labels of l
        if labels:
            specs += [f"{n}{label}" for label in labels]
        else:  # no labels beyond f: real combinations by quantum numbers
            specs += [f"{n},{l},{m}" for m in range(-l, l + 1)]
    return specs


def orbital_of(spec: str, settings: dict):
    """Build an item's orbital (with its potential, if the item names one)."""
    from orbviz.states.orbital import Orbital

    if settings.get("potential"):
        from orbviz.states.potentials import parse_potential

        Z = 1.0 if settings["Z"] is None else settings["Z"]
        return Orbital.from_spec(
            spec, real=settings["real"], potential=parse_potential(settings["potential"], Z=Z)
        )
    return Orbital.from_spec(spec, Z=settings["Z"], real=settings["real"])


def parse_scene(text: str, source: str = "<scene>") -> list[Item]:
    """Read scene TOML text into validated items.

    Raises
    ------
    SceneError
        On TOML syntax errors, unknown keys, bad values, unsafe or duplicate names, and specs
        that do not parse, each naming the file, the item and the key.
    """
    try:
        doc = tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        raise SceneError(f"{source}: not valid TOML: {error}") from None
    unknown = set(doc) - {"defaults", "orbital", "shells", "title"}
    if unknown:
        raise SceneError(
            f"{source}: unknown table {sorted(unknown)[0]!r} (known: defaults, "
            "orbital, shells, title)"
        )
    defaults = _settings(doc.get("defaults", {}), _where(source, "[defaults]"), allow=set())
    items: list[Item] = []
    for kind in ("orbital", "shells"):
        if not isinstance(doc.get(kind, []), list):
            raise SceneError(f"{source}: '{kind}' must be an array of tables ([[{kind}]])")
    # TOML keeps the order within each array but not across them: take it from the headers
    order = _HEADER.findall(text)
    counters = {"orbital": 0, "shells": 0}
    sequence = []
    for kind in order:
        if counters[kind] < len(doc.get(kind, [])):
            counters[kind] += 1
            sequence.append((kind, counters[kind], doc[kind][counters[kind] - 1]))
    for kind in ("orbital", "shells"):  # tables written inline, without a [[...]] header
        for index in range(counters[kind], len(doc.get(kind, []))):
            sequence.append((kind, index + 1, doc[kind][index]))
    for kind, index, entry in sequence:
        where = _where(source, f"{kind} {index}")
        if kind == "orbital":
            if "spec" not in entry:
                raise SceneError(f"{where}: missing key 'spec'")
            spec = _typed(entry["spec"], str, where, "spec")
            where = _where(source, f"orbital {index} ({spec!r})")
            own = _settings(entry, where, allow={"spec", "name"})
            specs = [(spec, entry.get("name"))]
        else:
            if "n" not in entry:
                raise SceneError(f"{where}: missing key 'n'")
            ns = entry["n"] if isinstance(entry["n"], list) else [entry["n"]]
            if not ns or not all(
                isinstance(n, int) and not isinstance(n, bool) and 1 <= n <= 12 for n in ns
            ):
                raise SceneError(f"{where}: key 'n' takes whole numbers 1..12, got {entry['n']!r}")
            own = _settings(entry, where, allow={"n"})
            specs = [(s, None) for n in ns for s in _shell_specs(n)]
        settings = _merge(defaults, own)
        if settings.get("atom"):  # an element for every spec of the item: atom = "Na"
            specs = [(f"{settings['atom']}:{spec}", name) for spec, name in specs]
        for spec, name in specs:
            try:
                orbital_of(spec, settings)
            except OrbvizError as error:
                raise SceneError(f"{where}: key 'spec': {error}") from None
            if name is None:
                name = _slug(spec, settings["Z"])
            elif not (isinstance(name, str) and _NAME.fullmatch(name)):
                raise SceneError(
                    f"{where}: key 'name' {name!r} must be 1-100 letters, digits, "
                    "'.', '_' or '-', starting with a letter or digit"
                )
            items.append(Item(name, spec, settings))
    seen: dict[str, int] = {}
    for item in items:
        seen[item.name] = seen.get(item.name, 0) + 1
    duplicates = [n for n, k in seen.items() if k > 1]
    if duplicates:
        raise SceneError(f"{source}: duplicate item name {duplicates[0]!r}; give each a 'name'")
    if not items:
        raise SceneError(f"{source}: no items: add [[orbital]] or [[shells]] tables")
    return items


def load_scene(path: str | Path) -> list[Item]:
    """Read and validate a scene file."""
    path = Path(path)
    try:
        text = path.read_text(encoding="utf-8")
    except OSError as error:
        raise SceneError(f"cannot read scene {str(path)!r}: {error.strerror}") from None
    return parse_scene(text, source=path.name)
