"""The extension point for pages other modules add to the site (history and diff pages...).

A provider is a function ``provide(site: ProviderInput) -> Contribution`` named in
:data:`PROVIDERS` as ``"module:function"``; a provider whose module is not installed is skipped.
It receives the record, the designs in this site with their results, and a ``render`` function
that wraps its own template (which should extend ``base.html``) with the site's header, footer
and relative root.  It returns the files to add and links to put on design pages (the status
block has a slot for them) and in the site's navigation bar.  Providers run after every design
is solved and before any page is written, so design pages can link to what they add.
"""

from __future__ import annotations

import importlib
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from docgen.site.pages import Link
from docgen.site.record_view import RecordView

#: "module:function" of each page provider, in order
PROVIDERS: list[str] = ["docgen.history.site:provide"]


@dataclass
class ProviderInput:
    """What a provider sees.

    :param designs: ``source_rel`` of each design page in this site (sorted).
    :param pages: ``source_rel`` -> site path of every page in this site.
    :param bundles: ``source_rel`` -> ``{"results": ..., ...}`` for each design in the site.
    :param render: ``render(template, page_path, title, **context) -> str`` — a full page.
    :param cache_dir: the build's cache folder (``None``: caching off); use a subfolder.
    """

    record: RecordView
    designs: list[str]
    pages: dict[str, str]
    bundles: dict[str, dict[str, Any]]
    render: Callable[..., str]
    cache_dir: Path | None
    jobs: int


@dataclass
class Contribution:
    """What a provider adds: files by site path, links per design, flags shown beside a
    design's status on the index (e.g. "changed since approval"), and navigation links."""

    files: dict[str, str | bytes] = field(default_factory=dict)
    design_links: dict[str, list[Link]] = field(default_factory=dict)
    index_flags: dict[str, list[str]] = field(default_factory=dict)
    nav_links: list[Link] = field(default_factory=list)


def load_providers(names: list[str] | None = None) -> list[Callable[[ProviderInput], Contribution]]:
    """The provider functions whose modules are present."""
    found = []
    for target in PROVIDERS if names is None else names:
        module_name, func_name = target.split(":")
        try:
            module = importlib.import_module(module_name)
        except ModuleNotFoundError as exc:
            if exc.name and module_name.startswith(exc.name):
                continue
            raise
        provide = getattr(module, func_name, None)
        if provide is not None:
            found.append(provide)
    return found
