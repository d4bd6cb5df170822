"""Load a job folder into the model, collecting every problem before giving up.

Validation runs in two stages, as a reader checks a form: first each file on its
own (types, units, dates, names), then across files (a reading names a known
instrument, a checklist item, a machine element). Problems from every file are
reported together, each as ``file:line:column: key.path: message``.
"""

from __future__ import annotations

from .job import load_job
from .loaded import (
    MAX_MACHINES,
    MAX_VISITS_PER_MACHINE,
    Job,
    LoadedChecklist,
    LoadedMachine,
    LoadedVisit,
    Reading,
    element_names,
    unit_dimension,
)

__all__ = [
    "Job", "LoadedChecklist", "LoadedMachine", "LoadedVisit", "Reading", "load_job",
    "element_names", "unit_dimension", "MAX_MACHINES", "MAX_VISITS_PER_MACHINE",
]
