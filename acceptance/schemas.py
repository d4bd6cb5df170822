"""JSON Schemas for every file kind, generated from the model, for editors and other tools."""

from __future__ import annotations

import json
from typing import Any

from pydantic import BaseModel

from .model import (
    Checklist,
    InstrumentRegister,
    JobFile,
    MachineFile,
    PunchListFile,
    VisitFile,
)
from .signature_records import SignatureFile

__all__ = ["FILE_KINDS", "schema_documents", "schema_text"]

FILE_KINDS: dict[str, tuple[type[BaseModel], str]] = {
    "job": (JobFile, "job.yaml"),
    "instruments": (InstrumentRegister, "instruments.yaml"),
    "machine": (MachineFile, "machines/<id>/machine.yaml"),
    "visit": (VisitFile, "machines/<id>/visits/<visit>.yaml"),
    "checklist": (Checklist, "checklists/<id>.yaml"),
    "punch-list": (PunchListFile, "punch_list.yaml"),
    # Written by ``acceptance sign``, never by hand; the schema lets other tools read them.
    "signature": (SignatureFile, "machines/<id>/signatures/<visit>.yaml"),
}


def schema_documents() -> dict[str, dict[str, Any]]:
    documents = {}
    for kind, (model, where) in FILE_KINDS.items():
        schema = model.model_json_schema()
        schema = {"$schema": "https://json-schema.org/draft/2020-12/schema",
                  "$id": f"{kind}.schema.json",
                  "title": f"acceptance {kind} file ({where})", **schema}
        documents[f"{kind}.schema.json"] = schema
    return documents


def schema_text(document: dict[str, Any]) -> str:
    return json.dumps(document, ensure_ascii=False, indent=2, sort_keys=True) + "\n"
