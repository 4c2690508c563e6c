"""The bundle cache key (docgen/cachekey.py: design_key): what it covers and what it leaves out.

A design's results, figures and schematic are cached under a key made from what the solve,
check, plot and draw stages read, so an edit of the notes reuses them.  Each case below is an
edit of a design text; the expectation follows from which stage reads the edited text (notes
are rendered at publish time; every other line reaches the results, a diagnostic or a figure).
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from docgen.cachekey import SOLVE_BLOCK_TAGS, design_key
from docgen.reader import read_text
from docgen.record import load_texts

LIBRARY = """---
title: Parts on the shelf
---

Our stock transistor.

```models
shelf-npn   npn   beta=200 (120..300) early_voltage=80
```
"""

DESIGN = """---
title: Key test stage
status: draft
owner: Ada Quill
summary: A common-emitter stage for the key tests.
---

# Key test stage

Why it is built this way: a paragraph of notes.

```circuit
VA   supply     12 V                 : vcc gnd
VS   signal     10 mV 1 kHz          : in gnd
CI   capacitor  1u 10%               : in b1
R1   resistor   82k 1%               : vcc b1
R2   resistor   22k 1%               : b1 gnd
Q1   npn        shelf-npn            : c=c1 b=b1 e=e1
Q2   npn        own-npn              : c=vcc b=c1 e=out
RC   resistor   4k7 1%               : vcc c1
RE   resistor   1k 1%                : e1 gnd
RO   resistor   10k 1%               : out gnd
```

```models
own-npn   npn   beta=150
```

```bench
input    VS
output   out
```

```estimate
Q1 collector current ≈ (VA*R2/(R1 + R2) - 0.65V)/RE
```

```layout
Q2 right-of Q1
```

```require
gain at 1 kHz : > 10 dB
```

## More notes

A closing paragraph.

```text
a code sample in the notes
```
"""

PATH = "designs/stage.md"


def _key(text: str, library_text: str = LIBRARY, path: str = PATH, **options: bool) -> str:
    record = load_texts("designs", {path: text, "designs/library.md": library_text})
    assert not record.has_errors(path), record.diagnostics.get(path)
    return design_key(record.page(path), record.library, extra="code", **options)


def _edit(old: str, new: str, text: str = DESIGN) -> str:
    assert text.count(old) == 1, old
    return text.replace(old, new)


BASE = _key(DESIGN)

PROSE_EDITS = {
    "a sentence appended at the end": DESIGN + "\nOne more sentence.\n",
    "a paragraph reworded in place": _edit("a paragraph of notes.", "two sentences of notes."),
    "a line added after the last read block": _edit("A closing paragraph.",
                                                    "A closing paragraph.\n\nAnd another."),
    "a heading renamed": _edit("## More notes", "## Further notes"),
    "a code sample in the notes changed": _edit("a code sample", "another code sample"),
}


@pytest.mark.parametrize("text", PROSE_EDITS.values(), ids=PROSE_EDITS.keys())
def test_a_prose_edit_keeps_the_key(text: str) -> None:
    assert _key(text) == BASE


def test_the_library_pages_notes_do_not_count() -> None:
    assert _key(DESIGN, _edit("Our stock transistor.", "Our stock transistor, bought in 2026.",
                              LIBRARY)) == BASE


SOLVE_EDITS = {
    "a part value": _edit("4k7 1%", "5k1 1%"),
    "a tolerance": _edit("82k 1%", "82k 5%"),
    "a connection turned round": _edit(": vcc c1", ": c1 vcc"),
    "a requirement": _edit("> 10 dB", "> 12 dB"),
    "a bench line": DESIGN.replace("output   out\n", "output   out\nload     100k\n"),
    "the design's own model": _edit("beta=150", "beta=160"),
    "an estimate": _edit("- 0.65V", "- 0.7V"),
    "a layout hint": _edit("Q2 right-of Q1", "Q2 left-of Q1"),
    "a comment inside the circuit block": _edit("VA   supply     12 V                 : vcc gnd",
                                                "VA   supply     12 V                 : vcc gnd"
                                                "  # battery"),
    "the title (in the results' design facts)": _edit("title: Key test stage",
                                                      "title: Key stage"),
    "the summary (in the results' design facts)": _edit("for the key tests", "for key tests"),
    "the owner": _edit("Ada Quill", "Bo Quill"),
    "the status": _edit("status: draft", "status: review"),
    "a line of notes added above the circuit (every position moves)":
        _edit("a paragraph of notes.", "a paragraph of notes.\nA second line."),
    "the circuit block's fence indented": _edit("```circuit", " ```circuit"),
}


@pytest.mark.parametrize("text", SOLVE_EDITS.values(), ids=SOLVE_EDITS.keys())
def test_an_edit_the_solve_reads_changes_the_key(text: str) -> None:
    assert _key(text) != BASE


def test_a_used_library_model_changes_the_key_and_an_unused_one_does_not() -> None:
    assert _key(DESIGN, _edit("beta=200", "beta=210", LIBRARY)) != BASE
    unused = LIBRARY.replace("early_voltage=80\n", "early_voltage=80\nother-npn npn beta=90\n")
    assert _key(DESIGN, unused) == BASE


def test_the_path_counts_unless_left_out() -> None:
    assert _key(DESIGN, path="designs/other.md") != BASE
    assert _key(DESIGN, path="designs/other.md", with_path=False) == \
        _key(DESIGN, with_path=False)


def test_a_reader_warning_counts() -> None:
    """An ignored header key leaves the results alone but gives a warning with a position."""
    warned = _edit("status: draft", "status: draft\ncolour: blue")
    assert [w.message for w in read_text(warned, PATH).warnings] == \
        ["unknown header key 'colour' (ignored)"]
    assert _key(warned) != BASE


def test_the_key_is_the_same_in_another_process_order() -> None:
    """Deterministic: no set order or object id leaks into it (same text, fresh read)."""
    assert _key(DESIGN) == _key(str(DESIGN))


def test_every_block_tag_docgen_reads_is_in_the_key() -> None:
    """A stage that starts reading a new kind of fenced block must add its tag to the key."""
    root = Path(__file__).resolve().parent.parent / "docgen"
    compared = re.compile(r"\.tag\s*(?:==|!=)\s*[\"'](\w+)[\"']|\bTAG\s*=\s*[\"'](\w+)[\"']")
    found = set()
    for path in root.rglob("*.py"):
        for match in compared.finditer(path.read_text(encoding="utf-8")):
            found.add(match.group(1) or match.group(2))
    assert {"circuit", "models", "bench", "estimate", "layout"} <= found  # the scan works
    assert found <= SOLVE_BLOCK_TAGS
