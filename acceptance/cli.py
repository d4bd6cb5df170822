"""Command-line entry point: the only place that prints errors and exits."""

from __future__ import annotations

import argparse
import importlib
import os
import sys
from collections.abc import Sequence

from . import __version__
from .errors import AcceptanceError, InputError

# Each command lives in acceptance/commands/<name>.py and exposes
# ``register(subparsers)``; modules are imported lazily so that light commands
# (check) never import the PDF stack.
COMMANDS: tuple[tuple[str, str], ...] = (
    ("check", "evaluate a job and print a summary of every visit"),
    ("build", "write the HTML site, a PDF per visit and the results file"),
    ("capture", "analyse a scope capture (CSV): RMS, meter readings, harmonics"),
    ("schema", "write the JSON Schemas of every file kind (for editors)"),
    ("compare", "compare each visit of a machine with its baseline: steady, watch or act"),
    ("sign", "sign a visit: record who, when and a digest of every input of its verdicts"),
    ("verify", "check a built site against its manifest, or a job's signed visits"),
    ("keygen", "create an Ed25519 key for signing visits and site manifests"),
    ("new", "write a blank visit file with every item of a machine's checklists"),
    ("serve", "serve a live preview on 127.0.0.1 that rebuilds when the job changes"),
)


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="acceptance",
        description="Commissioning readings to computed verdicts, an offline site and PDF records.",
    )
    parser.add_argument("--version", action="version", version=f"acceptance {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", required=True)
    for name, help_text in COMMANDS:
        sub.add_parser(name, help=help_text, add_help=False)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    # The records are validated by our models alone: no installed pydantic plugin may watch or
    # alter that, and skipping the plugin search (every installed package's entry points)
    # shortens each command's start-up.
    os.environ.setdefault("PYDANTIC_DISABLE_PLUGINS", "__all__")
    top = _parser()
    names = [name for name, _ in COMMANDS]
    if not argv or argv[0] not in names:
        args = top.parse_args(argv)  # prints help / version / error and exits
        return 2
    name = argv[0]
    module = importlib.import_module(f".commands.{name}", __package__)
    parser = argparse.ArgumentParser(prog=f"acceptance {name}", description=dict(COMMANDS)[name])
    module.register(parser)
    args = parser.parse_args(argv[1:])
    try:
        return int(module.run(args))
    except InputError as error:
        # One problem per line, each starting with its location, however many there are:
        # editors and scripts read 'file:line:column:' at the start of a line.
        print(str(error), file=sys.stderr)
        return error.exit_code
    except AcceptanceError as error:
        print(f"error: {error}", file=sys.stderr)
        return error.exit_code
    except KeyboardInterrupt:
        print("interrupted; nothing was replaced", file=sys.stderr)
        return 130


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
