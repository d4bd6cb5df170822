"""``acceptance build JOB -o DIR``: the HTML site, a PDF per visit and the results file."""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

from ..build import build_site
from ..errors import BuildError
from ..integrity import load_private_key


def register(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("job", type=Path, help="the job folder (holding job.yaml)")
    parser.add_argument("-o", "--output", type=Path, required=True,
                        help="folder to write the site into (replaced atomically)")
    parser.add_argument("--no-pdf", action="store_true", help="write the HTML site only")
    parser.add_argument("-j", "--jobs", type=int, default=None,
                        help="PDF worker processes (default: the number of CPUs)")
    parser.add_argument("-q", "--quiet", action="store_true", help="print nothing on success")
    parser.add_argument("--key", type=Path, metavar="KEYFILE",
                        help="Ed25519 private key (from `acceptance keygen`) to sign the "
                             "manifest with, written as MANIFEST.sha256.sig")
    parser.add_argument("--strict", action="store_true",
                        help="fail, writing nothing, when a signed visit was altered after "
                             "sign-off (without it, the build warns and marks the visit)")


def run(args: argparse.Namespace) -> int:
    interactive = sys.stderr.isatty() and not args.quiet

    def progress(name: str) -> None:
        print(f"\r\033[K  rendering {name}", end="", file=sys.stderr, flush=True)

    jobs = args.jobs if args.jobs is not None else max(1, len(os.sched_getaffinity(0)))
    if jobs < 1:
        raise BuildError("--jobs must be 1 or more")
    if args.key is not None:
        load_private_key(args.key)  # a bad key stops the build before anything is rendered
    report = build_site(args.job, args.output, with_pdf=not args.no_pdf,
                        progress=progress if interactive else None, jobs=jobs, key=args.key,
                        strict=args.strict)
    if interactive and report.rendered:
        print(file=sys.stderr)
    for line in report.altered:
        print(f"warning: {line}", file=sys.stderr)
    if not args.quiet:
        index = (report.output / "index.html").resolve()
        if report.unchanged:
            print(f"{report.output} is up to date; nothing was written")
        else:
            rest = ", the rest unchanged" if report.rendered < report.pdfs else ""
            pdfs = (f"{report.rendered} of {report.pdfs} PDF records rendered "
                    f"({report.pdf_pages} pages){rest}" if report.pdfs
                    else "no PDF records (--no-pdf)")
            print(f"wrote {report.pages} pages and results.json; {pdfs}; to {report.output}")
        print(f"open {index.as_uri()}")
    return 0
