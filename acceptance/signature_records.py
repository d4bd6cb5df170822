"""Sign-off records: ``machines/<id>/signatures/<visit>.yaml``, their format and where they live.

Loading reads these records into each visit; :mod:`acceptance.integrity` writes them and
checks what they cover. Kept apart from integrity so that loading does not import the
module that imports loading.
"""

from __future__ import annotations

from pathlib import Path
from typing import Literal

from pydantic import BaseModel, ConfigDict, Field

__all__ = ["SIGNATURE_SCHEMA", "SIGNATURES_DIR", "SignatureEntry", "SignatureFile",
           "SignatureKey", "signature_path"]

SIGNATURE_SCHEMA = "acceptance-signature/1"
SIGNATURES_DIR = "signatures"


class _Strict(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True)


class SignatureKey(_Strict):
    algorithm: Literal["ed25519"] = "ed25519"
    public_key: str = Field(description="raw 32-byte public key, base64")
    fingerprint: str = Field(description="first 128 bits of the SHA-256 of the raw key, hex")


class SignatureEntry(_Strict):
    """One person's sign-off of one visit."""

    name: str
    role: str
    signed_at: str = Field(description="UTC, ISO 8601, e.g. 2026-03-10T16:00:00Z")
    tool_version: str
    digest: str = Field(pattern=r"^sha256:[0-9a-f]{64}$")
    inputs: dict[str, str]
    key: SignatureKey | None = None
    signature: str | None = Field(None, description="Ed25519 over the statement, base64")
    # What the tool computed when the visit was signed: the visit's state ("visit") and each
    # item's verdict ("<checklist>.<item>"). Records written before it was kept have none.
    verdicts: dict[str, str] | None = None


class SignatureFile(_Strict):
    """``machines/<id>/signatures/<visit>.yaml``."""

    schema_: Literal["acceptance-signature/1"] = Field(alias="schema")
    machine: str
    visit: str
    signatures: list[SignatureEntry] = Field(min_length=1)


def signature_path(machine_folder: Path, visit_id: str) -> Path:
    return Path(machine_folder) / SIGNATURES_DIR / f"{visit_id}.yaml"
