"""``acceptance keygen FILE``: a new Ed25519 key for signing visits and site manifests."""

from __future__ import annotations

import argparse
from pathlib import Path

from ..integrity import generate_key


def register(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("file", type=Path,
                        help="where to write the private key; the public key goes to FILE.pub")


def run(args: argparse.Namespace) -> int:
    key = generate_key(args.file)
    print(f"wrote the private key to {args.file} (readable by you only; keep it secret, "
          "it signs in your name)")
    print(f"wrote the public key to {args.file}.pub (give it to whoever verifies)")
    print(f"fingerprint {key.fingerprint}")
    return 0
