"""Parse orbital spec text: labels (``3dz2``), quantum numbers (``4,2,-1``) and superpositions.

Grammar (whitespace is free, labels are case-insensitive)::

    spec   := term (("+" | "-") term)*
    term   := ["+" | "-"] [coef "*"] state
    coef   := real | real"j" | "(" complex ")"        e.g. 0.5   2j   (1+1j)   1e-3
    state  := N label | N "," L "," M | N hybrid "[" K "]"
                                                       e.g. 2pz  3dx2-y2  4,2,-1  2sp3[1]

``N label`` is a real orbital; ``N,L,M`` is the complex eigenstate of Lz (the real combination
when the caller asks for real forms).
"""

from __future__ import annotations

import cmath
import re
from dataclasses import dataclass

from orbviz.errors import SpecError
from orbviz.states.angular import LABELS

__all__ = ["Atom", "parse_spec"]

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
    if not text:
        raise SpecError("empty orbital spec; try e.g. 2pz, 3dx2-y2, 4,2,-1 or 0.6*2s+0.8*2pz")
    pos, atoms = 0, []
    while True:
        while pos < len(text) and text[pos].isspace():
            pos += 1
        sign = 1.0
        sign_match = _SIGN.match(text, pos)
        if sign_match:
            sign = -1.0 if sign_match.group() == "-" else 1.0
            pos = sign_match.end()
            while pos < len(text) and text[pos].isspace():
                pos += 1
        elif atoms:
            raise SpecError(f"expected '+' or '-' at position {pos} of {spec!r}")
        coef = 1.0 + 0j
        coef_match = _COEF.match(text, pos)
        if coef_match:
            coef = _coefficient(coef_match, spec)
            pos = coef_match.end()
            while pos < len(text) and text[pos].isspace():
                pos += 1
        state = _STATE_HYBRID.match(text, pos)
        if state:
            from orbviz.states.hybrids import hybrid_terms

            n = int(state.group("n"))
            for l, m, weight in hybrid_terms(n, state.group("name").lower(), int(state.group("k"))):
                atoms.append(Atom(n, l, m, "real", sign * coef * weight))
            pos = state.end()
            while pos < len(text) and text[pos].isspace():
                pos += 1
            if pos >= len(text):
                return atoms
            continue
        state = _STATE_NLM.match(text, pos)
        if state:
            atom = Atom(
                _integer(state.group("n"), "n", spec),
                _integer(state.group("l"), "l", spec),
                _integer(state.group("m"), "m", spec),
                "complex",
                sign * coef,
            )
        else:
            state = _STATE_LABEL.match(text, pos)
            if not state:
                rest = text[pos : pos + 12] or "end of text"
                raise SpecError(
                    f"expected an orbital such as 2pz or 4,2,-1 at position {pos} of {spec!r} "
                    f"(found {rest!r})"
                )
            l, m = LABELS[state.group("label").lower()]
            atom = Atom(int(state.group("n")), l, m, "real", sign * coef)
        atoms.append(atom)
        pos = state.end()
        while pos < len(text) and text[pos].isspace():
            pos += 1
        if pos >= len(text):
            return atoms
