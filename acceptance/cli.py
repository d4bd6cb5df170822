"""Command-line entry point: the only place that prints errors and exits."""

from __future__ import annotations

import argparse
import importlib
import os
import sys
from collections.abc import Sequence

from . import __version__
from .errors import AcceptanceError, InputError
from .text import terminal_text

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
    parser.add_argument("--debug", action="store_true",
                        help="on an internal error, show the traceback (for a bug report)")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", required=True)
    for name, help_text in COMMANDS:
        sub.add_parser(name, help=help_text, add_help=False)
    return parser


# An error in the tool itself, not in the input: distinct from 1 (a visit did not pass),
# 2 (input problems) and 3 (a build could not be completed), so scripts can tell them apart.
INTERNAL_ERROR_EXIT = 4
# The reader of stdout went away: 128 + SIGPIPE, what a shell reports for a command ended so.
BROKEN_PIPE_EXIT = 141


def main(argv: Sequence[str] | None = None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    # The records are validated by our models alone: no installed pydantic plugin may watch or
    # alter that, and skipping the plugin search (every installed package's entry points)
    # shortens each command's start-up.
    os.environ.setdefault("PYDANTIC_DISABLE_PLUGINS", "__all__")
    debug = bool(argv) and argv[0] == "--debug"
    if debug:
        argv = argv[1:]
    top = _parser()
    names = [name for name, _ in COMMANDS]
    if not argv or argv[0] not in names:
        top.parse_args(argv)  # prints help / version / error and exits
        return 2
    try:
        return _run(argv)
    except InputError as error:
        # One problem per line, each starting with its location, however many there are:
        # editors and scripts read 'file:line:column:' at the start of a line.
        print(terminal_text(str(error)), file=sys.stderr)
        return error.exit_code
    except AcceptanceError as error:
        print(terminal_text(f"error: {error}"), file=sys.stderr)
        return error.exit_code
    except KeyboardInterrupt:
        print("interrupted; nothing was replaced", file=sys.stderr)
        return 130
    except BrokenPipeError:
        # Whoever read the output closed it (`acceptance compare JOB --json | head`): end
        # quietly, as a shell command ends on SIGPIPE. stdout is pointed at /dev/null so that
        # the interpreter's last flush of the unwritten rest cannot fail again.
        _silence_stdout()
        return BROKEN_PIPE_EXIT
    except Exception as error:
        # A fault of the tool, whatever the input: say so plainly and ask for a report; the
        # traceback is for whoever fixes it (--debug), not for the person at the machine.
        if debug:
            import traceback

            traceback.print_exc(file=sys.stderr)
        print(terminal_text(f"internal error: {type(error).__name__}: {error}"),
              file=sys.stderr)
        print(f"This is a fault in acceptance {__version__}, not in your files. Please report "
              f"it with the command line ({_command_line(argv)}) and the version; "
              f"run it again with 'acceptance --debug ...' to include the traceback.",
              file=sys.stderr)
        return INTERNAL_ERROR_EXIT


def _run(argv: list[str]) -> int:
    name = argv[0]
    module = importlib.import_module(f".commands.{name}", __package__)
    parser = argparse.ArgumentParser(prog=f"acceptance {name}", description=dict(COMMANDS)[name])
    module.register(parser)
    args = parser.parse_args(argv[1:])
    return int(module.run(args))


def _silence_stdout() -> None:
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        os.close(devnull)
    except (OSError, ValueError):  # stdout without a file descriptor (tests capture it)
        pass


def _command_line(argv: list[str]) -> str:
    import shlex

    return shlex.join(["acceptance", *argv])


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
