"""Makes the shared test helpers importable (tests/support: the invented
sample report, a throw-away git repository)."""

from __future__ import annotations

import sys
from pathlib import Path

_SUPPORT = str(Path(__file__).resolve().parent / "support")
if _SUPPORT not in sys.path:
    sys.path.insert(0, _SUPPORT)
