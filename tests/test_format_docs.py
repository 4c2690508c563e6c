"""docs/format.md cannot drift: generated tables match the registries, examples read cleanly."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from docgen.neaten import neaten_text
from docgen.params import MODEL_KINDS
from docgen.reader import read_text
from docgen.reference import GENERATORS, tables

DOC = (Path(__file__).parent.parent / "docs" / "format.md").read_text(encoding="utf-8")


@pytest.mark.parametrize("name", sorted(GENERATORS))
def test_generated_tables_match_the_registries(name: str) -> None:
    # Regenerate with: python -m docgen.reference docs/format.md
    assert tables(DOC).get(name) == GENERATORS[name]()


def test_every_model_parameter_is_documented() -> None:
    body = tables(DOC)["model-parameters"]
    for specs in MODEL_KINDS.values():
        for name in specs:
            assert f"| `{name}` |" in body


def _example_page() -> str:
    return re.search(r"````markdown\n(.*?)````", DOC, re.S).group(1)


def test_complete_example_reads_and_is_neat() -> None:
    page = _example_page()
    design = read_text(page, "example.md")
    assert design.kind == "design" and design.warnings == ()
    assert neaten_text(page) == page


def test_block_examples_read_together() -> None:
    outside = DOC.replace(_example_page(), "")
    blocks = re.findall(r"^```(circuit|models|bench|require)\n(.*?)^```$", outside, re.S | re.M)
    assert sorted(tag for tag, _ in blocks) == ["bench", "circuit", "models", "require"]
    page = "---\ntitle: Examples\n---\n\n" + "\n".join(
        f"```{tag}\n{body}```\n" for tag, body in blocks)
    design = read_text(page, "examples.md")
    assert design.kind == "design" and len(design.requirements) == 4
