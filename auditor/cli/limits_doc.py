"""Rewrite the generated table of keys, units and ranges in a document
(``python -m auditor.cli.limits_doc docs/configuration.md``).

The text comes from :func:`auditor.config.limits_doc.limits_markdown`; reading
arguments and writing the file is the command line's job.
"""

from __future__ import annotations

import sys
from pathlib import Path

from auditor.config.limits_doc import with_limits_table

if __name__ == "__main__":
    for name in sys.argv[1:]:
        path = Path(name)
        path.write_text(with_limits_table(path.read_text(encoding="utf-8")), encoding="utf-8")
