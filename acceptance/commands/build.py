"""``acceptance build JOB -o DIR``: the HTML site, a PDF per visit and the results file."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from ..pipeline import build_site


def register(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("job", type=Path, help="the job folder (holding job.yaml)")
    parser.add_argument("-o", "--output", type=Path, required=True,
                        help="folder to write the site into (replaced atomically)")
    parser.add_argument("--no-pdf", action="store_true", help="write the HTML site only")
    parser.add_argument("-q", "--quiet", action="store_true", help="print nothing on success")


def run(args: argparse.Namespace) -> int:
    interactive = sys.stderr.isatty() and not args.quiet

    def progress(name: str) -> None:
        if interactive:
            print(f"  rendering {name}", file=sys.stderr)

    report = build_site(args.job, args.output, with_pdf=not args.no_pdf, progress=progress)
    if not args.quiet:
        index = (report.output / "index.html").resolve()
        print(f"wrote {report.pages} pages, {report.pdfs} PDF records "
              f"({report.pdf_pages} PDF pages) and results.json to {report.output}")
        print(f"open {index.as_uri()}")
    return 0
