"""The reader: Markdown design pages to immutable :class:`docgen.design.Design` values.

``read_text(text, path)`` and ``read_file(path)`` raise :class:`docgen.diagnostics.InputError`
carrying every diagnostic of the file.  One module per block (``circuit``, ``models``,
``bench``, ``require``), the header, the shared tokeniser (``lexer``) and the whole-design
checks (``wiring``).
"""

from docgen.reader.page import BLOCK_TAGS, find_blocks, page_blocks, read_file, read_text

__all__ = ["BLOCK_TAGS", "find_blocks", "page_blocks", "read_file", "read_text"]
