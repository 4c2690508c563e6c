"""The demo repository (docgen/demo_repo.py) seen through the history: the preamp's revisions
follow its rename, and the one approved design changed after its approval is flagged while the
other approved designs are not."""

from __future__ import annotations

import pytest

from docgen.demo_repo import make_demo_repo
from docgen.history.approval import changed_since_approval
from docgen.history.git import Repo
from docgen.history.revisions import list_revisions
from docgen.history.snapshot import snapshot


@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    root = make_demo_repo(tmp_path_factory.mktemp("demo") / "repo")
    return Repo(root)


def test_preamp_history_follows_its_rename(demo):
    current = snapshot(demo, None, "designs/hydrophone-preamp.md", "designs")
    listing = list_revisions(demo, "designs/hydrophone-preamp.md", current.uses)
    paths = [r.path for r in listing.revisions]
    assert paths[0] == "designs/hydrophone-preamp.md"
    assert paths[-1] == "designs/ce-preamp.md"  # its first cut, before the rename
    assert len(listing.revisions) >= 4
    dates = [r.commit.date for r in listing.revisions]
    assert dates == sorted(dates, reverse=True)


def test_only_the_design_changed_after_approval_is_flagged(demo):
    flagged = {}
    for path in sorted((demo.root / "designs").glob("*.md")):
        current = snapshot(demo, None, path.relative_to(demo.root).as_posix(), "designs")
        if current.design is not None and current.design.header.status == "approved":
            flagged[path.name] = changed_since_approval(demo, path, demo.root / "designs")
    assert len(flagged) >= 2
    preamp = flagged.pop("hydrophone-preamp.md")
    assert preamp is not None and preamp["sections"] == ["circuit"]
    assert any(line.startswith("CI re-valued") for line in preamp["changes"])
    assert all(info is None for info in flagged.values()), flagged
