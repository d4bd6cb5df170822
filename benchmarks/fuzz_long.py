"""Long fuzz run (not in CI): mutate the job of tests/test_fuzz.py for a while, count crashes.

    .venv/bin/python benchmarks/fuzz_long.py --seconds 300

Each input is the valid fuzz job with one to three random mutations (the generator of
tests/test_fuzz.py, seeded by the input's number, so a crash is replayed with
``--replay N``). Every input is loaded and evaluated; every fourth also goes through
``acceptance check``. A crash is any exception other than InputError, or a traceback or
a verdict printed for refused input. Crashing inputs are kept under ``--keep`` (default
``fuzz_crashes/``) for a look.
"""

from __future__ import annotations

import argparse
import random
import re
import sys
import time
import traceback
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from tests.test_fuzz import BASE, check_through_cli, in_job, mutate, outcome, write_files


def run_one(number: int, seed: int) -> tuple[str, str | None]:
    files = mutate(random.Random(seed * 1_000_003 + number), BASE)

    def action(root: Path) -> str:
        result = outcome(root)
        if number % 4 == 0:
            check_through_cli(root)
        return result

    try:
        return in_job(files, action), None
    except Exception:  # every other exception is what this run looks for
        return "crash", traceback.format_exc()


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seconds", type=float, default=180.0)
    parser.add_argument("--seed", type=int, default=1)
    parser.add_argument("--replay", type=int, help="run input N only and show its traceback")
    parser.add_argument("--keep", type=Path, default=Path("fuzz_crashes"))
    args = parser.parse_args()
    if args.replay is not None:
        kind, trace = run_one(args.replay, args.seed)
        print(kind)
        if trace:
            print(trace)
        return 1 if trace else 0
    counts = {"valid": 0, "refused": 0, "crash": 0}
    signatures: dict[str, int] = {}
    start = time.monotonic()
    number = 0
    while time.monotonic() - start < args.seconds:
        kind, trace = run_one(number, args.seed)
        counts[kind] += 1
        if trace:
            # The last line names the error; the temporary folder's name is not part of it.
            signature = re.sub(r"/\S*/fuzz-[^/]+", "", trace.strip().splitlines()[-1])[:200]
            if signature not in signatures:
                signatures[signature] = number
                files = mutate(random.Random(args.seed * 1_000_003 + number), BASE)
                write_files(args.keep / f"input-{number}" / "job", files)
                print(f"crash at input {number}: {signature}", flush=True)
        number += 1
    elapsed = time.monotonic() - start
    print(f"inputs tried: {number} in {elapsed:.0f} s ({number / elapsed:.1f}/s), seed "
          f"{args.seed}")
    print(f"valid: {counts['valid']}, refused with InputError: {counts['refused']}, "
          f"crashes: {counts['crash']} ({len(signatures)} distinct)")
    for signature, first in signatures.items():
        print(f"  {signature}  (first at input {first}; --replay {first})")
    return 1 if counts["crash"] else 0


if __name__ == "__main__":
    raise SystemExit(main())
