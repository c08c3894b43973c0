"""``padaudit rules [ID]``: list the rules, or explain one."""

from __future__ import annotations

import argparse
import sys

from auditor.cli.wrap import write_lines
from auditor.config.overrides import profile_option
from auditor.errors import UsageError
from auditor.report.rules_md import rule_text
from auditor.rules.registry import all_rules


def register(subparsers: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    """Add the ``rules`` sub-command."""
    parser = subparsers.add_parser(
        "rules", help="list the layout rules, or explain one",
        description="Without an id: every rule with its severity and title. With an id: "
                    "its rationale, fix advice and thresholds with their origin.")
    parser.add_argument("rule_id", nargs="?", metavar="ID", help="a rule id")
    parser.add_argument("--profile", metavar="NAME", default="default",
                        help="profile whose levels and thresholds to show (default: default)")


def run(args: argparse.Namespace) -> int:
    """Print the catalogue or one rule."""
    profile = profile_option(args.profile)
    specs = {spec.rule_id: spec for spec in all_rules()}
    if args.rule_id is None:
        width = max(len(k) for k in specs)
        write_lines(sys.stdout, [f"{rule_id:<{width}}  "
                                 f"{profile.level_of(rule_id) or spec.severity.label:<7}  "
                                 f"{spec.title}" for rule_id, spec in specs.items()])
        return 0
    if args.rule_id not in specs:
        raise UsageError(f"unknown rule {args.rule_id!r}; `padaudit rules` lists them")
    write_lines(sys.stdout, rule_text(specs[args.rule_id], profile).splitlines())
    return 0
