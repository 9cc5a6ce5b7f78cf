"""How the words chemists write for methods and process kinds are read, and nuclei too.

A text is read in steps, each one a reading rather than a guess:

1. the whole text, folded to lowercase letters and digits, is a name or a known spelling
   (``EXSY``, ``ring flip``; a registry's stored aliases come in here, see :mod:`.vocab`);
2. otherwise its words are read. A qualifier in brackets (``lineshape (DNMR fit)``) is set
   aside; British spellings are folded (``racemisation``); words that say nothing about the
   term (``VT``, ``NMR``, ``analysis``) are dropped; two words written apart are read as one
   where that is a known word (``line shape``). Each known word narrows the candidates to the
   terms it can name: in ``chair-chair inversion`` *chair* names ring-inversion and
   *inversion* ring- or pyramidal-inversion, so together ring-inversion. Unknown words do
   not narrow. *Hints* (``DNMR``, a bare ``N``) narrow only where they leave a candidate;
3. when the main text leaves several candidates, or no known word, the bracketed qualifiers
   narrow in the same way; they never override what the main text says.

One candidate left is the reading. Several: the text is ambiguous and the candidates are the
suggestions. None: unknown, and the nearest spellings are suggested.
"""

from __future__ import annotations

import difflib
import re
from collections.abc import Iterable, Mapping
from dataclasses import dataclass

_SUPERSCRIPTS = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹", "0123456789")
_QUALIFIER = re.compile(r"[(\[{]([^()\[\]{}]*)[)\]}]")
#: a sigmatropic locant such as [1,5] or 1,5- (read as the word "locant")
_LOCANT = re.compile(r"\[?\b\d\s*,\s*\d\b\]?")


def fold(text: str) -> str:
    """The comparison key of a spelling: lowercase letters and digits only."""
    return re.sub(r"[^a-z0-9]", "", str(text).translate(_SUPERSCRIPTS).lower())


def _word_form(word: str) -> str:
    """British to American endings (racemisation → racemization, magnetisation …)."""
    for british, american in (("isations", "izations"), ("isation", "ization"), ("ised", "ized")):
        if word.endswith(british):
            return word[: -len(british)] + american
    return word


def split_qualifiers(text: str) -> tuple[str, list[str]]:
    """``lineshape (DNMR fit)`` → (``lineshape``, [``DNMR fit``])."""
    qualifiers = [m.strip() for m in _QUALIFIER.findall(text) if m.strip()]
    return _QUALIFIER.sub(" ", text).strip(), qualifiers


def words(text: str) -> list[str]:
    """The folded words of a text (η spelled out, a sigmatropic locant as ``locant``)."""
    text = _LOCANT.sub(" locant ", text.replace("η", " eta "))
    raw = re.split(r"[^a-z0-9]+", text.translate(_SUPERSCRIPTS).lower())
    return [_word_form(w) for w in raw if w]


@dataclass(frozen=True)
class Lexicon:
    """What one vocabulary knows: its names, whole spellings, words, hints and noise words."""

    what: str  # "method", "process kind": how messages name a term
    names: tuple[str, ...]
    #: folded whole text → name
    spellings: Mapping[str, str]
    #: folded word (or two words written together) → the names it can mean
    words: Mapping[str, frozenset[str]]
    #: like words, but narrowing only where a candidate is left
    hints: Mapping[str, frozenset[str]]
    noise: frozenset[str]

    def spelling_keys(self) -> list[str]:
        return [*self.spellings, *self.words, *self.hints, *(fold(n) for n in self.names)]


@dataclass(frozen=True)
class Reading:
    """How a text was read: the name (None when unknown or ambiguous) and how it was found."""

    text: str
    name: str | None
    how: str  # name | alias | spelling | words | "" (not read)
    candidates: tuple[str, ...] = ()  # ambiguous: the names it could be
    suggestions: tuple[str, ...] = ()

    def as_dict(self) -> dict[str, object]:
        return {
            "text": self.text,
            "reads_as": self.name,
            "how": self.how or None,
            "candidates": list(self.candidates),
            "suggestions": list(self.suggestions),
        }


def read(
    lexicon: Lexicon,
    text: str,
    *,
    extra_names: Iterable[str] = (),
    aliases: Mapping[str, str] | None = None,
) -> Reading:
    """Read ``text`` with ``lexicon`` (see the module docstring for the steps).

    ``extra_names`` are names beyond the lexicon's own (process kinds a registry added);
    ``aliases`` maps folded spellings to names (a registry's stored aliases), which win over
    the built-in spellings and words but never over a name.
    """
    names = _unique((*lexicon.names, *extra_names))
    key = fold(text)
    if not key:
        return Reading(text, None, "")
    for name in names:
        if key == fold(name):
            return Reading(text, name, "name")
    if aliases and key in aliases:
        return Reading(text, aliases[key], "alias")
    if key in lexicon.spellings:
        return Reading(text, lexicon.spellings[key], "spelling")
    main, qualifiers = split_qualifiers(text)
    found = _narrow(lexicon, words(main), names)
    if found is None or len(found) != 1:
        inner = _narrow(lexicon, [w for q in qualifiers for w in words(q)], names)
        if found is None:
            found = inner
        elif inner and found & inner:
            found = found & inner
    if found and len(found) == 1:
        return Reading(text, next(iter(found)), "words")
    if found:
        ordered = tuple(n for n in names if n in found)
        return Reading(text, None, "", ordered, ordered)
    return Reading(text, None, "", (), suggest(lexicon, text, names))


def _narrow(lexicon: Lexicon, tokens: list[str], names: tuple[str, ...]) -> set[str] | None:
    """The names the known words of ``tokens`` leave (None: no known word at all)."""
    strong: list[frozenset[str]] = []
    hints: list[frozenset[str]] = []
    i = 0
    while i < len(tokens):
        pair = tokens[i] + tokens[i + 1] if i + 1 < len(tokens) else ""
        if pair and (pair in lexicon.words or pair in lexicon.hints):
            (strong if pair in lexicon.words else hints).append(
                lexicon.words.get(pair) or lexicon.hints[pair]
            )
            i += 2
            continue
        word = _known(lexicon, tokens[i])
        if word in lexicon.words:
            strong.append(lexicon.words[word])
        elif word in lexicon.hints:
            hints.append(lexicon.hints[word])
        i += 1
    if not strong and not hints:
        return None
    left = set(names)
    for meaning in strong:
        left &= meaning
    for meaning in hints:
        if left & meaning:
            left &= meaning
    if not left and strong:  # the words contradict each other: every name they named
        return {n for m in strong for n in m if n in names} or set()
    return left if left != set(names) else None


def _known(lexicon: Lexicon, word: str) -> str:
    """The word as the lexicon knows it (a plural's singular), or as given."""
    if word in lexicon.words or word in lexicon.hints or word in lexicon.noise:
        return word
    for cut in ("es", "s"):
        stem = word.removesuffix(cut)
        if stem != word and (stem in lexicon.words or stem in lexicon.hints):
            return stem
    return word


def suggest(lexicon: Lexicon, text: str, names: tuple[str, ...], limit: int = 3) -> tuple[str, ...]:
    """Names whose spellings are nearest ``text`` or one of its words (typos, run-together)."""
    keys = lexicon.spelling_keys()
    out: list[str] = []
    for probe in (fold(text), *words(text)):
        if len(probe) < 3 or probe in lexicon.noise:
            continue
        for close in difflib.get_close_matches(probe, keys, n=limit, cutoff=0.75):
            out.extend(sorted(_meanings(lexicon, close, names)))
    return tuple(_unique(out))[:limit]


def _meanings(lexicon: Lexicon, key: str, names: tuple[str, ...]) -> set[str]:
    for name in names:
        if fold(name) == key:
            return {name}
    if key in lexicon.spellings:
        return {lexicon.spellings[key]}
    return set(lexicon.words.get(key) or lexicon.hints.get(key) or ())


def _unique(items: Iterable[str]) -> tuple[str, ...]:
    return tuple(dict.fromkeys(items))


def close_spellings(
    text: str, spellings: Mapping[str, str], limit: int = 3, cutoff: float = 0.8
) -> list[str]:
    """What ``spellings`` (folded spelling → what it names) names nearest ``text``.

    Digits typed for look-alike letters are tried first (``CDC13`` → ``CDCl3``, ``D20`` →
    ``D2O``), then close spellings.
    """
    key = fold(text)
    if not key:
        return []
    out: list[str] = []
    swaps = (("1", "l"), ("0", "o"), ("l", "1"), ("o", "0"))
    for a, b in swaps:
        variant = key.replace(a, b)
        if variant != key and variant in spellings:
            out.append(spellings[variant])
    out.extend(
        spellings[k]
        for k in difflib.get_close_matches(key, list(spellings), n=limit, cutoff=cutoff)
    )
    return list(_unique(out))[:limit]


# ---------------------------------------------------------------- nuclei

#: element symbols (the periodic table)
_SYMBOLS = (
    "H He Li Be B C N O F Ne Na Mg Al Si P S Cl Ar K Ca Sc Ti V Cr Mn Fe Co Ni Cu Zn Ga Ge As Se "
    "Br Kr Rb Sr Y Zr Nb Mo Tc Ru Rh Pd Ag Cd In Sn Sb Te I Xe Cs Ba La Ce Pr Nd Pm Sm Eu Gd Tb Dy "
    "Ho Er Tm Yb Lu Hf Ta W Re Os Ir Pt Au Hg Tl Pb Bi Po At Rn Fr Ra Ac Th Pa U Np Pu Am Cm Bk Cf "
    "Es Fm Md No Lr Rf Db Sg Bh Hs Mt Ds Rg Cn Nh Fl Mc Lv Ts Og"
)
ELEMENTS = frozenset(_SYMBOLS.split())
_BY_LOWER = {s.lower(): s for s in ELEMENTS}

#: the isotope usually observed when a sheet names only the element (common practice, no source)
USUAL_ISOTOPE: dict[str, str] = {
    "H": "1H", "D": "2H", "C": "13C", "N": "15N", "O": "17O", "F": "19F", "P": "31P",
    "Si": "29Si", "B": "11B", "Li": "7Li", "Al": "27Al", "Se": "77Se", "Rh": "103Rh",
    "Cd": "113Cd", "Sn": "119Sn", "Pt": "195Pt", "Hg": "199Hg",
}  # fmt: skip

#: element (and nucleus) names as words
_NUCLEUS_NAMES: dict[str, str] = {
    "proton": "1H", "protons": "1H", "hydrogen": "H", "deuterium": "2H", "deuteron": "2H",
    "tritium": "3H", "carbon": "C", "nitrogen": "N", "oxygen": "O", "fluorine": "F",
    "phosphorus": "P", "silicon": "Si", "boron": "B", "lithium": "Li", "aluminium": "Al",
    "aluminum": "Al", "selenium": "Se", "rhodium": "Rh", "cadmium": "Cd", "tin": "Sn",
    "platinum": "Pt", "mercury": "Hg",
}  # fmt: skip


def read_nucleus(text: str) -> str | None:
    """``1H``, ``H-1``, ``¹³C``, ``19f``, ``P31``, ``13C{1H}``, ``carbon-13``, ``proton``, a bare
    ``C`` (its usual isotope) → ``1H``, ``13C`` …; None when it is not a nucleus."""
    t = str(text).translate(_SUPERSCRIPTS).strip()
    t = re.sub(r"\{[^}]*\}", "", t)  # 13C{1H}: the decoupled nucleus is not the observed one
    t = re.sub(r"(?i)[\s-]*nmr\b", "", t).strip()
    compact = re.sub(r"[\s_-]", "", t)
    m = re.fullmatch(r"(\d{1,3})([A-Za-z]{1,2})", compact) or re.fullmatch(
        r"([A-Za-z]{1,2})(\d{1,3})", compact
    )
    if m:
        a, b = m.groups()
        mass, sym = (a, b) if a.isdigit() else (b, a)
        element = _BY_LOWER.get(sym.lower())
        if element and 0 < int(mass) <= 300:
            return f"{int(mass)}{element}"
        return None
    m = re.fullmatch(r"([A-Za-z]+)[\s-]*(\d{1,3})?", t)
    if not m:
        return None
    word, mass = m[1].lower(), m[2]
    named = _NUCLEUS_NAMES.get(word)
    if named and named[0].isdigit():  # "proton", "deuterium": a nucleus already
        return named if mass is None else None
    element = named or ("D" if word == "d" else _BY_LOWER.get(word))
    if element is None:
        return None
    if mass is not None:
        return f"{int(mass)}{'H' if element == 'D' else element}" if 0 < int(mass) <= 300 else None
    return USUAL_ISOTOPE.get(element)


def nucleus_spellings() -> dict[str, str]:
    """Folded spellings → nucleus, for suggestions (the usual isotopes and the names)."""
    out = {fold(v): v for v in USUAL_ISOTOPE.values()}
    for name in _NUCLEUS_NAMES:
        nucleus = read_nucleus(name)
        if nucleus:
            out[name] = nucleus
    return out
