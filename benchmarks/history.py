"""Speed of the history: every design's revisions of the demo repository, cold and cached.

Run: ``python benchmarks/history.py`` (never run by CI).  Builds the demo repository
(:func:`docgen.demo_repo.make_demo_repo`) in a temporary folder, then times, for every design:
the history with an empty cache (each distinct revision solved once), the same again as a new
process would see it (results from the cache folder, nothing solved), the history after one new
commit (one revision solved), and the changed-since-approval check ``docgen check`` runs.
Prints wall and CPU seconds.
"""

from __future__ import annotations

import tempfile
import time
from collections.abc import Callable
from pathlib import Path

from docgen.demo_repo import make_demo_repo
from docgen.history import snapshot as snapshots
from docgen.history.approval import approval_check
from docgen.history.git import Repo
from docgen.history.snapshot import open_repo, solver_for
from docgen.history.timeline import design_history


def fresh_process() -> None:
    """Forget what this process read (a rebuild starts as a new process)."""
    snapshots._TREES.clear()
    snapshots._read_page.cache_clear()


def timed(label: str, run: Callable[[], str]) -> None:
    wall, cpu = time.perf_counter(), time.process_time()
    note = run()
    print(f"{label:44} {time.perf_counter() - wall:8.2f} {time.process_time() - cpu:8.2f}  "
          f"{note}")


def all_histories(repo: Repo, root: str, designs: list[str]) -> str:
    solver = solver_for(repo, root)
    rows = sum(len(design_history(repo, d, root, solver)["rows"]) for d in designs)
    return f"{len(designs)} designs, {rows} rows, {solver.solved} solved"


def main() -> None:
    """Print the table."""
    with tempfile.TemporaryDirectory() as folder:
        repo_root = make_demo_repo(Path(folder) / "demo")
        repo, root = open_repo(repo_root / "designs")
        assert repo is not None
        designs = snapshots.tree(repo, None, root).design_paths()
        print(f"{'what':44} {'wall s':>8} {'cpu s':>8}")
        timed("history, empty cache", lambda: all_histories(repo, root, designs))
        fresh_process()
        timed("history, new process, cache kept", lambda: all_histories(Repo(repo_root), root,
                                                                          designs))
        path = repo_root / designs[0]
        path.write_text(path.read_text(encoding="utf-8").replace("\n# ", "\n#  ", 1),
                        encoding="utf-8")
        Repo(repo_root).run("-c", "user.name=bench", "-c", "user.email=bench@example.invalid",
                            "commit", "-q", "-am", "benchmark edit")
        fresh_process()
        timed("history after one new commit", lambda: all_histories(Repo(repo_root), root,
                                                                     designs))
        fresh_process()
        def flagged() -> str:
            found = [approval_check(Repo(repo_root), d, root) for d in designs]
            return f"{sum(info is not None for info in found)} flagged"

        timed("changed-since-approval, every design", flagged)


if __name__ == "__main__":
    main()
