"""``acceptance schema [-o DIR]``: write the JSON Schema of every file kind."""

from __future__ import annotations

import argparse
from pathlib import Path

from ..schemas import schema_documents, schema_text


def register(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("-o", "--output", type=Path, default=Path("schemas"),
                        help="folder to write the schemas into (default: schemas/)")
    parser.add_argument("--check", action="store_true",
                        help="write nothing; exit 1 if the folder's schemas differ from the model")


def run(args: argparse.Namespace) -> int:
    stale = []
    for name, document in schema_documents().items():
        target = args.output / name
        text = schema_text(document)
        current = target.read_text(encoding="utf-8") if target.is_file() else None
        if current == text:
            continue
        stale.append(name)
        if not args.check:
            target.parent.mkdir(parents=True, exist_ok=True)
            target.write_text(text, encoding="utf-8")
            print(f"wrote {target}")
    if args.check and stale:
        print("schemas out of date: " + ", ".join(stale) + "; run: acceptance schema")
        return 1
    return 0
