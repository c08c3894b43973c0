"""Print ``docs/rules.md`` (``python -m auditor.cli.rules_doc > docs/rules.md``).

The text comes from :func:`auditor.report.rules_md.rules_markdown`; writing it to
the terminal is the command line's job.
"""

from __future__ import annotations

import sys

from auditor.report.rules_md import rules_markdown

if __name__ == "__main__":
    sys.stdout.write(rules_markdown())
