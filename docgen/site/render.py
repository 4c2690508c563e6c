"""The template environment: jinja2 with autoescaping on for every template, loaded from the
package, with whitespace control so pages are compact and stable byte for byte."""

from __future__ import annotations

from functools import lru_cache
from pathlib import Path
from typing import Any

import jinja2


@lru_cache(maxsize=1)
def environment() -> jinja2.Environment:
    """The shared environment (templates in ``docgen/templates``; autoescape always on)."""
    return jinja2.Environment(
        loader=jinja2.PackageLoader("docgen", "templates"),
        autoescape=True,
        trim_blocks=True,
        lstrip_blocks=True,
        keep_trailing_newline=True,
        undefined=jinja2.StrictUndefined,
    )


def keep_compiled_templates(folder: Path | None) -> None:
    """Keep the templates' compiled code in ``folder`` (the build's cache), so a rebuild
    does not compile them again (about 0.15 s of a no-change rebuild); ``None``: in memory
    only.  jinja2 checks each template's source before using its stored code."""
    if folder is not None:
        folder.mkdir(parents=True, exist_ok=True)
    environment().bytecode_cache = (jinja2.FileSystemBytecodeCache(str(folder))
                                    if folder is not None else None)


def render(template: str, **context: Any) -> str:
    """Render ``template`` with ``context``; every value is escaped unless marked safe."""
    return environment().get_template(template).render(**context)
