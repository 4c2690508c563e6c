"""History and revision diffs of the design record, read from git.

- :mod:`docgen.history.git` — read-only git access (log following renames, file contents).
- :mod:`docgen.history.cache` — per-revision results, cached by content, solved once ever.
- :mod:`docgen.history.semantic` — the semantic diff of two designs (pure).
- :mod:`docgen.history.headline` — the headline figures and verdicts tables compare.
- :mod:`docgen.history.hook` — the post-commit hook that rebuilds the site.
"""
