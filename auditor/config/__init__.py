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

__all__ = ["VALID_KEYS", "Config", "Overlay", "Waiver",
           "config_from_mapping", "discover_config", "find_config", "load_config",
           "parse_overlay_spec", "with_overrides"]
