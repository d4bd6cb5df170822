"""Robustness figures in one run: bad-input corpus, fuzzing, killed builds, hostile content.

    .venv/bin/python benchmarks/robustness_report.py [--long-seconds 180]

Runs the tests behind each figure (and the long fuzz run for ``--long-seconds``) and
prints what they measured; DEVELOPERS.md records the figures of one run.
"""

from __future__ import annotations

import argparse
import re
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))


def pytest(*args: str) -> tuple[str, str]:
    """The summary line and the whole output of a pytest run."""
    completed = subprocess.run([sys.executable, "-m", "pytest", "-q", "-p", "no:cacheprovider",
                                *args], cwd=ROOT, capture_output=True, text=True, check=False)
    lines = [line for line in completed.stdout.splitlines() if line.strip()]
    summary = lines[-1].strip("= ") if lines else "no output"
    return summary, completed.stdout


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--long-seconds", type=float, default=180.0,
                        help="length of the long fuzz run (0 to skip it)")
    args = parser.parse_args()

    from tests.test_bad_inputs import CASES
    from tests.test_fuzz import FUZZ
    from tests.test_interrupted_build import KILL_POINTS

    kinds: dict[str, int] = {}
    for case in CASES:
        kinds[case["kind"]] = kinds.get(case["kind"], 0) + 1
    summary, _ = pytest("tests/test_bad_inputs.py")
    print(f"bad-input corpus: {len(CASES)} cases "
          f"({', '.join(f'{k} {n}' for k, n in sorted(kinds.items()))}); pytest: {summary}")

    summary, _ = pytest("tests/test_fuzz.py")
    fuzz_tests = 2
    print(f"fuzzing in CI: {fuzz_tests} properties x {FUZZ.max_examples} examples = "
          f"{fuzz_tests * FUZZ.max_examples} mutated jobs; pytest: {summary}")

    if args.long_seconds > 0:
        completed = subprocess.run(
            [sys.executable, str(ROOT / "benchmarks" / "fuzz_long.py"), "--seconds",
             str(args.long_seconds)], cwd=ROOT, capture_output=True, text=True, check=False)
        figures = [line for line in completed.stdout.splitlines()
                   if line.startswith(("inputs tried", "valid:", "  "))]
        print("long fuzz run: " + "; ".join(line.strip() for line in figures))

    summary, output = pytest("-s", "tests/test_interrupted_build.py")
    kills = re.search(r"kill points: (\d+), left the previous site: (\d+), the new one: (\d+)",
                      output)
    if kills:
        print(f"killed builds: {kills[1]} kill points (of {KILL_POINTS} planned), each left "
              f"one whole site: the previous {kills[2]}, the new {kills[3]}; pytest: {summary}")
    else:
        print(f"killed builds: no figures; pytest: {summary}")

    summary, _ = pytest("tests/test_hostile_content.py")
    print(f"hostile content: {summary}")
    summary, _ = pytest("tests/test_limits.py")
    print(f"limits: {summary}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
