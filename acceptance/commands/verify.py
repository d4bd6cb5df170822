"""``acceptance verify DIR``: check a built site against its manifest, or a job's signatures.

Every mismatch is reported; the exit code is 0 when there is none and 1 otherwise.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from ..integrity import IntegrityError, load_public_key, verify_job, verify_site
from ..text import terminal_text
from ..wording import counted


def register(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("folder", type=Path,
                        help="a built site (with MANIFEST.sha256) or a job folder (job.yaml)")
    parser.add_argument("--public-key", type=Path, action="append", default=None,
                        metavar="FILE",
                        help="a trusted public key; when given, every signature must be made "
                             "with one of them (repeat for several)")


def run(args: argparse.Namespace) -> int:
    folder: Path = args.folder
    trusted = ([load_public_key(path) for path in args.public_key]
               if args.public_key else None)
    if (folder / "job.yaml").is_file():
        report = verify_job(folder, trusted)
        what = counted(report.checked, "signature")
    elif (folder / "MANIFEST.sha256").is_file():
        report = verify_site(folder, trusted)
        what = counted(report.checked, "file") + " in the manifest"
    else:
        raise IntegrityError(f"{folder} holds neither MANIFEST.sha256 (a built site) nor "
                             "job.yaml (a job folder)")
    for note in report.notes:
        print(terminal_text(f"  {note}"))
    for problem in report.problems:
        print(terminal_text(f"MISMATCH {problem}"), file=sys.stderr)
    if report.ok:
        print(terminal_text(f"OK: {what} checked in {folder}, no mismatch"))
        return 0
    print(terminal_text(f"{counted(len(report.problems), 'mismatch', 'mismatches')} in "
                        f"{folder} ({what} checked)"), file=sys.stderr)
    return 1
