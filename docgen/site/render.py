"""The template environment: jinja2 with autoescaping on for every template, loaded from the
package, with whitespace control so pages are compact and stable byte for byte."""

from __future__ import annotations

from functools import lru_cache
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


def render(template: str, **context: Any) -> str:
    """Render ``template`` with ``context``; every value is escaped unless marked safe."""
    return environment().get_template(template).render(**context)
