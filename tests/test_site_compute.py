"""A design whose schematic is drawn by a forked helper while the figures are plotted
(docgen/site/compute.py) gives the very bundle it gives alone: same sections in page order,
same figures byte for byte, same schematic."""

from __future__ import annotations

import json
import sys
from pathlib import Path

import pytest
from site_helpers import FIXTURES

from docgen.site.compute import compute_bundle
from docgen.site.record_view import read_record


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="the helper is forked")
def test_a_helper_process_changes_nothing_in_the_bundle() -> None:
    view = read_record(Path(FIXTURES))
    design = view.entries["rc-filter.md"].design
    assert design is not None
    alone = compute_bundle(design, view.models_for(design))
    helped = compute_bundle(design, view.models_for(design), helper=True)
    assert [s["title"] for s in alone["sections"]][:2] == ["Operating point",
                                                           "Frequency response"]
    assert alone["schematic"] and alone["schematic_with_op"]
    assert json.dumps(helped, sort_keys=True) == json.dumps(alone, sort_keys=True)
