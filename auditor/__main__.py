"""``python -m auditor`` runs the command line."""

from auditor.cli.main import main

raise SystemExit(main())
