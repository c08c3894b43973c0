"""Name cues: what a net, net-class or part name says about its purpose.

Names are split into word-ish tokens (``TOUCH_KEY3`` → touch, key, 3;
``SliderSeg2`` → slider, seg, 2). Two kinds of cue words:

* **strong** words name a touch electrode on their own, and also count as a
  prefix of a token (``TOUCHPAD``, ``SENSE3``): touch, slider, wheel, prox,
  electrode, sense; also after a ``cap``/``c`` prefix for capacitive
  (``CSENSE0``, ``CTOUCH``);
* **weak** words are common abbreviations that also name other things (a
  mechanical ``BTN``, a test point ``TP``, an LED's ``CAP``); they count only
  as whole tokens, never inside KiCad's automatic names (``Net-(TP1-Pad1)``),
  and not when the name also holds a word for another function (``CAP_LED``,
  ``KEY_PWR``).

A name cue is never enough on its own: the net must also carry electrode-like
copper (see ``find``), so a mechanical ``BTN_UP`` switch net is not taken.
These word lists are our own judgement (common practice, no source).
"""

from __future__ import annotations

import re
from dataclasses import dataclass

STRONG_WORDS = ("touch", "slider", "wheel", "prox", "electrode", "sense")
#: Prefixes for "capacitive" that may stand before a strong word in one token.
CAPACITIVE_PREFIXES = ("cap", "c")
WEAK_WORDS = frozenset({"button", "btn", "key", "sld", "whl", "cap", "tp", "sns", "elec",
                        "pad", "tch", "sen", "cs"})
#: Words for another function that cancel a weak cue (``CAP_LED``).
OTHER_FUNCTION_WORDS = frozenset({
    "led", "pwr", "power", "vcc", "vdd", "vbat", "bat", "batt", "chg", "charge", "en",
    "rst", "reset", "boot", "gnd", "vss", "sw", "irq", "int", "scl", "sda", "clk", "pwm",
    "tx", "rx", "spi", "usb", "test", "dbg", "swd", "swdio", "swclk", "jtag",
})
SLIDER_WORDS = ("slider", "sld", "slide", "fader")
WHEEL_WORDS = ("wheel", "whl", "rotary", "scroll")
PROXIMITY_WORDS = ("prox", "proximity", "guard", "loop")

_TOKEN = re.compile(r"[A-Z]?[a-z]+|[A-Z]+(?![a-z])|\d+")
_GROUND = re.compile(r"^(A|D|P|S|CHASSIS_?)?(GND|GROUND|VSS|0V|EARTH)(\d*|_?[A-Z0-9]*)$")


@dataclass(frozen=True)
class NameCue:
    """The word that made a name look like an electrode."""

    word: str
    strong: bool


def leaf(name: str) -> str:
    """The last hierarchical component of a net name (``/a/B`` → ``B``)."""
    return name.rsplit("/", 1)[-1]


def tokens(name: str) -> tuple[str, ...]:
    """Lower-case word-ish tokens of a name.

    >>> tokens("/panel/TouchKey_3")
    ('panel', 'touch', 'key', '3')
    """
    return tuple(t.lower() for t in _TOKEN.findall(name))


def is_auto_name(net: str) -> bool:
    """KiCad's generated names: ``Net-(R1-Pad1)``, ``unconnected-(U1-PA3-Pad2)``."""
    text = leaf(net)
    return text.startswith(("Net-(", "unconnected-("))


def name_cue(name: str) -> NameCue | None:
    """The cue word in a net or part name, or ``None``.

    >>> name_cue("CAP_LED") is None
    True
    >>> name_cue("TOUCH3")
    NameCue(word='touch', strong=True)
    """
    toks = tokens(name)
    for tok in toks:
        stems = (tok, *(tok[len(p):] for p in CAPACITIVE_PREFIXES if tok.startswith(p)))
        for word in STRONG_WORDS:
            if any(stem.startswith(word) for stem in stems):
                return NameCue(word, True)
    if is_auto_name(name) or OTHER_FUNCTION_WORDS.intersection(toks):
        return None
    for tok in toks:
        if tok in WEAK_WORDS:
            return NameCue(tok, False)
    return None


def has_word(name: str, words: tuple[str, ...]) -> bool:
    """True when a token of ``name`` starts with one of ``words``, or holds one
    of five letters or more (``TOUCHROTARY``, ``TouchSlider3``).

    >>> has_word("TOUCHROTARY1B", ("rotary",)), has_word("SLDR", ("slider",))
    (True, False)
    """
    toks = tokens(name)
    return any(tok.startswith(w) or (len(w) >= 5 and w in tok) for tok in toks for w in words)


def is_ground_name(net: str) -> bool:
    """Ground-like net names: GND, AGND, GND_ISO, VSS, GROUND, 0V ...

    >>> [is_ground_name(n) for n in ("GND", "/p/AGND", "VSS", "GNDA", "VSENSE", "USBGND")]
    [True, True, True, True, False, True]
    """
    name = leaf(net).upper()
    # Returns named for their domain (USBGND, SHIELD_GND) are grounds too.
    return bool(_GROUND.match(name)) or (not is_auto_name(net) and "GND" in name)


def trailing_index(name: str) -> int | None:
    """The last number in a name (segment order), or ``None``.

    >>> trailing_index("SLD_SEG12"), trailing_index("WHEEL")
    (12, None)
    """
    digits = re.findall(r"\d+", leaf(name))
    return int(digits[-1]) if digits else None


def group_stem(name: str) -> str:
    """The name without its last number: segments of one slider share it.

    >>> group_stem("/ui/SLIDER_3"), group_stem("SLIDER_B")
    ('SLIDER', 'SLIDER')
    """
    text = leaf(name)
    if re.search(r"\d", text):
        stem = re.sub(r"[_\-.]?\d+(?!.*\d)", "", text, count=1)
    else:  # SLIDER_A, SLIDER_B: a one-letter suffix names the segment
        stem = re.sub(r"[_\-.][A-Za-z]$", "", text)
    return stem.rstrip("_-. ") or text
