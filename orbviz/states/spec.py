"""Parse orbital spec text: labels (``3dz2``), quantum numbers (``4,2,-1``) and superpositions.

Grammar (whitespace is free, labels are case-insensitive)::

    spec   := term (("+" | "-") term)*
    term   := ["+" | "-"] [coef "*"] state
    coef   := real | real"j" | "(" complex ")"        e.g. 0.5   2j   (1+1j)   1e-3
    state  := N label | N "," L "," M | N hybrid "[" K "]"
                                                       e.g. 2pz  3dx2-y2  4,2,-1  2sp3[1]

``N label`` is a real orbital; ``N,L,M`` is the complex eigenstate of Lz (the real combination
when the caller asks for real forms). Two forms wrap a spec:

    element := SYMBOL ":" spec               e.g. Na:3s  Fe:3dxy  C:2p
    bond    := "bond(" label "," label ",R=" number "," ("+" | "-") ")"
                                             e.g. bond(1s,1s,R=2.0,+)
"""

from __future__ import annotations

import cmath
import re
from dataclasses import dataclass

from orbviz._defaults import LIMITS
from orbviz.errors import SpecError
from orbviz.states.angular import LABELS

__all__ = [
    "Atom",
    "BondSpec",
    "is_bond",
    "parse_bond",
    "parse_spec",
    "split_element",
]

_NUM = r"(?:\d+(?:\.\d*)?|\.\d+)(?:e[+-]?\d+)?"
_LABEL_ALT = "|".join(re.escape(k) for k in sorted(LABELS, key=len, reverse=True))
_STATE_LABEL = re.compile(rf"(?P<n>\d+)\s*(?P<label>{_LABEL_ALT})(?![a-z0-9(])", re.I)
_STATE_NLM = re.compile(
    rf"(?P<n>[+-]?{_NUM})\s*,\s*(?P<l>[+-]?\s*{_NUM})\s*,\s*(?P<m>[+-]?\s*{_NUM})", re.I
)
_STATE_HYBRID = re.compile(
    r"(?P<n>\d+)\s*(?P<name>sp3d2|sp3d|sp3|sp2|sp)\s*\[\s*(?P<k>\d+)\s*\]", re.I
)
_COEF = re.compile(rf"(?:\((?P<paren>[^()]*)\)|(?P<num>(?:{_NUM}|inf(?:inity)?|nan)j?))\s*\*", re.I)
_SIGN = re.compile(r"[+-]")
_ELEMENT_PREFIX = re.compile(r"\s*([A-Za-z]{1,2})\s*:(.*)$", re.S)
# bond(...) is split on commas rather than matched whole: a pattern with optional spaces on
# both sides of each part backtracks for hours on a spec with long runs of spaces.
_BOND = re.compile(r"\s*bond\s*\((?P<inner>[^()]*)\)\s*", re.I)
_BOND_LABEL = re.compile(r"[^,()]+")
_BOND_DISTANCE = re.compile(r"R\s*=\s*([0-9.eE+-]+)", re.I)


@dataclass(frozen=True)
class Atom:
    """One state named in a spec, before normalisation.

    Attributes
    ----------
    n, l, m : int
        Quantum numbers; for ``form == "real"`` m is the real-combination index.
    form : {"real", "complex"}
        A labelled real orbital or an Lz eigenstate.
    coefficient : complex
        The weight as written (sign included).
    """

    n: int
    l: int
    m: int
    form: str
    coefficient: complex


@dataclass(frozen=True)
class BondSpec:
    """The parts of ``bond(A,B,R=2.0,+)``: two labels, the distance (bohr) and the sign."""

    first: str
    second: str
    distance: float
    sign: float


def is_bond(spec: object) -> bool:
    """Tell whether spec text names a two-centre combination (starts with ``bond``)."""
    return isinstance(spec, str) and spec.lstrip().lower().startswith("bond")


def parse_bond(spec: str, /) -> BondSpec:
    """Read ``bond(A,B,R=2.0,+)``; the distance is checked for range by the caller."""
    match = _BOND.fullmatch(spec) if isinstance(spec, str) else None
    parts = [p.strip() for p in match.group("inner").split(",")] if match else []
    distance = _BOND_DISTANCE.fullmatch(parts[2]) if len(parts) == 4 else None
    if (
        distance is None
        or not all(_BOND_LABEL.fullmatch(p) for p in parts[:2])
        or parts[3] not in ("+", "-")
    ):
        raise SpecError(f"bond needs the form bond(1s,1s,R=2.0,+), got {spec!r}")
    try:
        value = float(distance.group(1))
    except ValueError:
        raise SpecError(
            f"bond distance must be a number of bohr, got {distance.group(1)!r}"
        ) from None
    return BondSpec(parts[0], parts[1], value, 1.0 if parts[3] == "+" else -1.0)


def split_element(spec: str, /) -> tuple[str | None, str]:
    """Split ``Na:3s`` into ("Na", "3s"); (None, spec) without a prefix."""
    match = _ELEMENT_PREFIX.match(spec) if isinstance(spec, str) else None
    if match is None:
        return None, spec
    return match.group(1), match.group(2)


_SUBSHELL_TERM = re.compile(r"\d+[pdfPDF](?![a-zA-Z0-9(,])")
_EXAMPLE = {"p": "z", "d": "xy", "f": "z3"}


def _integer(text: str, name: str, spec: str) -> int:
    value = float(text.replace(" ", ""))
    if not value.is_integer():
        raise SpecError(
            f"quantum number {name} must be an integer, got {name}={value:g} in {spec!r}"
        )
    return int(value)


def _coefficient(match: re.Match[str], spec: str) -> complex:
    text = match.group("paren") if match.group("paren") is not None else match.group("num")
    try:
        value = complex(text.replace(" ", ""))
    except ValueError:
        raise SpecError(f"bad coefficient {text!r} in {spec!r}") from None
    if not (cmath.isfinite(value)):
        raise SpecError(f"coefficient must be finite, got {text!r} in {spec!r}")
    return value


def parse_spec(spec: str, /) -> list[Atom]:
    """Split spec text into weighted states.

    Parameters
    ----------
    spec : str
        Text following the grammar in this module's docstring.

    Returns
    -------
    list of Atom
        In the order written; quantum numbers are checked for integrality here and for range by
        :func:`orbviz.states.radial.check_quantum_numbers` when the orbital is built.

    Raises
    ------
    SpecError
        On any text outside the grammar, naming the position.
    """
    if not isinstance(spec, str):
        raise SpecError(f"an orbital spec must be text, got {type(spec).__name__}")
    text = spec.strip()
    if len(text) > LIMITS.spec_chars:
        raise SpecError(f"spec text is {len(text)} characters long; at most {LIMITS.spec_chars}")
    if not text:
        raise SpecError("empty orbital spec; try e.g. 2pz, 3dx2-y2, 4,2,-1 or 0.6*2s+0.8*2pz")
    pos, atoms = 0, list[Atom]()
    while pos < len(text):
        weight, pos = _weight(text, _skip(text, pos), spec, first=not atoms)
        terms, pos = _state(text, pos, spec)
        atoms += [Atom(a.n, a.l, a.m, a.form, weight * a.coefficient) for a in terms]
        pos = _skip(text, pos)
    return atoms


def _skip(text: str, pos: int) -> int:
    """Return the position of the next character that is not whitespace."""
    while pos < len(text) and text[pos].isspace():
        pos += 1
    return pos


def _weight(text: str, pos: int, spec: str, *, first: bool) -> tuple[complex, int]:
    """Read a term's sign and coefficient; return the weight and the position after them."""
    sign = 1.0
    sign_match = _SIGN.match(text, pos)
    if sign_match:
        sign = -1.0 if sign_match.group() == "-" else 1.0
        pos = _skip(text, sign_match.end())
    elif not first:
        raise SpecError(f"expected '+' or '-' at position {pos} of {spec!r}")
    coef = 1.0 + 0j
    coef_match = _COEF.match(text, pos)
    if coef_match:
        coef = _coefficient(coef_match, spec)
        pos = _skip(text, coef_match.end())
    return sign * coef, pos


def _state(text: str, pos: int, spec: str) -> tuple[list[Atom], int]:
    """Read one state (a hybrid, n,l,m or a label) with unit weight; return it and the end."""
    hybrid = _STATE_HYBRID.match(text, pos)
    if hybrid:
        from orbviz.states.hybrids import hybrid_terms

        n = int(hybrid.group("n"))
        terms = hybrid_terms(n, hybrid.group("name").lower(), int(hybrid.group("k")))
        return [Atom(n, l, m, "real", weight) for l, m, weight in terms], hybrid.end()
    nlm = _STATE_NLM.match(text, pos)
    if nlm:
        n, l, m = (_integer(nlm.group(k), k, spec) for k in ("n", "l", "m"))
        return [Atom(n, l, m, "complex", 1.0)], nlm.end()
    label = _STATE_LABEL.match(text, pos)
    if not label:
        rest = text[pos : pos + 12] or "end of text"
        subshell = _SUBSHELL_TERM.match(text, pos)
        if subshell:
            raise SpecError(
                f"{subshell.group(0)!r} in {spec!r} names a set of orbitals, not one: name a "
                f"member (such as {subshell.group(0)}{_EXAMPLE[subshell.group(0)[-1].lower()]})"
            )
        raise SpecError(
            f"expected an orbital such as 2pz or 4,2,-1 at position {pos} of {spec!r} "
            f"(found {rest!r})"
        )
    l, m = LABELS[label.group("label").lower()]
    return [Atom(int(label.group("n")), l, m, "real", 1.0)], label.end()
