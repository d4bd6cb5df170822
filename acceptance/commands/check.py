"""``acceptance check JOB``: evaluate and print a summary; exit 0 only when every visit passes.

While no input has changed, the output of the last check is printed again without loading
anything (see :mod:`acceptance.check_cache`); the heavy modules are imported only on a miss.
"""

from __future__ import annotations

import argparse
import io
import json
import os
import sys
from pathlib import Path
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from ..results import JobResult


def _marks() -> tuple[dict, dict]:
    from ..results import Verdict, VisitState

    marks = {
        Verdict.PASS: "✓", Verdict.CONDITIONAL_PASS: "≈✓", Verdict.CONDITIONAL_FAIL: "≈✗",
        Verdict.FAIL: "✗", Verdict.UNDETERMINED: "?", Verdict.NOT_TESTED: "○",
        Verdict.NOT_APPLICABLE: "–", Verdict.RECORDED: "·",
    }
    states = {VisitState.PASS: "✓", VisitState.PASS_WITH_DEFICIENCIES: "!",
              VisitState.INCOMPLETE: "○", VisitState.FAIL: "✗"}
    return marks, states


def register(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("job", type=Path, help="the job folder (holding job.yaml)")
    parser.add_argument("--json", action="store_true",
                        help="print the results as JSON (schema acceptance-results/1)")
    parser.add_argument("--all", action="store_true",
                        help="list every item, not only those that need attention")


def summary_lines(result: JobResult, show_all: bool = False) -> list[str]:
    from ..results import Verdict, VisitState

    _MARK, _STATE_MARK = _marks()  # noqa: N806 - tables, read like constants
    lines = [f"{result.title} — {result.site}"]
    for machine in result.machines:
        lines.append("")
        lines.append(f"{machine.name} [{machine.id}]")
        if not machine.visits:
            lines.append("  no visits recorded")
        for visit in machine.visits:
            lines.append(f"  {_STATE_MARK[visit.state]} {visit.id} ({visit.kind}, "
                         f"{visit.date.isoformat()}): {visit.state.value.upper()}"
                         + (f" as left (as found: {visit.as_found_state.value})"
                            if visit.as_found_state is not None else ""))
            left = {item.key: item for item in visit.as_left}
            for found in visit.items:
                item = left.get(found.key, found)
                label = "as left: " if found.key in left else ""
                if not show_all and not item.verdict.is_open:
                    continue
                for element in item.elements or ():
                    if not show_all and (not element.verdict.is_open or (
                            not item.required and element.verdict is Verdict.NOT_TESTED)):
                        continue
                    where = f"{label}{item.key}" + (f"[{element.element}]" if element.element
                                                     else "")
                    reading = element.reading or "—"
                    lines.append(f"      {_MARK[element.verdict]} {element.verdict.value:<16} "
                                 f"{where}: {reading}")
                    for check in element.checks:
                        if check.verdict.is_open or show_all:
                            detail = f"{_MARK[check.verdict]} {check.limit}"
                            if check.compared:
                                detail = f"{_MARK[check.verdict]} {check.compared}: {check.limit}"
                            if check.message:
                                detail += f" — {check.message}"
                            lines.append(f"          {detail}  ({check.source})")
                    for finding in element.findings:
                        lines.append(f"          ⚠ {finding}")
                    if element.line:
                        lines.append(f"          at {visit.source_file}:{element.line}")
                if not item.elements and show_all:
                    lines.append(f"      {_MARK[item.verdict]} {item.verdict.value:<16} "
                                 f"{item.key}")
    visits = result.visits
    states = {state: sum(1 for v in visits if v.state is state) for state in VisitState}
    lines.append("")
    lines.append(f"{len(visits)} visits: " + ", ".join(
        f"{count} {state.value}" for state, count in states.items() if count))
    return lines


def run(args: argparse.Namespace) -> int:
    from .. import check_cache

    variant = "json" if args.json else ("all" if args.all else "summary")
    use_cache = not os.environ.get("ACCEPTANCE_NO_CACHE")
    key = check_cache.fingerprint(args.job) if use_cache else None
    cached = check_cache.load(args.job, key, variant) if key else None
    if cached is not None:
        code, text = cached
        out, _, err = text.partition("\0")
        sys.stdout.write(out)
        sys.stderr.write(err)
        return code
    out, err = io.StringIO(), io.StringIO()
    code = _evaluate_and_print(args, out, err)
    sys.stdout.write(out.getvalue())
    sys.stderr.write(err.getvalue())
    if key:
        check_cache.store(args.job, key, variant, code, out.getvalue() + "\0" + err.getvalue())
    return code


def _evaluate_and_print(args: argparse.Namespace, out: io.StringIO, err: io.StringIO) -> int:
    from ..evaluation import evaluate_job
    from ..loading import load_job
    from ..results import VisitState, to_json

    job = load_job(args.job)
    result = evaluate_job(job)
    if args.json:
        json.dump(to_json(result), out, ensure_ascii=False, indent=2)
        out.write("\n")
        altered = _report_signatures(job, err)
    else:
        lines = summary_lines(result, args.all)
        print("\n".join(lines[:-1]), file=out)
        altered = _report_signatures(job, out)
        print(lines[-1], file=out)  # the totals stay the last line
    return 0 if all(v.state is VisitState.PASS for v in result.visits) and not altered else 1


def _report_signatures(job: object, stream: io.StringIO) -> int:
    """Print each signed visit's sign-off state; return how many were altered after it."""
    from ..integrity import signature_statuses

    altered = 0
    for key, status in signature_statuses(job).items():  # type: ignore[arg-type]
        if status.state == "unsigned":
            continue
        who = ", ".join(f"{c.name} ({c.role})" for c in status.checks)
        print(f"{key}: {status.phrase.upper() if status.state != 'signed' else status.phrase}"
              f" — {who}", file=stream)
        for reason in status.reasons:
            print(f"    {reason}", file=stream)
        altered += status.state != "signed"
    return altered
