"""Sign-off that cannot be altered silently, and verification of signed visits and built sites.

A signature record covers a digest of everything a visit's verdicts rest on: the visit file,
the machine file, the checklists the machine uses, the register entries of the instruments the
readings name, the job's limits and local rules, the files a reading or the visit attaches,
and the tool version. The record lives beside those files, never inside them
(``machines/<id>/signatures/<visit>.yaml``), so writing it changes nothing it covers.

Canonical form. A YAML input is digested as the SHA-256 of its parsed data written as JSON
with sorted keys, no insignificant white space and UTF-8 (:func:`canonical_json`): comments,
key order and layout are not part of what was signed, every value is. Other files (captures,
photos) are digested from their raw bytes. The visit's digest is the SHA-256 of the canonical
JSON of ``{"schema", "tool_version", "inputs": {name: digest}}``, so a record can say which
input changed, not only that one did.

Upgrades are not tampering. The tool version is recorded (and is part of the digest, so the
record holds together), but only the inputs decide whether a visit was *altered after
sign-off*. The record also keeps the verdicts the tool computed at sign-off; a later tool
version that computes the same verdicts leaves the visit "signed, unchanged", and one that
computes others says which verdicts changed and that a later version of the rules made the
difference.

An optional Ed25519 signature (RFC 8032) covers a statement naming the machine, the visit,
the signer, the role, the time and that digest; the record carries the public key and its
fingerprint, and ``verify --public-key`` says whether that key is one the reader trusts.
"""

from __future__ import annotations

import base64
import dataclasses
import datetime as _dt
import hashlib
import json
import os
from collections.abc import Iterable, Iterator
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Literal

import yaml
from pydantic import ValidationError

from . import __version__
from .errors import AcceptanceError, InputError
from .evaluation import evaluate_job
from .loading import Job, LoadedMachine, LoadedVisit, load_job
from .signature_records import (
    SIGNATURE_SCHEMA,
    SIGNATURES_DIR,
    SignatureEntry,
    SignatureFile,
    SignatureKey,
    signature_path,
)
from .sitefiles import (
    BOOKKEEPING_NAMES,
    MANIFEST_NAME,
    MANIFEST_SIGNATURE_NAME,
    file_sha256,
    read_manifest,
    read_text_file,
    site_files,
)
from .yamlfile import load_yaml

__all__ = [
    "SIGNATURE_SCHEMA", "SIGNED_INPUTS_SCHEMA", "SIGNATURES_DIR", "MANIFEST_SIGNATURE_NAME",
    "manifest_signature",
    "IntegrityError", "KeyPair", "SignatureEntry", "SignatureFile", "SignatureCheck",
    "SignatureStatus", "SignedInput", "SiteReport", "canonical_json", "fingerprint",
    "generate_key", "load_private_key", "load_public_key", "signature_path", "signed_at_now",
    "sign_visit", "visit_inputs", "visit_digest", "check_visit_signatures",
    "signature_statuses", "visit_verdicts", "sign_manifest", "verify_site", "verify_job",
    "manifest_signed_by", "BOOKKEEPING_NAMES",
]

SIGNED_INPUTS_SCHEMA = "acceptance-signed-inputs/1"

# Fields of job.yaml that describe the job and decide no verdict; renaming the site or the
# contractor must not invalidate every signature. Everything else (limits, local rules,
# decision rule, coverage factor, standards and whatever is added later) is covered.
_DESCRIPTIVE_JOB_FIELDS = frozenset({"title", "site", "contractor", "client", "notes"})

_HEADER = (
    "# Sign-off record written by `acceptance sign`. It lives outside the files it covers,\n"
    "# so signing changed none of them. Do not edit it: any change to it, or to the files it\n"
    "# covers, shows the visit as altered after sign-off.\n")


class IntegrityError(AcceptanceError):
    """A key, a signature record or a site cannot be used as asked."""

    exit_code = 2


# ------------------------------------------------------------------ canonical digests


def canonical_json(data: Any) -> bytes:
    """``data`` as JSON with sorted keys, compact separators and UTF-8 (RFC 8259)."""
    return json.dumps(data, sort_keys=True, ensure_ascii=False, separators=(",", ":"),
                      allow_nan=False).encode("utf-8")


def _sha256(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


@dataclass(frozen=True)
class SignedInput:
    """One input a visit's verdicts rest on, with its digest."""

    name: str  # "visit", "machine", "job", "checklist:<id>", "instrument:<id>", "file:<path>"
    path: Path  # the file it was read from (an instrument: the register)
    digest: str
    description: str


def _capture_files(data: Any) -> Iterator[str]:
    if isinstance(data, dict):
        capture = data.get("capture")
        if isinstance(capture, dict) and isinstance(capture.get("file"), str):
            yield capture["file"]
        for value in data.values():
            yield from _capture_files(value)
    elif isinstance(data, list):
        for value in data:
            yield from _capture_files(value)


def visit_inputs(job: Job, machine: LoadedMachine, visit: LoadedVisit) -> list[SignedInput]:
    """Every input of ``visit``'s verdicts, in a stable order."""
    inputs = [
        SignedInput("visit", visit.path, _sha256(canonical_json(visit.document.data)),
                    f"visit file {visit.document.display_name}"),
        SignedInput("machine", machine.document.path,
                    _sha256(canonical_json(machine.document.data)),
                    f"machine file {machine.document.display_name}"),
    ]
    job_data = job.document.data if isinstance(job.document.data, dict) else {}
    rules = {key: value for key, value in job_data.items()
             if key not in _DESCRIPTIVE_JOB_FIELDS}
    inputs.append(SignedInput("job", job.document.path, _sha256(canonical_json(rules)),
                              f"limits, local rules and decision rule in "
                              f"{job.document.display_name}"))
    for checklist_id in sorted(set(machine.model.checklists)):
        loaded = job.checklists.get(checklist_id)
        if loaded is None:
            continue
        inputs.append(SignedInput(
            f"checklist:{checklist_id}", loaded.document.path,
            _sha256(canonical_json(loaded.document.data)),
            f"checklist {checklist_id} ({loaded.origin})"))
    recorded = [*visit.readings.values(), *(getattr(visit, "as_left", None) or {}).values()]
    used = {r.instrument for readings in recorded for r in readings if r.instrument}
    entries: dict[str, Any] = {}
    register = job.instruments_document
    if register is not None and isinstance(register.data, dict):
        for entry in register.data.get("instruments") or []:
            if isinstance(entry, dict) and entry.get("id") in used:
                entries[str(entry["id"])] = entry
    for instrument in sorted(used):
        inputs.append(SignedInput(
            f"instrument:{instrument}", register.path if register else job.root,
            _sha256(canonical_json(entries.get(instrument))),
            f"register entry of instrument {instrument}"))
    files = {a.path for a in visit.model.attachments} | set(_capture_files(visit.document.data))
    for relative in sorted(files):
        path = machine.folder / relative
        digest = _sha256(path.read_bytes()) if path.is_file() else "missing"
        inputs.append(SignedInput(f"file:{relative}", path, digest,
                                  f"attached file {machine.id}/{relative}"))
    return inputs


def _combined_digest(inputs: dict[str, str], tool_version: str) -> str:
    return "sha256:" + _sha256(canonical_json(
        {"schema": SIGNED_INPUTS_SCHEMA, "tool_version": tool_version, "inputs": inputs}))


def visit_digest(job: Job, machine: LoadedMachine, visit: LoadedVisit,
                 tool_version: str | None = None) -> tuple[str, dict[str, str]]:
    """The visit's digest and the digest of each input it covers."""
    inputs = {i.name: i.digest for i in visit_inputs(job, machine, visit)}
    return _combined_digest(inputs, tool_version or __version__), inputs


# ------------------------------------------------------------------ keys


def fingerprint(public_raw: bytes) -> str:
    """The first 128 bits of the SHA-256 of the raw 32-byte Ed25519 public key, as hex in
    groups of four (enough to tell keys apart by eye; the record keeps the whole key)."""
    digest = _sha256(public_raw)
    return " ".join(digest[i:i + 4] for i in range(0, 32, 4))


@dataclass(frozen=True)
class KeyPair:
    private: Any  # Ed25519PrivateKey
    public_raw: bytes

    @property
    def fingerprint(self) -> str:
        return fingerprint(self.public_raw)


def _crypto() -> Any:
    from cryptography.hazmat.primitives import serialization
    from cryptography.hazmat.primitives.asymmetric import ed25519

    return serialization, ed25519


def _raw_public(public_key: Any) -> bytes:
    serialization, _ = _crypto()
    return public_key.public_bytes(serialization.Encoding.Raw, serialization.PublicFormat.Raw)


def generate_key(path: Path, overwrite: bool = False) -> KeyPair:
    """Write a new Ed25519 private key to ``path`` (PEM, mode 0600) and its public key to
    ``path`` + ``.pub``."""
    serialization, ed25519 = _crypto()
    path = Path(path)
    public_path = path.with_name(path.name + ".pub")
    for target in (path, public_path):
        if target.exists() and not overwrite:
            raise IntegrityError(f"{target} exists; a key is never overwritten. Choose "
                                 "another file name")
    private = ed25519.Ed25519PrivateKey.generate()
    pem = private.private_bytes(serialization.Encoding.PEM, serialization.PrivateFormat.PKCS8,
                                serialization.NoEncryption())
    path.parent.mkdir(parents=True, exist_ok=True)
    descriptor = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_TRUNC, 0o600)
    with os.fdopen(descriptor, "wb") as handle:
        handle.write(pem)
    public_path.write_bytes(private.public_key().public_bytes(
        serialization.Encoding.PEM, serialization.PublicFormat.SubjectPublicKeyInfo))
    return KeyPair(private, _raw_public(private.public_key()))


def _read_key_file(path: Path) -> bytes:
    """The bytes of a key file, or an :class:`IntegrityError` that says what is wrong."""
    path = Path(path)
    try:
        return path.read_bytes()
    except FileNotFoundError:
        raise IntegrityError(f"{path}: key file not found; create one with "
                             "`acceptance keygen FILE`") from None
    except IsADirectoryError:
        raise IntegrityError(f"{path}: is a folder, not a key file; give the key file "
                             "itself (made by `acceptance keygen FILE`)") from None
    except OSError as error:
        raise IntegrityError(f"{path}: the key file cannot be read ({error.strerror}); "
                             "check that it exists and that you may read it") from None


def load_private_key(path: Path) -> KeyPair:
    serialization, ed25519 = _crypto()
    try:
        key = serialization.load_pem_private_key(_read_key_file(path), password=None)
    except (ValueError, TypeError) as error:
        raise IntegrityError(f"{path}: not an unencrypted PEM private key ({error})") from None
    if not isinstance(key, ed25519.Ed25519PrivateKey):
        raise IntegrityError(f"{path}: not an Ed25519 key; create one with "
                             "`acceptance keygen FILE`")
    return KeyPair(key, _raw_public(key.public_key()))


def load_public_key(path: Path) -> bytes:
    """The raw public key from a public key file (or from a private key file)."""
    serialization, ed25519 = _crypto()
    data = _read_key_file(path)
    try:
        key = serialization.load_pem_public_key(data)
    except ValueError:
        return load_private_key(path).public_raw
    if not isinstance(key, ed25519.Ed25519PublicKey):
        raise IntegrityError(f"{path}: not an Ed25519 public key")
    return _raw_public(key)


def _sign(key: KeyPair, message: bytes) -> str:
    return base64.b64encode(key.private.sign(message)).decode("ascii")


def _verify(public_raw: bytes, signature_b64: str, message: bytes) -> bool:
    from cryptography.exceptions import InvalidSignature

    _, ed25519 = _crypto()
    try:
        public = ed25519.Ed25519PublicKey.from_public_bytes(public_raw)
        public.verify(base64.b64decode(signature_b64, validate=True), message)
    except (InvalidSignature, ValueError):
        return False
    return True


# ------------------------------------------------------------------ signature records


def _statement(machine: str, visit: str, entry_name: str, role: str, signed_at: str,
               digest: str, verdicts: dict[str, str] | None = None) -> bytes:
    statement: dict[str, Any] = {"schema": SIGNATURE_SCHEMA, "machine": machine,
                                 "visit": visit, "name": entry_name, "role": role,
                                 "signed_at": signed_at, "digest": digest}
    if verdicts is not None:  # records written before verdicts were kept have none
        statement["verdicts"] = verdicts
    return canonical_json(statement)


def visit_verdicts(visit: Any) -> dict[str, str]:
    """What the tool computed for a visit (a :class:`~acceptance.results.VisitResult`): its
    state and each item's verdict, as kept in a signature record."""
    verdicts = {"visit": str(visit.state.value)}
    for item in visit.items:
        verdicts[item.key] = str(item.verdict.value)
    return verdicts


def signed_at_now() -> str:
    """Now in UTC, or ``SOURCE_DATE_EPOCH`` when set (reproducible builds convention)."""
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    moment = (_dt.datetime.fromtimestamp(int(epoch), _dt.UTC) if epoch
              else _dt.datetime.now(_dt.UTC))
    return moment.replace(microsecond=0).strftime("%Y-%m-%dT%H:%M:%SZ")


def _read_record(path: Path) -> SignatureFile:
    try:
        document = load_yaml(path)
        return SignatureFile.model_validate(document.data)
    except InputError as error:
        raise IntegrityError(f"{path}: cannot be read: {error}") from None
    except ValidationError as error:
        raise IntegrityError(f"{path}: not a signature record: {error}") from None


def _write_record(path: Path, record: SignatureFile) -> None:
    data = record.model_dump(by_alias=True, exclude_none=True)
    text = _HEADER + yaml.safe_dump(data, sort_keys=False, allow_unicode=True, width=100)
    path.parent.mkdir(parents=True, exist_ok=True)
    staging = path.with_name(f".{path.name}.tmp-{os.getpid()}")
    staging.write_text(text, encoding="utf-8")
    os.replace(staging, path)


@dataclass(frozen=True)
class SignOutcome:
    path: Path
    entry: SignatureEntry
    previous: int  # signatures already in the record


def sign_visit(job: Job, machine_id: str, visit_id: str, name: str, role: str,
               key: KeyPair | None = None, signed_at: str | None = None,
               verdicts: dict[str, str] | None = None) -> SignOutcome:
    """Add a signature for the visit's current inputs to its record; never rewrite one.

    ``verdicts`` (from :func:`visit_verdicts`) are what the tool computes for the visit now;
    they are kept so that a later tool version can say which verdicts it computes otherwise.
    """
    machine = next((m for m in job.machines if m.id == machine_id), None)
    if machine is None:
        known = ", ".join(m.id for m in job.machines)
        raise IntegrityError(f"no machine '{machine_id}' in {job.root}; known: {known}")
    visit = next((v for v in machine.visits if v.id == visit_id), None)
    if visit is None:
        known = ", ".join(v.id for v in machine.visits) or "none"
        raise IntegrityError(f"machine '{machine_id}' has no visit '{visit_id}'; "
                             f"known: {known}")
    if not name.strip() or not role.strip():
        raise IntegrityError("a signature needs a name and a role")
    digest, inputs = visit_digest(job, machine, visit)
    moment = signed_at or signed_at_now()
    path = signature_path(machine.folder, visit_id)
    existing = _read_record(path).signatures if path.exists() else []
    for previous in existing:
        if (previous.name, previous.role, previous.digest) == (name, role, digest):
            raise IntegrityError(
                f"{path} already holds a signature by {name} as {role} for these very "
                "inputs; nothing was written")
    entry_key = signature = None
    if key is not None:
        entry_key = SignatureKey(public_key=base64.b64encode(key.public_raw).decode("ascii"),
                                 fingerprint=key.fingerprint)
        signature = _sign(key, _statement(machine_id, visit_id, name, role, moment, digest,
                                          verdicts))
    entry = SignatureEntry(name=name, role=role, signed_at=moment, tool_version=__version__,
                           digest=digest, inputs=inputs, key=entry_key, signature=signature,
                           verdicts=verdicts)
    record = SignatureFile(schema=SIGNATURE_SCHEMA, machine=machine_id, visit=visit_id,
                           signatures=[*existing, entry])
    _write_record(path, record)
    return SignOutcome(path, entry, len(existing))


# ------------------------------------------------------------------ checking signed visits


@dataclass(frozen=True)
class SignatureCheck:
    """One signature of a visit, checked against the inputs as they are now."""

    name: str
    role: str
    signed_at: str
    fingerprint: str | None
    # superseded: signed over earlier inputs, and a later signature covers the current ones
    state: Literal["valid", "altered", "invalid", "superseded"]
    changes: tuple[str, ...] = ()  # inputs changed since signing
    problems: tuple[str, ...] = ()  # the record itself does not hold together
    trusted: bool | None = None  # None: no trusted keys were given
    tool_version: str = ""  # the version that computed the verdicts at sign-off
    # verdicts a later tool version computes otherwise from the same inputs (not "altered")
    recomputed: tuple[str, ...] = ()

    @property
    def signed_date(self) -> str:
        return self.signed_at[:10]


@dataclass(frozen=True)
class SignatureStatus:
    """How a visit stands: unsigned, signed and unchanged, altered, or with a bad record."""

    state: Literal["unsigned", "signed", "altered", "invalid"]
    checks: tuple[SignatureCheck, ...] = ()
    record: str | None = None  # job-relative path of the signature record

    @property
    def phrase(self) -> str:
        return {"unsigned": "not signed", "signed": "signed, unchanged since sign-off",
                "altered": "altered after sign-off",
                "invalid": "signature does not verify"}[self.state]

    @property
    def reasons(self) -> list[str]:
        return list(dict.fromkeys(text for check in self.checks
                                  if check.state in ("altered", "invalid")
                                  for text in (*check.problems, *check.changes)))

    @property
    def upgrade_notes(self) -> list[str]:
        """What a later tool version computes otherwise from the signed, unchanged inputs:
        never a sign of tampering, said apart from it."""
        return list(dict.fromkeys(text for check in self.checks if check.state == "valid"
                                  for text in check.recomputed))


def _describe_changes(entry: SignatureEntry, current: dict[str, str],
                      descriptions: dict[str, str]) -> list[str]:
    changes = []
    for name in sorted(set(entry.inputs) | set(current)):
        then, now = entry.inputs.get(name), current.get(name)
        what = descriptions.get(name, name)
        if then == now:
            continue
        if then is None:
            changes.append(f"{what} added since sign-off")
        elif now is None:
            changes.append(f"{name.replace(':', ' ')} no longer used (was covered)")
        elif now == "missing":
            changes.append(f"{what} is missing")
        else:
            changes.append(f"{what} changed")
    return changes


def _recomputed(entry: SignatureEntry, verdicts: dict[str, str] | None) -> list[str]:
    """The verdicts this tool version computes otherwise than the one that signed."""
    if verdicts is None or entry.verdicts is None:
        return []
    notes = []
    for name in sorted(set(entry.verdicts) | set(verdicts)):
        then, now = entry.verdicts.get(name, "not computed"), verdicts.get(name, "not computed")
        if then != now:
            what = "the visit" if name == "visit" else f"item {name}"
            notes.append(f"{what}: {then} when signed with acceptance {entry.tool_version}, "
                         f"{now} with acceptance {__version__} from the same inputs (a rule "
                         "corrected in a later version, not a change to the visit)")
    return notes


def check_visit_signatures(job: Job, machine: LoadedMachine, visit: LoadedVisit,
                           trusted: Iterable[bytes] | None = None,
                           verdicts: dict[str, str] | None = None) -> SignatureStatus:
    """Check every signature of ``visit`` against its inputs as they are now.

    Only changed inputs make a visit *altered*; a later tool version is not a change. When
    ``verdicts`` (what this version computes, :func:`visit_verdicts`) are given, a signature
    that kept its verdicts says which of them this version computes otherwise.
    """
    records = list(getattr(visit, "signatures", None) or [])
    path = signature_path(machine.folder, visit.id)
    if not records:
        return SignatureStatus("unsigned")
    trusted_set = set(trusted) if trusted is not None else None
    inputs = visit_inputs(job, machine, visit)
    current = {i.name: i.digest for i in inputs}
    descriptions = {i.name: i.description for i in inputs}
    checks = []
    for record in records:
        for entry in record.signatures:
            problems = []
            if (record.machine, record.visit) != (machine.id, visit.id):
                problems.append(f"the record names {record.machine}/{record.visit}, not "
                                f"{machine.id}/{visit.id}")
            if _combined_digest(entry.inputs, entry.tool_version) != entry.digest:
                problems.append("the record's input digests do not give its digest "
                                "(the record was edited)")
            fingerprint_text = None
            is_trusted = None
            if entry.key is not None or entry.signature is not None:
                if entry.key is None or entry.signature is None:
                    problems.append("the record has a key without a signature or a "
                                    "signature without a key")
                else:
                    try:
                        raw = base64.b64decode(entry.key.public_key, validate=True)
                    except ValueError:
                        raw = b""
                    fingerprint_text = fingerprint(raw) if len(raw) == 32 else None
                    message = _statement(record.machine, record.visit, entry.name, entry.role,
                                         entry.signed_at, entry.digest, entry.verdicts)
                    if fingerprint_text is None or not _verify(raw, entry.signature, message):
                        problems.append(f"the Ed25519 signature of {entry.name} does not "
                                        "verify with the key in the record")
                    elif fingerprint_text != entry.key.fingerprint:
                        problems.append("the fingerprint printed on the record is not "
                                        "that of its key")
                    if trusted_set is not None:
                        is_trusted = raw in trusted_set
                        if not is_trusted:
                            problems.append(f"signed with key {fingerprint_text}, which is "
                                            "not one of the trusted keys given")
            elif trusted_set is not None:
                is_trusted = False
                problems.append(f"{entry.name}'s signature carries no key, and trusted keys "
                                "were asked for")
            changes = _describe_changes(entry, current, descriptions)
            state: Literal["valid", "altered", "invalid"] = (
                "invalid" if problems else "altered" if changes else "valid")
            recomputed = _recomputed(entry, verdicts) if state == "valid" else []
            checks.append(SignatureCheck(entry.name, entry.role, entry.signed_at,
                                         fingerprint_text, state, tuple(changes),
                                         tuple(problems), is_trusted, entry.tool_version,
                                         tuple(recomputed)))
    # A later signature over the current inputs (a re-sign after the changes were reviewed)
    # supersedes earlier ones made over other inputs; they stay listed, never removed.
    latest_valid = max((n for n, c in enumerate(checks) if c.state == "valid"), default=-1)
    checks = [dataclasses.replace(c, state="superseded")
              if c.state == "altered" and n < latest_valid else c
              for n, c in enumerate(checks)]
    states = {c.state for c in checks}
    overall: Literal["signed", "altered", "invalid"] = (
        "invalid" if "invalid" in states else "altered" if "altered" in states else "signed")
    try:
        shown = path.relative_to(job.root.parent).as_posix()
    except ValueError:
        shown = path.as_posix()
    return SignatureStatus(overall, tuple(checks), shown)


def signature_statuses(job: Job, result: Any = None) -> dict[str, SignatureStatus]:
    """``machine/visit`` → its signature status, for every visit of the job; with the job's
    ``result``, each says which verdicts this tool version computes otherwise."""
    computed = ({f"{v.machine}/{v.id}": visit_verdicts(v) for v in result.visits}
                if result is not None else {})
    return {f"{m.id}/{v.id}": check_visit_signatures(job, m, v,
                                                     verdicts=computed.get(f"{m.id}/{v.id}"))
            for m in job.machines for v in m.visits}


# ------------------------------------------------------------------ built sites


def manifest_signature(manifest: bytes, key: KeyPair) -> str:
    """The text of ``MANIFEST.sha256.sig`` for a manifest's bytes. Ed25519 signatures are
    deterministic (RFC 8032 clause 5.1.6), so the same manifest and key give the same text."""
    return (f"algorithm: ed25519\n"
            f"public_key: {base64.b64encode(key.public_raw).decode('ascii')}\n"
            f"fingerprint: {key.fingerprint}\n"
            f"signature: {_sign(key, manifest)}\n")


def sign_manifest(manifest: Path, key: KeyPair) -> Path:
    """Write ``MANIFEST.sha256.sig`` beside ``manifest``: an Ed25519 signature of its bytes."""
    target = manifest.with_name(MANIFEST_SIGNATURE_NAME)
    target.write_text(manifest_signature(manifest.read_bytes(), key), encoding="utf-8")
    return target


@dataclass
class SiteReport:
    """What ``verify`` found: every mismatch, and what was checked."""

    kind: Literal["site", "job"]
    checked: int = 0
    problems: list[str] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)

    @property
    def ok(self) -> bool:
        return not self.problems


def _verify_manifest_signature(site: Path, report: SiteReport,
                               trusted: set[bytes] | None) -> None:
    signature_file = site / MANIFEST_SIGNATURE_NAME
    if not signature_file.is_file():
        if trusted is not None:
            report.problems.append(f"{MANIFEST_SIGNATURE_NAME}: missing, but trusted keys "
                                   "were given")
        else:
            report.notes.append("the manifest is not signed (no MANIFEST.sha256.sig)")
        return
    raw = _manifest_signer(site)
    if raw is None:
        report.problems.append(f"{MANIFEST_SIGNATURE_NAME}: the signature does not verify "
                               "the manifest")
        return
    shown = fingerprint(raw)
    if trusted is not None and raw not in trusted:
        report.problems.append(f"{MANIFEST_SIGNATURE_NAME}: signed with key {shown}, which "
                               "is not one of the trusted keys given")
        return
    report.notes.append(f"manifest signature verifies (key {shown})")


def _manifest_signer(site: Path) -> bytes | None:
    """The raw public key whose signature in ``MANIFEST.sha256.sig`` verifies the site's
    manifest; None when there is none, it cannot be read or it does not verify."""
    try:
        text = read_text_file(site / MANIFEST_SIGNATURE_NAME, "manifest signature")
        manifest_bytes = (site / MANIFEST_NAME).read_bytes()
    except (ValueError, OSError):
        return None
    fields = {}
    for line in text.splitlines():
        key, _, value = line.partition(":")
        fields[key.strip()] = value.strip()
    try:
        raw = base64.b64decode(fields.get("public_key", ""), validate=True)
    except ValueError:
        return None
    if len(raw) != 32 or not _verify(raw, fields.get("signature", ""), manifest_bytes):
        return None
    return raw


def manifest_signed_by(site: Path, public_raw: bytes) -> bool:
    """Whether the manifest of the site at ``site`` is signed by ``public_raw``'s key."""
    return _manifest_signer(Path(site)) == public_raw


def verify_site(site: Path, trusted: Iterable[bytes] | None = None,
                ignored: Iterable[str] = ()) -> SiteReport:
    """Check a built site against its ``MANIFEST.sha256`` (and its signature, if present)."""
    site = Path(site)
    report = SiteReport("site")
    try:
        manifest = read_manifest(site / MANIFEST_NAME)
    except ValueError as error:
        raise IntegrityError(str(error)) from None
    except OSError as error:
        raise IntegrityError(f"{site / MANIFEST_NAME}: cannot be read ({error.strerror})"
                             ) from None
    for number in manifest.bad_lines:
        report.problems.append(f"{MANIFEST_NAME}:{number}: not a sha256sum line")
    listed = manifest.digests
    root = site.resolve()
    for name, digest in sorted(listed.items()):
        path = site / name
        report.checked += 1
        if not path.resolve().is_relative_to(root) or name.split("/", 1)[0] in (
                BOOKKEEPING_NAMES):
            report.problems.append(f"{name}: the manifest names a file outside the site")
        elif path.is_symlink():
            report.problems.append(f"{name}: a symbolic link, not a file of the site")
        elif not path.is_file():
            report.problems.append(f"{name}: missing")
        elif file_sha256(path) != digest:
            report.problems.append(f"{name}: content differs from the manifest")
    skipped = set(ignored)
    # Every file but the build's own bookkeeping (BOOKKEEPING_NAMES, at the top level only)
    # must be listed.
    for name in site_files(site):
        if name not in listed and name not in skipped:
            report.problems.append(f"{name}: not in the manifest (added after the build)")
    _verify_manifest_signature(site, report,
                               set(trusted) if trusted is not None else None)
    return report


def verify_job(root: Path, trusted: Iterable[bytes] | None = None) -> SiteReport:
    """Check every signed visit of the job at ``root``: digest and signature."""
    job = load_job(root)
    computed = {f"{v.machine}/{v.id}": visit_verdicts(v) for v in evaluate_job(job).visits}
    report = SiteReport("job")
    trusted_list = list(trusted) if trusted is not None else None
    for machine in job.machines:
        for visit in machine.visits:
            status = check_visit_signatures(job, machine, visit, trusted_list,
                                            computed.get(f"{machine.id}/{visit.id}"))
            if status.state == "unsigned":
                report.notes.append(f"{machine.id}/{visit.id}: not signed")
                continue
            for check in status.checks:
                report.checked += 1
                who = f"{machine.id}/{visit.id}: {check.name} ({check.role}, {check.signed_at})"
                if check.state in ("valid", "superseded"):
                    key = f", key {check.fingerprint}" if check.fingerprint else ", no key"
                    report.notes.append(f"{who}: " + ("unchanged since sign-off" if
                                        check.state == "valid" else "superseded by a later "
                                        "signature over the current inputs") + key)
                    report.notes.extend(f"{who}: {note}" for note in check.recomputed)
                    continue
                for problem in check.problems:
                    report.problems.append(f"{who}: {problem}")
                for change in check.changes:
                    report.problems.append(f"{who}: altered after sign-off: {change}")
    return report
