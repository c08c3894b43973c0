"""Which nets carry fast edges near a sense trace: by name and by driver.

A net is noisy when

* its name matches the configured noisy-net globs (``SensorSelection.noisy_nets``)
  or holds a word for a clock, PWM or audio signal (:data:`NOISY_WORDS`), or
* one of its pads is driven by such a source: a pin whose own name is such a
  word (``MCLK``, ``PWM1``, ``CLKOUT``), or a crystal, oscillator, buzzer or
  speaker part.

Never noisy, whatever the name: driven shields and guards, power rails (``+5V``, ``VCC``, ``+VLED``: a
rail is held by its decoupling and carries no edges of its own), nets KiCad
named ``unconnected-(...)`` (one pad, nothing drives them) and ground. Sense
nets are never noisy either; the sensor stage marks them afterwards, since
only then are all electrodes known. These word lists are our own judgement
(common practice, no source).
"""

from __future__ import annotations

import re

from auditor.model.board import Board
from auditor.model.items import Footprint
from auditor.sensors.cues import is_ground_name, leaf, tokens
from auditor.sensors.selection import SensorSelection, matches

#: Words (whole tokens or token prefixes) of clock, PWM and audio signals.
NOISY_WORDS = ("pwm", "clk", "sck", "bclk", "lrclk", "lrck", "mclk", "i2s", "pdm", "spk",
               "speaker", "audio", "buzz", "xtal", "osc")
#: Reference prefixes and library/value words of parts that drive a clock or audio.
SOURCE_PREFIXES = ("Y", "LS", "BZ")
_SOURCE_WORDS = re.compile(r"crystal|oscillator|xtal|resonator|buzzer|speaker",
                           re.IGNORECASE)
_RAIL = re.compile(r"^([+-]|(A|D|P)?V(CC|DD|BUS|BAT|IN|SYS|IO|LED|REF|MOT)|\d+V\d*$|V\d+V?\d*$)")


#: Words of a driven shield or guard net (our own judgement, no source).
SHIELD_WORDS = ("shield", "shld", "guard", "drvshield")


def is_shield_net(net: str) -> bool:
    """A driven shield or guard (``ACShield``, ``/p/GUARD``): it carries the
    sense waveform itself, so copper of it beside or under an electrode is
    there by design and adds no baseline (common practice, no source).

    >>> [is_shield_net(n) for n in ("ACShield", "/p/GUARD_1", "SHIELD_GND", "TOUCH1")]
    [True, True, False, False]
    """
    return not is_ground_name(net) and not any(
        tok == "gnd" for tok in tokens(leaf(net))) and any(
        tok.startswith(word) for tok in tokens(leaf(net)) for word in SHIELD_WORDS)


def is_power_rail(net: str) -> bool:
    """Supply-rail names: ``+3V3``, ``VCC``, ``/p/+VLED``, ``VBUS``, ``5V``.

    >>> [is_power_rail(n) for n in ("+3V3", "/p/+VLED", "VDD_IO", "VSYNC", "LED_PWM")]
    [True, True, True, False, False]
    """
    return bool(_RAIL.match(leaf(net).upper()))


def _has_noisy_word(name: str) -> bool:
    return any(tok.startswith(word) for tok in tokens(name) for word in NOISY_WORDS)


def noisy_by_name(net: str, selection: SensorSelection) -> bool:
    """Noisy by its name alone (see module docs)."""
    if not net or is_power_rail(net) or is_ground_name(net) or is_shield_net(net) \
            or leaf(net).startswith("unconnected-("):
        return False
    return matches(net, selection.noisy_nets) or _has_noisy_word(leaf(net))


def noisy_by_driver(board: Board, net: str) -> bool:
    """Noisy because a clock, PWM or audio source drives it (see module docs)."""
    if not net or is_power_rail(net) or is_ground_name(net):
        return False
    return net in driven_nets(board)


_DRIVEN: dict[int, tuple[Board, frozenset[str]]] = {}


def driven_nets(board: Board) -> frozenset[str]:
    """Nets with a pad of a clock, PWM or audio source (computed once per board)."""
    hit = _DRIVEN.get(id(board))
    if hit is not None and hit[0] is board:
        return hit[1]
    found = set()
    for fp in board.footprints:
        source = is_clock_or_audio_source(fp)
        for pad in fp.pads:
            pin = pad.pin_function
            dedicated = bool(pin) and "/" not in pin and _has_noisy_word(pin)
            if pad.net and (source or dedicated):
                found.add(pad.net)
    if len(_DRIVEN) > 16:
        _DRIVEN.clear()
    _DRIVEN[id(board)] = (board, frozenset(found))
    return frozenset(found)


def is_clock_or_audio_source(fp: Footprint) -> bool:
    """Crystals, oscillators, buzzers and speakers, by prefix or words."""
    prefix = re.match(r"^[A-Za-z]+", fp.ref)
    if prefix and prefix.group(0).upper() in SOURCE_PREFIXES:
        return True
    return bool(_SOURCE_WORDS.search(fp.value) or _SOURCE_WORDS.search(fp.lib_id))


def is_noisy_net(board: Board, net: str, selection: SensorSelection) -> bool:
    """Noisy by name or by driver."""
    return noisy_by_name(net, selection) or noisy_by_driver(board, net)
