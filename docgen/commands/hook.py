"""``docgen hook install|remove|status``: the git hook that rebuilds the site on every commit."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``docgen hook``."""
    parser.add_argument("action", choices=("install", "remove", "status"),
                        help="install or remove the post-commit hook, or say which is there")
    parser.add_argument("--designs", default="designs", metavar="DIR",
                        help="the designs folder the hook builds, relative to the repository "
                             "root (default: designs)")
    parser.add_argument("--out", default="site", metavar="DIR",
                        help="the site folder the hook writes (default: site)")
    parser.add_argument("--force", action="store_true",
                        help="install over a post-commit hook that docgen did not write "
                             "(it is kept as post-commit.before-docgen)")
    parser.add_argument("--repo", default=".", metavar="DIR",
                        help="a folder inside the repository (default: here)")


def run(args: argparse.Namespace) -> int:
    """Install, remove or report the hook; exit 2 when refused or outside a repository."""
    from docgen.history import hook
    from docgen.history.git import Repo

    repo = Repo.find(Path(args.repo))
    if repo is None:
        print(f"docgen hook: {args.repo} is not inside a git repository", file=sys.stderr)
        return 2
    try:
        if args.action == "install":
            found = hook.install(repo, args.designs, args.out, force=args.force)
            print(f"installed {found.path}: each commit rebuilds {args.designs}/ into "
                  f"{args.out}/")
        elif args.action == "remove":
            before = hook.state(repo)
            found = hook.remove(repo)
            if before.owner == "none":
                print(f"no post-commit hook in {found.path.parent}; nothing to remove")
            else:
                restored = " (the previous hook is back)" if found.owner == "foreign" else ""
                print(f"removed docgen's hook {found.path}{restored}")
        else:
            found = hook.state(repo)
            words = {"none": "no post-commit hook", "docgen": "docgen's hook",
                     "foreign": "a hook docgen did not write"}
            print(f"{found.path}: {words[found.owner]}")
    except hook.HookRefused as exc:
        print(f"docgen hook: {exc}", file=sys.stderr)
        return 2
    return 0
