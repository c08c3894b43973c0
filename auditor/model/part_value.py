"""Reading a part's value field: ``22pF``, ``470p``, ``0.1u``, ``1n0``, ``4u7``,
``100nF/50V``, ``4K7``, ``R47``, ``560``.

The letter-and-digit code of IEC 60062 (*Marking codes for resistors and
capacitors*): a multiplier letter may stand in the place of the decimal
point (``4u7`` = 4.7 µF, ``1n0`` = 1.0 nF, ``4K7`` = 4.7 kΩ, ``R47`` =
0.47 Ω). Capacitance letters p, n, µ (written ``u`` as well), m; resistance
letters R (unit), K, M, G. Whatever follows the value (``/50V``, ``5%``,
``C0G``, a package size) is ignored: the first word that reads as a value
wins. A capacitance needs a multiplier letter or an ``F``: a bare ``22`` on
a capacitor could be picofarads or a three-digit code, so it is not guessed.
"""

from __future__ import annotations

import math
import re

_CAP_MULTIPLIER = {"p": 1.0, "n": 1e3, "u": 1e6, "µ": 1e6, "μ": 1e6, "m": 1e9}  # -> pF
_RES_MULTIPLIER = {"r": 1.0, "Ω": 1.0, "k": 1e3, "M": 1e6, "G": 1e9}

_CAPACITANCE = re.compile(
    r"^(?P<whole>\d*)(?:[.,](?P<frac>\d+))?(?P<mult>[pnuµμm])?(?P<tail>\d+)?(?P<unit>f)?$",
    re.IGNORECASE)
_RESISTANCE = re.compile(
    r"^(?P<whole>\d*)(?:[.,](?P<frac>\d+))?(?P<mult>[rRkKMGΩ])?(?P<tail>\d+)?"
    r"(?P<unit>Ω|ohms?|[rR])?$")
_SPACE_BEFORE_UNIT = re.compile(r"(\d)\s+(?=[pnuµμmkKMGRrΩ]|ohm|F\b)", re.IGNORECASE)
_WORD_BREAK = re.compile(r"[\s/;_]+")


def _words(text: str) -> list[str]:
    joined = _SPACE_BEFORE_UNIT.sub(r"\1", text.strip())
    return [w for w in _WORD_BREAK.split(joined) if w]


def _number(whole: str, frac: str | None, tail: str | None) -> float | None:
    if frac is not None and tail is not None:
        return None  # 4.7u7 is no value
    digits = frac if frac is not None else tail
    text = (whole or "0") + ("." + digits if digits else "")
    value = float(text) if whole or digits else None
    return value if value is not None and math.isfinite(value) else None


def capacitance_pf(text: str) -> float | None:
    """The capacitance a value field states, in pF, or None when it states none.

    Examples
    --------
    >>> [capacitance_pf(v) for v in ("22pF", "470p", "0.1u", "1n0", "4u7", "100nF/50V")]
    [22.0, 470.0, 100000.0, 1000.0, 4700000.0, 100000.0]
    >>> capacitance_pf("22") is None  # no unit: pF or a three-digit code?
    True
    """
    for word in _words(text):
        found = _CAPACITANCE.match(word)
        if found is None or not (found["mult"] or found["unit"]):
            continue
        if found["tail"] is not None and not found["mult"]:
            continue
        value = _number(found["whole"], found["frac"], found["tail"])
        if value is not None:
            scale = _CAP_MULTIPLIER[found["mult"].lower()] if found["mult"] else 1e12
            return value * scale
    return None


def resistance_ohm(text: str) -> float | None:
    """The resistance a value field states, in Ω (a bare number is ohms).

    Examples
    --------
    >>> [resistance_ohm(v) for v in ("560", "4K7", "R47", "10k", "1M", "33R")]
    [560.0, 4700.0, 0.47, 10000.0, 1000000.0, 33.0]
    """
    for word in _words(text):
        found = _RESISTANCE.match(word)
        if found is None or (found["tail"] is not None and not found["mult"]):
            continue
        if found["mult"] and found["unit"] and found["mult"].lower() in ("r", "ω"):
            continue  # "5RΩ"
        value = _number(found["whole"], found["frac"], found["tail"])
        if value is not None:
            mult = found["mult"] or ""
            key = mult.lower() if mult.lower() in ("r", "k") else mult
            return value * _RES_MULTIPLIER.get(key, 1.0)
    return None
