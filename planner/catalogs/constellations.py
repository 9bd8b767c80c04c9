"""The 88 IAU constellations and the 24 Greek letters, as observers write them.

* :data:`CONSTELLATIONS` -- (abbreviation, nominative, genitive) for all 88
  constellations.  Abbreviations and nominatives are the IAU list (the same
  list ships with astropy as ``coordinates/data/constellation_names.dat``; a
  test checks the two agree); the Latin genitives are the IAU forms, from
  memory (e.g. Sky & Telescope / IAU constellation table), checked by eye.
* :data:`GREEK` -- (key, full name, letter, other abbreviations): ``key`` is
  the three-letter abbreviation of the IAU Catalog of Star Names (``alf``,
  ``tet``, ``ksi``); the Yale Bright Star Catalogue writes ``Alp``, ``The``,
  ``Xi``; both, the full English name and the Greek letter are accepted.

Look-ups are case-, space- and diacritic-insensitive (:func:`fold`).
"""

from __future__ import annotations

import re
import unicodedata

CONSTELLATIONS: tuple[tuple[str, str, str], ...] = (
    ("And", "Andromeda", "Andromedae"), ("Ant", "Antlia", "Antliae"), ("Aps", "Apus", "Apodis"),
    ("Aqr", "Aquarius", "Aquarii"), ("Aql", "Aquila", "Aquilae"), ("Ara", "Ara", "Arae"),
    ("Ari", "Aries", "Arietis"), ("Aur", "Auriga", "Aurigae"), ("Boo", "Boötes", "Boötis"),
    ("Cae", "Caelum", "Caeli"), ("Cam", "Camelopardalis", "Camelopardalis"),
    ("Cnc", "Cancer", "Cancri"), ("CVn", "Canes Venatici", "Canum Venaticorum"),
    ("CMa", "Canis Major", "Canis Majoris"), ("CMi", "Canis Minor", "Canis Minoris"),
    ("Cap", "Capricornus", "Capricorni"), ("Car", "Carina", "Carinae"),
    ("Cas", "Cassiopeia", "Cassiopeiae"), ("Cen", "Centaurus", "Centauri"),
    ("Cep", "Cepheus", "Cephei"), ("Cet", "Cetus", "Ceti"), ("Cha", "Chamaeleon", "Chamaeleontis"),
    ("Cir", "Circinus", "Circini"), ("Col", "Columba", "Columbae"),
    ("Com", "Coma Berenices", "Comae Berenices"), ("CrA", "Corona Australis", "Coronae Australis"),
    ("CrB", "Corona Borealis", "Coronae Borealis"), ("Crv", "Corvus", "Corvi"),
    ("Crt", "Crater", "Crateris"), ("Cru", "Crux", "Crucis"), ("Cyg", "Cygnus", "Cygni"),
    ("Del", "Delphinus", "Delphini"), ("Dor", "Dorado", "Doradus"), ("Dra", "Draco", "Draconis"),
    ("Equ", "Equuleus", "Equulei"), ("Eri", "Eridanus", "Eridani"), ("For", "Fornax", "Fornacis"),
    ("Gem", "Gemini", "Geminorum"), ("Gru", "Grus", "Gruis"), ("Her", "Hercules", "Herculis"),
    ("Hor", "Horologium", "Horologii"), ("Hya", "Hydra", "Hydrae"), ("Hyi", "Hydrus", "Hydri"),
    ("Ind", "Indus", "Indi"), ("Lac", "Lacerta", "Lacertae"), ("Leo", "Leo", "Leonis"),
    ("LMi", "Leo Minor", "Leonis Minoris"), ("Lep", "Lepus", "Leporis"), ("Lib", "Libra", "Librae"),
    ("Lup", "Lupus", "Lupi"), ("Lyn", "Lynx", "Lyncis"), ("Lyr", "Lyra", "Lyrae"),
    ("Men", "Mensa", "Mensae"), ("Mic", "Microscopium", "Microscopii"),
    ("Mon", "Monoceros", "Monocerotis"), ("Mus", "Musca", "Muscae"), ("Nor", "Norma", "Normae"),
    ("Oct", "Octans", "Octantis"), ("Oph", "Ophiuchus", "Ophiuchi"), ("Ori", "Orion", "Orionis"),
    ("Pav", "Pavo", "Pavonis"), ("Peg", "Pegasus", "Pegasi"), ("Per", "Perseus", "Persei"),
    ("Phe", "Phoenix", "Phoenicis"), ("Pic", "Pictor", "Pictoris"), ("Psc", "Pisces", "Piscium"),
    ("PsA", "Piscis Austrinus", "Piscis Austrini"), ("Pup", "Puppis", "Puppis"),
    ("Pyx", "Pyxis", "Pyxidis"), ("Ret", "Reticulum", "Reticuli"), ("Sge", "Sagitta", "Sagittae"),
    ("Sgr", "Sagittarius", "Sagittarii"), ("Sco", "Scorpius", "Scorpii"),
    ("Scl", "Sculptor", "Sculptoris"), ("Sct", "Scutum", "Scuti"), ("Ser", "Serpens", "Serpentis"),
    ("Sex", "Sextans", "Sextantis"), ("Tau", "Taurus", "Tauri"),
    ("Tel", "Telescopium", "Telescopii"), ("Tri", "Triangulum", "Trianguli"),
    ("TrA", "Triangulum Australe", "Trianguli Australis"), ("Tuc", "Tucana", "Tucanae"),
    ("UMa", "Ursa Major", "Ursae Majoris"), ("UMi", "Ursa Minor", "Ursae Minoris"),
    ("Vel", "Vela", "Velorum"), ("Vir", "Virgo", "Virginis"), ("Vol", "Volans", "Volantis"),
    ("Vul", "Vulpecula", "Vulpeculae"),
)

#: (key, full name, Greek letter, other spellings)
GREEK: tuple[tuple[str, str, str, tuple[str, ...]], ...] = (
    ("alf", "alpha", "α", ("alp",)), ("bet", "beta", "β", ()),
    ("gam", "gamma", "γ", ()), ("del", "delta", "δ", ()),
    ("eps", "epsilon", "ε", ()), ("zet", "zeta", "ζ", ()),
    ("eta", "eta", "η", ()), ("tet", "theta", "θ", ("the",)),
    ("iot", "iota", "ι", ()), ("kap", "kappa", "κ", ()),
    ("lam", "lambda", "λ", ("lmd",)), ("mu", "mu", "μ", ()),
    ("nu", "nu", "ν", ()), ("ksi", "xi", "ξ", ()),
    ("omi", "omicron", "ο", ()), ("pi", "pi", "π", ()),
    ("rho", "rho", "ρ", ()), ("sig", "sigma", "σ", ()),
    ("tau", "tau", "τ", ()), ("ups", "upsilon", "υ", ()),
    ("phi", "phi", "φ", ()), ("chi", "chi", "χ", ("khi",)),
    ("psi", "psi", "ψ", ()), ("ome", "omega", "ω", ()),
)

_SUPERSCRIPTS = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹", "0123456789")
_SUPERSCRIPT_OF = dict(zip("0123456789", "⁰¹²³⁴⁵⁶⁷⁸⁹"))


def fold(text: str) -> str:
    """Lower case, no diacritics, superscript digits as digits, Greek letters kept,
    and only letters and digits (blanks, hyphens, dots, apostrophes dropped)."""
    s = str(text).translate(_SUPERSCRIPTS)
    s = s.replace("ς", "σ").replace("ϑ", "θ").replace("ϕ", "φ").replace("µ", "μ")
    s = unicodedata.normalize("NFKD", s)
    s = "".join(ch for ch in s if not unicodedata.combining(ch))
    return re.sub(r"[\W_]+", "", s.casefold())


def _const_table() -> dict[str, str]:
    out: dict[str, str] = {}
    for abbr, nom, gen in CONSTELLATIONS:
        for form in (abbr, nom, gen):
            out[fold(form)] = abbr
    return out


def _greek_table() -> dict[str, str]:
    out: dict[str, str] = {}
    for key, name, letter, others in GREEK:
        for form in (key, name, letter) + others:
            out.setdefault(fold(form), key)
    return out


#: folded abbreviation / nominative / genitive -> IAU abbreviation
CONSTELLATION_KEYS: dict[str, str] = _const_table()
#: folded Greek spelling -> key
GREEK_KEYS: dict[str, str] = _greek_table()
GREEK_LETTER: dict[str, str] = {k: letter for k, _, letter, _ in GREEK}
ABBREVIATIONS: frozenset[str] = frozenset(a for a, _, _ in CONSTELLATIONS)
_ABBR_BY_FOLD = {fold(a): a for a in ABBREVIATIONS}


def constellation(text: str) -> str | None:
    """The IAU abbreviation for an abbreviation or a Latin name (nominative or genitive)."""
    return CONSTELLATION_KEYS.get(fold(text))


def abbreviation(text: str) -> str | None:
    """The canonical spelling of a three-letter abbreviation given in any case."""
    return _ABBR_BY_FOLD.get(fold(text))


def superscript(digits: str) -> str:
    """'1' -> '¹'."""
    return "".join(_SUPERSCRIPT_OF.get(c, c) for c in str(digits))
