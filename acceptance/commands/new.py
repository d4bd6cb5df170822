"""``acceptance new JOB MACHINE --kind KIND``: write a blank visit file to fill in."""

from __future__ import annotations

import argparse
import datetime as _dt
import os
from pathlib import Path

from ..errors import InputError
from ..loading import load_job
from ..model import VisitKind, parse_date
from ..scaffold import visit_template
from ..schemas import schema_documents, schema_text


def register(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("job", type=Path, help="the job folder (holding job.yaml)")
    parser.add_argument("machine", help="machine id (its folder name under machines/)")
    parser.add_argument("--kind", required=True, choices=[k.value for k in VisitKind],
                        help="what kind of visit this is")
    parser.add_argument("--date", help="visit date, YYYY-MM-DD (default: today)")
    parser.add_argument("--id", dest="visit_id",
                        help="visit id, the file name without .yaml (default: DATE-KIND)")
    parser.add_argument("--force", action="store_true",
                        help="replace an existing visit file of the same id")


def run(args: argparse.Namespace) -> int:
    try:
        date = parse_date(args.date) if args.date else _dt.date.today()
    except ValueError as error:
        raise InputError.single("--date", str(error)) from None
    job = load_job(args.job, include_visits=False)
    machine = next((m for m in job.machines if m.id == args.machine), None)
    if machine is None:
        known = ", ".join(m.id for m in job.machines) or "none"
        raise InputError.single(str(args.job / "machines" / args.machine),
                                f"no machine '{args.machine}' in this job (machines: {known})")
    visit_id = args.visit_id or f"{date.isoformat()}-{args.kind}"
    target = machine.folder / "visits" / f"{visit_id}.yaml"
    if target.exists() and not args.force:
        raise InputError.single(str(target), "already exists and was left untouched; choose "
                                "another --id, or --force to replace it")
    # Editors find the schema beside the job, so the job folder stays self-contained.
    schema_folder = Path(args.job) / ".schemas"
    schema_folder.mkdir(exist_ok=True)
    for name, document in schema_documents().items():
        (schema_folder / name).write_text(schema_text(document), encoding="utf-8")
    reference = os.path.relpath(schema_folder / "visit.schema.json", target.parent)
    text = visit_template(job, machine, args.kind, date, Path(reference).as_posix())
    target.parent.mkdir(parents=True, exist_ok=True)
    temporary = target.with_name(f".{target.name}.tmp")
    temporary.write_text(text, encoding="utf-8")
    os.replace(temporary, target)
    print(f"{'replaced' if args.force else 'wrote'} {target}")
    return 0
