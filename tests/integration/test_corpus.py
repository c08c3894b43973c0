"""Optional: padaudit on the development corpus of real boards (../shared/corpus
beside the repository, not part of it) finds what a person reading each board
finds, as that folder's expected.json states. Skipped when the folder is absent.
"""

from __future__ import annotations

import collections
import io
import json
import shutil
from contextlib import redirect_stderr, redirect_stdout
from pathlib import Path
from typing import Any

import pytest

from auditor.cli.main import main

_ROOT = Path(__file__).resolve().parents[2]
#: ../shared/corpus beside the repository (or beside the folder of worktrees).
CORPUS = next((p for p in (_ROOT.parent / "shared" / "corpus",
                           _ROOT.parent.parent / "shared" / "corpus")
               if (p / "expected.json").is_file()), _ROOT.parent / "shared" / "corpus")
EXPECTED: dict[str, Any] = (
    {k: v for k, v in json.loads((CORPUS / "expected.json").read_text()).items()
     if not k.startswith("_")} if (CORPUS / "expected.json").is_file() else {})

pytestmark = pytest.mark.skipif(not EXPECTED, reason="no development corpus beside the repo")


@pytest.mark.parametrize("name", sorted(EXPECTED))
def test_board_reads_as_a_person_reads_it(name: str, tmp_path: Path) -> None:
    for ext in (".kicad_pcb", ".kicad_pro"):
        if (CORPUS / f"{name}{ext}").is_file():
            shutil.copy(CORPUS / f"{name}{ext}", tmp_path)
    (tmp_path / "padaudit.toml").write_text('profile = "default"\n', encoding="utf-8")
    out = io.StringIO()
    with redirect_stdout(out), redirect_stderr(io.StringIO()):
        main(["sensors", str(tmp_path / f"{name}.kicad_pcb"), "--json"])
    sensors = json.loads(out.getvalue())["sensors"]
    want = EXPECTED[name]
    kinds = collections.Counter(s["kind"] for s in sensors)
    assert want["min"] <= len(sensors) <= want["max"]
    assert want["kinds"] is None or set(kinds) <= set(want["kinds"])
    assert want["groups"] is None or len({s["group"] or s["name"] for s in sensors}) == \
        want["groups"]
    assert not set(want.get("not_kinds", [])) & set(kinds)
