"""Files written whole or not at all: the caches' one way of storing an entry.

The data goes to a temporary file in the target's folder, which is then renamed over the
target, so a reader (or a build killed half way) never sees half a file.
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path


def write_atomically(path: Path, data: bytes) -> None:
    """Write ``data`` to ``path`` (its folder must exist) through a temporary file and a rename."""
    descriptor, temporary = tempfile.mkstemp(dir=path.parent, prefix=".tmp-",
                                             suffix=path.suffix)
    try:
        with os.fdopen(descriptor, "wb") as handle:
            handle.write(data)
        os.replace(temporary, path)
    except BaseException:
        Path(temporary).unlink(missing_ok=True)
        raise
