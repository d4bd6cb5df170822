"""``acceptance sign JOB MACHINE/VISIT --by NAME --role ROLE [--key FILE]``: record a sign-off.

The record is written to ``machines/<id>/signatures/<visit>.yaml``, outside every file it
covers; a visit signed before gets a further signature appended, never replaced.
"""

from __future__ import annotations

import argparse
from pathlib import Path

from ..evaluation import evaluate_job
from ..integrity import IntegrityError, load_private_key, sign_visit, visit_verdicts
from ..loading import load_job
from ..wording import counted

_ORDINAL = {1: "second", 2: "third", 3: "fourth"}


def register(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("job", type=Path, help="the job folder (holding job.yaml)")
    parser.add_argument("visit", metavar="MACHINE/VISIT",
                        help="the visit to sign, e.g. press-brake-1/2026-03-10-commissioning")
    parser.add_argument("--by", required=True, metavar="NAME", help="who signs")
    parser.add_argument("--role", required=True, help="in which role, e.g. supervisor")
    parser.add_argument("--key", type=Path, metavar="KEYFILE",
                        help="Ed25519 private key (from `acceptance keygen`) to sign the "
                             "digest with; without it the record holds the digest only")


def run(args: argparse.Namespace) -> int:
    machine_id, _, visit_id = args.visit.strip("/").partition("/")
    if not machine_id or not visit_id or "/" in visit_id:
        raise IntegrityError(f"'{args.visit}' is not MACHINE/VISIT, e.g. "
                             "press-brake-1/2026-03-10-commissioning")
    key = load_private_key(args.key) if args.key else None
    job = load_job(args.job)
    visit_id = visit_id.removesuffix(".yaml")
    # The verdicts computed now are kept, so a later tool version can say which it computes
    # otherwise from the same inputs (an upgrade), apart from inputs changed (an alteration).
    computed = next((visit_verdicts(v) for v in evaluate_job(job).visits
                     if (v.machine, v.id) == (machine_id, visit_id)), None)
    outcome = sign_visit(job, machine_id, visit_id, args.by, args.role, key,
                         verdicts=computed)
    entry = outcome.entry
    if outcome.previous:
        which = _ORDINAL.get(outcome.previous, f"number {outcome.previous + 1}")
        print(f"added a {which} signature to {outcome.path} (the earlier ones are kept)")
    else:
        print(f"wrote {outcome.path}")
    print(f"  signed by {entry.name} ({entry.role}) at {entry.signed_at}")
    print(f"  digest {entry.digest} over {counted(len(entry.inputs), 'input')}")
    if entry.key is not None:
        print(f"  Ed25519 key fingerprint {entry.key.fingerprint}")
    else:
        print("  no key: the record holds the digest only, so it shows a change but not who "
              "made the record")
    return 0
