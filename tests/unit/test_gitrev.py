"""Boards at a git revision or in the index, in a temporary repository."""

from __future__ import annotations

from pathlib import Path, PurePosixPath

import pytest
from gitrepo import commit_file, git, new_repo

from auditor.errors import UsageError
from auditor.gitrev import board_at, check_revision, companions, staged_boards


@pytest.fixture
def repo(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    monkeypatch.setenv("GIT_CONFIG_GLOBAL", "/dev/null")
    repo = new_repo(tmp_path / "repo")
    commit_file(repo, "padaudit.toml", "# config v1\n")
    commit_file(repo, "hw/panel.kicad_pro", "{}\n")
    commit_file(repo, "hw/panel.kicad_pcb", "board v1\n", "first")
    commit_file(repo, "hw/panel.kicad_pcb", "board v2\n", "second")
    (repo / "hw/panel.kicad_pcb").write_text("board v3 staged\n")
    git(repo, "add", "hw/panel.kicad_pcb")
    (repo / "hw/panel.kicad_pcb").write_text("board v4 only on disk\n")
    (repo / "padaudit.toml").write_text("# config edited, not staged\n")
    return repo


def test_board_at_a_revision_brings_its_project_and_config(repo: Path) -> None:
    with board_at(repo / "hw/panel.kicad_pcb", "HEAD~1") as copy:
        assert copy.read_text() == "board v1\n"
        assert copy.name == "panel.kicad_pcb"
        assert (copy.parent / "panel.kicad_pro").read_text() == "{}\n"
        assert (copy.parent.parent / "padaudit.toml").read_text() == "# config v1\n"
        kept = copy
    assert not kept.exists()  # the temporary copy is gone afterwards
    assert (repo / "hw/panel.kicad_pcb").read_text() == "board v4 only on disk\n"


def test_staged_version(repo: Path) -> None:
    with board_at(repo / "hw/panel.kicad_pcb", "") as copy:
        assert copy.read_text() == "board v3 staged\n"
        assert (copy.parent.parent / "padaudit.toml").read_text() == "# config v1\n"
    assert staged_boards(repo) == (PurePosixPath("hw/panel.kicad_pcb"),)


def test_missing_board_and_bad_revisions(repo: Path) -> None:
    with pytest.raises(UsageError, match="not found at revision HEAD~1"), \
            board_at(repo / "hw/other.kicad_pcb", "HEAD~1"):
        pass
    with pytest.raises(UsageError, match="not found at revision"), \
            board_at(repo / "hw/panel.kicad_pcb", "no-such-branch"):
        pass
    for rev in ("--output=/tmp/x", "HEAD:x", "a b", ""):
        with pytest.raises(UsageError, match="not a usable git revision"):
            check_revision(rev)


def test_outside_a_repository(tmp_path: Path) -> None:
    (tmp_path / "loose.kicad_pcb").write_text("x")
    with pytest.raises(UsageError, match="git rev-parse"), \
            board_at(tmp_path / "loose.kicad_pcb", "HEAD"):
        pass


def test_companions_walk_up_to_the_root() -> None:
    names = [str(p) for p in companions(PurePosixPath("a/b/x.kicad_pcb"))]
    assert names[0] == "a/b/x.kicad_pro"
    assert "a/b/padaudit.toml" in names and "a/pyproject.toml" in names
    assert names[-1] == "pyproject.toml"
