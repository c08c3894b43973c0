"""Configuration: ``[tool.padaudit]`` in ``pyproject.toml`` or ``padaudit.toml``,
found by walking up from the board, with command-line overrides on top.

>>> from auditor.config import Config
>>> Config().overlay.describe()
'2 mm acrylic (er 2.8)'
"""

from auditor.config.load import (
           VALID_KEYS,
           config_from_mapping,
           discover_config,
           find_config,
           load_config,
)
from auditor.config.model import Config, Overlay, Waiver
from auditor.config.overrides import parse_overlay_spec, with_overrides

# Kept under these names for the audit command until it takes the shared option builders.
from auditor.model.vocabulary import POWER_PRESETS as POWER_CHOICES
from auditor.model.vocabulary import TOUCH_SIDES

__all__ = ["POWER_CHOICES", "TOUCH_SIDES", "VALID_KEYS", "Config", "Overlay", "Waiver",
           "config_from_mapping", "discover_config", "find_config", "load_config",
           "parse_overlay_spec", "with_overrides"]
