"""Print ``docs/rules.md`` (``python -m auditor.cli.rules_doc > docs/rules.md``).

The text comes from :func:`auditor.rules.docs.rules_markdown`; writing it to
the terminal is the command line's job.
"""

from __future__ import annotations

import sys

from auditor.rules.docs import rules_markdown

if __name__ == "__main__":
    sys.stdout.write(rules_markdown())
