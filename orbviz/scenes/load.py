"""Scene files: TOML describing a set of figures, meshes and models (format in docs/scenes.md).

A scene has a ``[defaults]`` table, ``[[orbital]]`` items (one spec each), and ``[[shells]]``
items that expand to every real orbital of the listed shells. Every value of every table is
checked here, by the same rules as the command line and the API (:mod:`orbviz._options`), and
every spec is made into its state, before any work starts. Errors name the file, the item and
the key: ``lab.toml: orbital 3 ('2pz'): render.view: expected iso, x, y, z or AZ,EL ...``.
"""

from __future__ import annotations

import hashlib
import re
import tomllib
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from orbviz._defaults import LIMITS
from orbviz._options import build, external_keys
from orbviz.errors import OptionError, OrbvizError, SceneError
from orbviz.figures.options import AnimationOptions, FigureOptions, PlotOptions, page_layout
from orbviz.models.engraving import SampleOptions
from orbviz.models.options import ModelOptions
from orbviz.pages.options import PageOptions, arrangement_of
from orbviz.scenes.items import (
    ANIMATION_OUTPUTS,
    FIGURE_OUTPUTS,
    OUTPUTS,
    SHEET_OUTPUTS,
    Item,
    check_title,
    slug,
)
from orbviz.states.angular import LABELS
from orbviz.states.make import set_members
from orbviz.states.physics import Physics
from orbviz.states.potentials import TABLE_BYTES
from orbviz.surface.options import MeshOptions

__all__ = ["Scene", "load_scene", "parse_scene"]

_MAX_BYTES = 1_000_000
_NAME = re.compile(r"[A-Za-z0-9][A-Za-z0-9._-]{0,99}")
# one line each ([ \t], not \s, which spans blank lines and backtracks in quadratic time)
_HEADER = re.compile(r"^[ \t]*\[\[[ \t]*(orbital|shells|sheet)[ \t]*\]\]", re.M)
_KINDS = ("orbital", "shells", "sheet")
_SHELL_MAX = 12
_PHYSICS = {v: k for k, v in external_keys(Physics).items()}
_SHARED = {"grid", "colors"}  # common keys that go into the render and model tables
_RENDER = {v: k for k, v in external_keys(FigureOptions).items() if v not in _SHARED}
# split parts write several files per item, the command line's job; a kit is one .zip
_NOT_IN_SCENES = {"split", "kit"}  # a kit is the output "kit.zip"
_MODEL = {v: k for k, v in external_keys(ModelOptions).items() if v not in _SHARED | _NOT_IN_SCENES}
_PLOT = {v: k for k, v in external_keys(PlotOptions).items() if v != "kind"}  # the output names it
_ANIMATE = {v: k for k, v in external_keys(AnimationOptions).items() if v != "colors"}
_PAGE = {v: k for k, v in external_keys(PageOptions).items()}
_SAMPLE = {v: k for k, v in external_keys(SampleOptions).items()}
_TABLES = {
    "render": _RENDER,
    "model": _MODEL,
    "plot": _PLOT,
    "animate": _ANIMATE,
    "page": _PAGE,
    "sample": _SAMPLE,
}
_COMMON = set(_PHYSICS) | _SHARED | {"outputs", "atom"}
_SHEET_MAX = 24  # panels of one sheet
# files of the output folder that belong to the batch itself
_RESERVED = {
    "index.html": "its contact sheet",
    "orbitals.html": "the page of every item's page",
    "manifest.json": "its manifest",
}


@dataclass(frozen=True)
class Scene:
    """A checked scene: its title and items."""

    title: str
    items: list[Item]


@dataclass(frozen=True)
class _Where:
    source: str
    item: str

    def __str__(self) -> str:
        return f"{self.source}: {self.item}"

    def error(self, key: str, rule: str) -> SceneError:
        return SceneError(f"{self}: {key}: {rule}")


def _layer(table: Any, where: _Where, allow: set[str]) -> dict[str, Any]:
    """Check a table's keys (values are checked when the options are built)."""
    if not isinstance(table, dict):
        raise SceneError(f"{where}: expected a table, got {table!r}")
    for key, value in table.items():
        if key in _TABLES:
            known = _TABLES[key]
            if not isinstance(value, dict):
                raise where.error(key, f"expected a table, got {value!r}")
            for sub in value:
                if sub not in known:
                    raise where.error(
                        f"{key}.{sub}", f"unknown key (known: {', '.join(sorted(known))})"
                    )
        elif key not in _COMMON and key not in allow:
            known_keys = sorted(_COMMON | set(_TABLES) | allow)
            raise where.error(key, f"unknown key (known: {', '.join(known_keys)})")
    return dict(table)


def _merge(defaults: dict[str, Any], own: dict[str, Any]) -> dict[str, Any]:
    merged: dict[str, Any] = {table: {} for table in _TABLES}
    for layer in (defaults, own):
        for key, value in layer.items():
            merged[key] = {**merged[key], **value} if key in _TABLES else value
    return merged


def _options(
    cls: type, values: dict[str, Any], keys: dict[str, str], where: _Where, prefix: str
) -> Any:
    fields = {keys[k]: v for k, v in values.items()}
    names = {f: k for k, f in keys.items()}
    try:
        return build(cls, fields, key=lambda f: prefix + names.get(f, f))
    except OptionError as error:
        raise where.error(error.key, error.rule) from None


def _outputs(value: Any, where: _Where, allowed: tuple[str, ...]) -> tuple[str, ...]:
    if not (isinstance(value, list) and value and all(v in allowed for v in value)):
        raise where.error(
            "outputs", f"expected a non-empty list of {', '.join(allowed)}, got {value!r}"
        )
    return tuple(dict.fromkeys(value))


def _table(
    physics: Physics, base: Path, where: _Where, anywhere: bool
) -> tuple[Physics, tuple[tuple[str, str], ...]]:
    """Resolve a potential table beside the scene; hash its contents for reruns."""
    text = physics.potential or ""
    if not text.lower().startswith("table:"):
        return physics, ()
    path = (base / text.split(":", 1)[1].strip()).resolve()
    if not anywhere and not path.is_relative_to(base.resolve()):
        raise where.error(
            "potential",
            "a table must lie in the scene's folder or below it (or allow tables anywhere on "
            "the command line)",
        )
    try:
        with path.open("rb") as handle:  # the table's own reader refuses what is larger
            digest = hashlib.sha256(handle.read(TABLE_BYTES + 1)).hexdigest()
    except OSError as error:
        raise where.error(
            "potential", f"cannot read table {path.name!r}: {error.strerror}"
        ) from None
    return build(Physics, {"potential": f"table:{path}"}, base=physics), ((str(path), digest),)


def _item(
    name: Any,
    spec: str | list[str],
    values: dict[str, Any],
    where: _Where,
    base: Path,
    anywhere: bool,
) -> Item:
    physics = _options(
        Physics, {k: values[k] for k in _PHYSICS if k in values}, _PHYSICS, where, ""
    )
    physics, inputs = _table(physics, base, where, anywhere)
    jobs = _jobs(values, where)
    sheet = isinstance(spec, list)
    allowed = SHEET_OUTPUTS if sheet else OUTPUTS
    default = ["png"] if sheet else ["png", "glb"]
    outputs = _outputs(values.get("outputs", default), where, allowed)
    members = _members(spec if isinstance(spec, list) else [spec], values.get("atom"), where)
    for member in members:
        _check_state(
            physics,
            member,
            where,
            sheet=sheet,
            animated=bool(set(outputs) & set(ANIMATION_OUTPUTS)),
        )
    _check_page(jobs, members, outputs, where)
    text = " ".join(members)
    if name is None:
        name = slug(text, physics.Z)
    elif not (isinstance(name, str) and _NAME.fullmatch(name)):
        raise where.error(
            "name",
            f"{name!r} must be 1-100 letters, digits, '.', '_' or '-', starting with a letter "
            "or digit",
        )
    item = Item(
        name,
        text,
        physics,
        outputs,
        inputs=inputs,
        where=str(where),
        members=tuple(members) if sheet else (),
        **jobs,
    )
    files = item.files()
    if len(set(map(str.lower, files))) < len(files):
        raise where.error("outputs", f"two outputs would share a file name in {files}")
    return item


def _jobs(values: dict[str, Any], where: _Where) -> dict[str, Any]:
    """Return the item's job options by Item field: figure, model, plot, animation, page."""
    shared = {k: values[k] for k in _SHARED if k in values}
    _options(MeshOptions, shared, {"grid": "grid", "colors": "colors"}, where, "")
    both = {"grid": "grid", "colors": "colors"}
    colors = {"colors": shared["colors"]} if "colors" in shared else {}
    return {
        "figure": _options(
            FigureOptions, {**values["render"], **shared}, {**_RENDER, **both}, where, "render."
        ),
        "model": _options(
            ModelOptions, {**values["model"], **shared}, {**_MODEL, **both}, where, "model."
        ),
        "plot": _options(PlotOptions, values["plot"], _PLOT, where, "plot."),
        "animation": _options(
            AnimationOptions,
            {**values["animate"], **colors},
            {**_ANIMATE, "colors": "colors"},
            where,
            "animate.",
        ),
        "page": _options(PageOptions, values["page"], _PAGE, where, "page."),
        "sample": _options(SampleOptions, values["sample"], _SAMPLE, where, "sample."),
    }


def _check_page(
    jobs: dict[str, Any], members: list[str], outputs: Sequence[str], where: _Where
) -> None:
    """Check the title's placeholders and that the page holds its panels at the printed size.

    An interactive page is checked likewise: its arrangement must hold the panels.
    """
    figure = jobs["figure"]
    try:
        check_title(figure.title)
    except ValueError as error:
        raise where.error("render.title", str(error)) from None
    if "html" in outputs:
        count = sum(len(set_members(m) or [m]) for m in members)
        try:
            arrangement_of(count, jobs["page"])
        except OptionError as error:
            raise where.error(f"page.{error.key}", error.rule) from None
    if set(outputs) & set(FIGURE_OUTPUTS):
        panels = 1 if figure.overlay else sum(len(set_members(m) or [m]) for m in members)
        try:
            page_layout(panels, figure)
        except OptionError as error:
            raise where.error(f"render.{error.key}", error.rule) from None


def _members(specs: list[str], atom: Any, where: _Where) -> list[str]:
    """Return the specs with the item's element prefix; a set stays one spec (``3d``)."""
    if atom is None:
        return specs
    if not (isinstance(atom, str) and re.fullmatch(r"[A-Za-z]{1,2}", atom)):
        raise where.error("atom", f"expected an element symbol such as Na, got {atom!r}")
    return [f"{atom}:{spec}" for spec in specs]


def _check_state(
    physics: Physics, spec: str, where: _Where, *, sheet: bool, animated: bool
) -> None:
    """Make the state(s) a spec names, so that a bad one is refused before any work."""
    members = set_members(spec)
    if members and not sheet:
        raise where.error(
            "spec",
            f"{spec!r} names a set of {len(members)} orbitals: list it in a [[sheet]] for one "
            "figure of them, or name one member",
        )
    try:
        states = [physics.state(s) for s in members or [spec]]
    except OrbvizError as error:
        raise where.error("spec", str(error)) from None
    if animated:
        try:
            for state in states:
                state.beat()  # a state that does not move cannot be animated
        except OrbvizError as error:
            raise where.error("outputs", f"an animation (gif, mp4) needs motion: {error}") from None


def _shell_specs(n: int) -> list[str]:
    specs = []
    for l in range(n):
        labels = [name for name, (ll, _) in LABELS.items() if ll == l]  # the real labels of l
        if labels:
            specs += [f"{n}{label}" for label in labels]
        else:  # no labels beyond f: real combinations by quantum numbers
            specs += [f"{n},{l},{m}" for m in range(-l, l + 1)]
    return specs


def _entries(doc: dict[str, Any], text: str, source: str) -> list[tuple[str, int, Any]]:
    """(kind, index, table) in file order (TOML keeps order within an array, not across)."""
    for kind in _KINDS:
        if not isinstance(doc.get(kind, []), list):
            raise SceneError(f"{source}: '{kind}' must be an array of tables ([[{kind}]])")
    counters = dict.fromkeys(_KINDS, 0)
    sequence = []
    for kind in _HEADER.findall(text):
        if counters[kind] < len(doc.get(kind, [])):
            counters[kind] += 1
            sequence.append((kind, counters[kind], doc[kind][counters[kind] - 1]))
    for kind in _KINDS:  # tables written inline, without a [[...]] header
        for index in range(counters[kind], len(doc.get(kind, []))):
            sequence.append((kind, index + 1, doc[kind][index]))
    return sequence


def _sheet_specs(entry: dict[str, Any], where: _Where) -> list[str]:
    specs = entry.get("specs")
    if specs is None:
        raise where.error("specs", 'missing: a list of specs, such as ["3d"] or ["3s", "3p"]')
    if not (
        isinstance(specs, list)
        and 1 <= len(specs) <= _SHEET_MAX
        and all(isinstance(s, str) and 0 < len(s) <= LIMITS.spec_chars for s in specs)
    ):
        raise where.error(
            "specs", f"expected a list of 1 to {_SHEET_MAX} spec texts, got {specs!r}"[:300]
        )
    panels = sum(len(set_members(s) or [s]) for s in specs)
    if panels > _SHEET_MAX:
        raise where.error("specs", f"{panels} panels; a sheet holds at most {_SHEET_MAX}")
    return specs


def _expand(
    kind: str, index: int, entry: Any, source: str
) -> tuple[_Where, list[tuple[Any, Any]], dict[str, Any]]:
    where = _Where(source, f"{kind} {index}")
    if not isinstance(entry, dict):
        raise SceneError(f"{where}: expected a table, got {entry!r}")
    if kind == "sheet":
        specs = _sheet_specs(entry, where)
        where = _Where(source, f"sheet {index} ({' '.join(specs)!r})"[:300])
        return where, [(specs, entry.get("name"))], _layer(entry, where, {"specs", "name"})
    if kind == "orbital":
        spec = entry.get("spec")
        if spec is None:
            raise where.error("spec", "missing")
        if not isinstance(spec, str):
            raise where.error("spec", f"expected spec text, got {spec!r}")
        if len(spec) > LIMITS.spec_chars:
            raise where.error(
                "spec", f"spec text is {len(spec)} characters long; at most {LIMITS.spec_chars}"
            )
        where = _Where(source, f"orbital {index} ({spec!r})")
        return where, [(spec, entry.get("name"))], _layer(entry, where, {"spec", "name"})
    if "n" not in entry:
        raise where.error("n", "missing")
    ns = entry["n"] if isinstance(entry["n"], list) else [entry["n"]]
    if not ns or not all(
        isinstance(n, int) and not isinstance(n, bool) and 1 <= n <= _SHELL_MAX for n in ns
    ):
        raise where.error("n", f"expected whole numbers 1..{_SHELL_MAX}, got {entry['n']!r}")
    own = _layer(entry, where, {"n"})
    return where, [(s, None) for n in ns for s in _shell_specs(n)], own


def _claim_names(owners: dict[str, Item], item: Item, source: str) -> None:
    """Refuse an item whose files collide with an earlier item's.

    Names compare case-insensitively, as on many file systems; ``owners`` maps the lower-case
    names claimed so far to their items.
    """
    for name in item.files():
        if name.lower() in _RESERVED:
            raise SceneError(
                f"{item.where} writes {name!r}, which the batch keeps for "
                f"{_RESERVED[name.lower()]}; give the item a different 'name'"
            )
        other = owners.setdefault(name.lower(), item)
        if other is not item:
            first = other.where.removeprefix(f"{source}: ")
            raise SceneError(
                f"{item.where} and {first} both write {name!r}; give one a different 'name'"
            )


def _document(text: str, source: str) -> dict[str, Any]:
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        raise SceneError(f"{source}: not valid TOML: {error}") from None
    except RecursionError:
        raise SceneError(f"{source}: not usable: its values are nested too deeply") from None


def parse_scene(
    text: str, source: str = "<scene>", *, base: str | Path = ".", tables_anywhere: bool = False
) -> Scene:
    """Read scene TOML text into checked items.

    Parameters
    ----------
    text : str
        The scene.
    source : str
        Its name, for messages.
    base : path-like, default: "."
        The scene's folder: potential tables are read relative to it, and must lie in it.
    tables_anywhere : bool, default: False
        Allow potential tables outside ``base``.

    Raises
    ------
    SceneError
        On TOML errors, unknown keys, bad values, unsafe or colliding names, and specs that do
        not make a state, each naming the file, the item and the key.
    """
    doc = _document(text, source)
    unknown = set(doc) - {"defaults", "title", *_KINDS}
    if unknown:
        raise SceneError(
            f"{source}: unknown table {sorted(unknown)[0]!r} (known: defaults, orbital, shells, "
            "sheet, title)"
        )
    title = doc.get("title", Path(source).stem)
    if not (isinstance(title, str) and len(title) <= 200):
        raise SceneError(f"{source}: title: expected text of at most 200 characters")
    defaults_where = _Where(source, "[defaults]")
    defaults = _layer(doc.get("defaults", {}), defaults_where, set())
    _item(None, "1s", _merge(defaults, {}), defaults_where, Path(base), tables_anywhere)
    items: list[Item] = []
    owners: dict[str, Item] = {}  # checked as items come: a repeated shell stops at once
    for kind, index, entry in _entries(doc, text, source):
        where, specs, own = _expand(kind, index, entry, source)
        values = _merge(defaults, own)
        for spec, name in specs:
            items.append(_item(name, spec, values, where, Path(base), tables_anywhere))
            _claim_names(owners, items[-1], source)
    if not items:
        raise SceneError(f"{source}: no items: add [[orbital]], [[shells]] or [[sheet]] tables")
    return Scene(title, items)


def load_scene(path: str | Path, *, tables_anywhere: bool = False) -> Scene:
    """Read and check a scene file (UTF-8 TOML, at most 1 MB)."""
    path = Path(path)
    try:
        if path.is_dir():
            raise SceneError(f"cannot read scene {str(path)!r}: it is a folder")
        with path.open("rb") as handle:  # at most the limit: a device has no size
            data = handle.read(_MAX_BYTES + 1)
    except OSError as error:
        raise SceneError(f"cannot read scene {str(path)!r}: {error.strerror}") from None
    if len(data) > _MAX_BYTES:
        raise SceneError(f"{path.name}: larger than {_MAX_BYTES // 1000} kB; split the scene")
    try:
        text = data.decode("utf-8-sig")  # a byte-order mark, as some editors write, is dropped
    except UnicodeDecodeError as error:
        raise SceneError(f"{path.name}: not UTF-8 text (byte {error.start})") from None
    return parse_scene(text, path.name, base=path.resolve().parent, tables_anywhere=tables_anywhere)
