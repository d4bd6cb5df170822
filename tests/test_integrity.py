"""Sign-off that cannot be altered silently, and verification of jobs and built sites.

Every tampering case is made after signing or building, and must be detected and reported
by name: a reading, a checklist limit, a replaced PDF, a removed or added file, and a
signature checked against a key other than the one that made it.
"""

from __future__ import annotations

import base64
import hashlib
import shutil
from pathlib import Path

import pytest
import yaml

from acceptance import cli
from acceptance.build import build_site
from acceptance.integrity import (
    IntegrityError,
    canonical_json,
    check_visit_signatures,
    generate_key,
    load_private_key,
    load_public_key,
    sign_visit,
    verify_job,
    verify_site,
    visit_digest,
)
from acceptance.loading import load_job
from acceptance.resources import checklists_dir
from tests.conftest import PASSING_SUPPLY

VISIT = "m1/v1"
# 2026-03-10T16:30:00Z, the reproducible-builds.org SOURCE_DATE_EPOCH convention [S]
EPOCH = "1773160200"


@pytest.fixture
def key(tmp_path: Path):
    return generate_key(tmp_path / "keys" / "supervisor.key")


@pytest.fixture
def signed_job(make_job, key, monkeypatch):
    """A passing job whose machine uses its own copy of the supply checklist, signed."""
    checklist = (checklists_dir() / "supply.yaml").read_text(encoding="utf-8")
    root = make_job(visit={"readings": {"supply": PASSING_SUPPLY}},
                    checklists={"supply.yaml": checklist})
    monkeypatch.setenv("SOURCE_DATE_EPOCH", EPOCH)
    sign_visit(load_job(root), "m1", "v1", "P. Test-Supervisor", "supervisor", key)
    return root


def visit_file(root: Path) -> Path:
    return root / "machines" / "m1" / "visits" / "v1.yaml"


def record_file(root: Path) -> Path:
    return root / "machines" / "m1" / "signatures" / "v1.yaml"


def status_of(root: Path, trusted=None):
    job = load_job(root)
    machine = job.machines[0]
    return check_visit_signatures(job, machine, machine.visits[0], trusted)


# ------------------------------------------------------------------ signing


def test_signing_records_who_when_and_the_digest_outside_the_covered_files(signed_job, key):
    record = yaml.safe_load(record_file(signed_job).read_text(encoding="utf-8"))
    (entry,) = record["signatures"]
    assert (record["machine"], record["visit"]) == ("m1", "v1")
    assert entry["name"] == "P. Test-Supervisor" and entry["role"] == "supervisor"
    assert entry["signed_at"] == "2026-03-10T16:30:00Z"
    assert entry["key"]["fingerprint"] == key.fingerprint
    job = load_job(signed_job)
    digest, inputs = visit_digest(job, job.machines[0], job.machines[0].visits[0])
    # Writing the record changed nothing it covers: the digest is the same afterwards.
    assert entry["digest"] == digest
    assert {"visit", "machine", "job", "checklist:supply", "instrument:dmm-1"} <= set(inputs)
    status = status_of(signed_job)
    assert status.state == "signed" and status.phrase == "signed, unchanged since sign-off"


def test_the_digest_is_sha256_of_canonical_json():
    # RFC 8259 JSON with sorted keys and no white space; SHA-256 per FIPS 180-4 [S]: the
    # digest of the empty string is e3b0c442…b855.
    assert hashlib.sha256(b"").hexdigest().startswith("e3b0c442")
    assert canonical_json({"b": 1, "a": ["µF", 2.5]}) == '{"a":["µF",2.5],"b":1}'.encode()


def test_a_second_signature_is_appended_and_said_so(signed_job, capsys):
    assert cli.main(["sign", str(signed_job), VISIT, "--by", "Q. Installer",
                     "--role", "installer"]) == 0
    out = capsys.readouterr().out
    assert "added a second signature" in out and "earlier ones are kept" in out
    record = yaml.safe_load(record_file(signed_job).read_text(encoding="utf-8"))
    assert [s["name"] for s in record["signatures"]] == ["P. Test-Supervisor", "Q. Installer"]


def test_the_same_signature_twice_is_refused(signed_job, key, capsys):
    before = record_file(signed_job).read_bytes()
    with pytest.raises(IntegrityError, match="already holds a signature by P. Test-Supervisor"):
        sign_visit(load_job(signed_job), "m1", "v1", "P. Test-Supervisor", "supervisor", key)
    assert record_file(signed_job).read_bytes() == before


def test_sign_names_an_unknown_visit(signed_job, capsys):
    assert cli.main(["sign", str(signed_job), "m1/v2", "--by", "A", "--role", "b"]) == 2
    assert "machine 'm1' has no visit 'v2'; known: v1" in capsys.readouterr().err


# ------------------------------------------------------------------ tampering with a job


def test_a_reading_changed_after_signing_is_detected(signed_job, capsys):
    path = visit_file(signed_job)
    path.write_text(path.read_text(encoding="utf-8").replace("401 V", "402 V"),
                    encoding="utf-8")
    status = status_of(signed_job)
    assert status.state == "altered"
    assert status.reasons == ["visit file job/machines/m1/visits/v1.yaml changed"]
    report = verify_job(signed_job)
    assert not report.ok
    assert report.problems == [
        "m1/v1: P. Test-Supervisor (supervisor, 2026-03-10T16:30:00Z): altered after "
        "sign-off: visit file job/machines/m1/visits/v1.yaml changed"]
    assert cli.main(["verify", str(signed_job)]) == 1
    assert "MISMATCH m1/v1" in capsys.readouterr().err
    # check says it too, and does not pass a visit whose signed record was altered
    assert cli.main(["check", str(signed_job)]) == 1
    assert "m1/v1: ALTERED AFTER SIGN-OFF" in capsys.readouterr().out


def test_a_checklist_limit_changed_after_signing_is_detected(signed_job):
    path = signed_job / "checklists" / "supply.yaml"
    text = path.read_text(encoding="utf-8")
    assert "lower: -10 %" in text
    path.write_text(text.replace("lower: -10 %", "lower: -5 %", 1), encoding="utf-8")
    status = status_of(signed_job)
    assert status.state == "altered"
    assert status.reasons == ["checklist supply (job/checklists/supply.yaml) changed"]
    assert not verify_job(signed_job).ok


def test_a_comment_or_layout_change_is_not_a_change(signed_job):
    # The canonical form is the parsed data: a comment decides no verdict.
    path = visit_file(signed_job)
    path.write_text("# checked again on site\n" + path.read_text(encoding="utf-8"),
                    encoding="utf-8")
    assert status_of(signed_job).state == "signed"


def test_an_edited_record_does_not_verify(signed_job):
    path = record_file(signed_job)
    path.write_text(path.read_text(encoding="utf-8").replace("P. Test-Supervisor",
                                                             "X. Someone-Else"),
                    encoding="utf-8")
    status = status_of(signed_job)
    assert status.state == "invalid"
    assert any("does not verify" in reason for reason in status.reasons)


def test_a_keyless_record_whose_digests_were_edited_does_not_hold(make_job):
    root = make_job(visit={"readings": {"supply": PASSING_SUPPLY}})
    sign_visit(load_job(root), "m1", "v1", "A. Person", "installer")
    # Someone edits the reading and pastes the new visit digest into the record.
    visit_file(root).write_text(visit_file(root).read_text(encoding="utf-8")
                                .replace("401 V", "420 V"), encoding="utf-8")
    job = load_job(root)
    _, inputs = visit_digest(job, job.machines[0], job.machines[0].visits[0])
    record = record_file(root)
    data = yaml.safe_load(record.read_text(encoding="utf-8"))
    data["signatures"][0]["inputs"]["visit"] = inputs["visit"]
    record.write_text(yaml.safe_dump(data, sort_keys=False), encoding="utf-8")
    status = status_of(root)
    assert status.state == "invalid"
    assert "the record's input digests do not give its digest (the record was edited)" \
        in status.reasons


def test_a_later_signature_over_the_current_inputs_supersedes(signed_job, key):
    path = visit_file(signed_job)
    path.write_text(path.read_text(encoding="utf-8").replace("401 V", "402 V"),
                    encoding="utf-8")
    sign_visit(load_job(signed_job), "m1", "v1", "P. Test-Supervisor", "supervisor", key)
    status = status_of(signed_job)
    assert status.state == "signed"
    assert [c.state for c in status.checks] == ["superseded", "valid"]


# ------------------------------------------------------------------ keys


def test_a_signature_made_with_one_key_fails_with_another(signed_job, key, tmp_path, capsys):
    other = generate_key(tmp_path / "keys" / "other.key")
    assert other.fingerprint != key.fingerprint
    # Trusting only the other key: the signature is reported, naming the key it was made with.
    status = status_of(signed_job, trusted=[other.public_raw])
    assert status.state == "invalid"
    assert status.reasons == [f"signed with key {key.fingerprint}, which is not one of the "
                              "trusted keys given"]
    assert cli.main(["verify", str(signed_job), "--public-key",
                     str(tmp_path / "keys" / "other.key.pub")]) == 1
    assert "not one of the trusted keys" in capsys.readouterr().err
    assert cli.main(["verify", str(signed_job), "--public-key",
                     str(tmp_path / "keys" / "supervisor.key.pub")]) == 0
    # Putting the other public key into the record: the signature no longer verifies.
    path = record_file(signed_job)
    text = path.read_text(encoding="utf-8")
    mine = base64.b64encode(key.public_raw).decode()
    theirs = base64.b64encode(other.public_raw).decode()
    path.write_text(text.replace(mine, theirs), encoding="utf-8")
    assert any("does not verify with the key in the record" in reason
               for reason in status_of(signed_job).reasons)


def test_keys_round_trip_and_are_never_overwritten(tmp_path, capsys):
    path = tmp_path / "k.key"
    assert cli.main(["keygen", str(path)]) == 0
    assert "fingerprint" in capsys.readouterr().out
    assert path.stat().st_mode & 0o777 == 0o600
    assert load_public_key(path.with_name("k.key.pub")) == load_private_key(path).public_raw
    assert cli.main(["keygen", str(path)]) == 2
    assert "a key is never overwritten" in capsys.readouterr().err


# ------------------------------------------------------------------ built sites


@pytest.fixture(scope="module")
def built_site(tmp_path_factory):
    """A signed job built with PDFs and a signed manifest, once for the module."""
    base = tmp_path_factory.mktemp("signed")
    from tests.conftest import write_job

    root = write_job(base / "job", visit={"readings": {"supply": PASSING_SUPPLY}})
    key = generate_key(base / "site.key")
    sign_visit(load_job(root), "m1", "v1", "P. Test-Supervisor", "supervisor", key)
    site = base / "site"
    build_site(root, site, key=base / "site.key")
    return site, root, base / "site.key.pub"


@pytest.fixture
def site_copy(built_site, tmp_path):
    site, _, public = built_site
    copy = tmp_path / "site"
    shutil.copytree(site, copy)
    return copy, public


def test_a_fresh_site_verifies_with_its_manifest_signature(site_copy, capsys):
    site, public = site_copy
    report = verify_site(site, [load_public_key(public)])
    assert report.ok, report.problems
    assert report.checked > 10
    assert cli.main(["verify", str(site), "--public-key", str(public)]) == 0
    assert "manifest signature verifies" in capsys.readouterr().out


def test_a_replaced_pdf_is_detected(site_copy, capsys):
    site, _ = site_copy
    record = site / "machines" / "m1" / "v1.pdf"
    # Another valid PDF in its place, as someone swapping a record would do.
    record.write_bytes((site / "package.pdf").read_bytes())
    report = verify_site(site)
    assert report.problems == ["machines/m1/v1.pdf: content differs from the manifest"]
    assert cli.main(["verify", str(site)]) == 1
    assert "MISMATCH machines/m1/v1.pdf: content differs" in capsys.readouterr().err


def test_a_removed_and_an_added_file_are_detected(site_copy):
    site, _ = site_copy
    (site / "deficiencies.csv").unlink()
    (site / "machines" / "m1" / "extra.html").write_text("<p>not built</p>", encoding="utf-8")
    assert verify_site(site).problems == [
        "deficiencies.csv: missing",
        "machines/m1/extra.html: not in the manifest (added after the build)"]


def test_a_rewritten_manifest_fails_its_signature(site_copy):
    site, public = site_copy
    record = site / "machines" / "m1" / "v1.pdf"
    record.write_bytes(b"%PDF-1.7 forged\n")
    manifest = site / "MANIFEST.sha256"
    lines = [line if not line.endswith("  machines/m1/v1.pdf")
             else f"{hashlib.sha256(record.read_bytes()).hexdigest()}  machines/m1/v1.pdf"
             for line in manifest.read_text(encoding="utf-8").splitlines()]
    manifest.write_text("\n".join(lines) + "\n", encoding="utf-8")
    assert verify_site(site).problems == [
        "MANIFEST.sha256.sig: the signature does not verify the manifest"]


def test_a_manifest_signed_with_one_key_fails_with_another(site_copy, tmp_path):
    site, public = site_copy
    other = generate_key(tmp_path / "other.key")
    signer = load_public_key(public)
    from acceptance.integrity import fingerprint

    assert verify_site(site, [other.public_raw]).problems == [
        f"MANIFEST.sha256.sig: signed with key {fingerprint(signer)}, which is not one of the "
        "trusted keys given"]


def test_an_altered_visit_is_marked_on_every_page_where_it_appears(built_site, tmp_path):
    _, root, _ = built_site
    job = tmp_path / "job"
    shutil.copytree(root, job)
    path = visit_file(job)
    path.write_text(path.read_text(encoding="utf-8").replace("401 V", "400 V"),
                    encoding="utf-8")
    site = tmp_path / "altered"
    build_site(job, site, with_pdf=False)
    for page in ("index.html", "machines/m1/index.html", "machines/m1/v1.html"):
        assert "altered after sign-off" in (site / page).read_text(encoding="utf-8"), page
    visit_page = (site / "machines/m1/v1.html").read_text(encoding="utf-8")
    assert "visit file job/machines/m1/visits/v1.yaml changed" in visit_page
    assert "altered after sign-off" in (site / "deficiencies.csv").read_text(encoding="utf-8") \
        or "v1" not in (site / "deficiencies.csv").read_text(encoding="utf-8")


def test_the_demo_shows_a_signed_record(tmp_path):
    from tests.conftest import DEMO_JOB

    demo_key = load_public_key(DEMO_JOB / "keys" / "demo-signing.key.pub")
    job = load_job(DEMO_JOB)
    machine = next(m for m in job.machines if m.id == "press-brake-1")
    visit = next(v for v in machine.visits if v.id == "2026-03-10-commissioning")
    status = check_visit_signatures(job, machine, visit, [demo_key])
    # Its signature verifies with the demo key; were the demo changed since, the record says
    # so ("altered"), and demo_job/keys/README.md says how to sign it again.
    assert status.state in ("signed", "altered"), status.reasons
    assert status.checks[-1].name == "M. Quillfeather"
    site = tmp_path / "site"
    build_site(DEMO_JOB, site, with_pdf=False)
    page = (site / "machines/press-brake-1/2026-03-10-commissioning.html").read_text(
        encoding="utf-8")
    assert "Signed records" in page and status.checks[-1].fingerprint in page


def test_build_with_a_key_signs_only_a_manifest_it_wrote_or_verified(built_site, site_copy,
                                                                    tmp_path):
    # build --key promises a signed manifest. A manifest signed by that very key, over a site
    # that still matches it, is signed as it is and nothing is written (Ed25519 signatures
    # are deterministic, RFC 8032 [S]); one the build cannot vouch for (signature removed,
    # made with another key) is written again from the job before it is signed.
    _, root, public = built_site
    site, _ = site_copy
    signature = site / "MANIFEST.sha256.sig"
    written = signature.stat().st_ino, signature.stat().st_mtime_ns
    assert build_site(root, site, key=public.with_name("site.key")).unchanged
    assert (signature.stat().st_ino, signature.stat().st_mtime_ns) == written
    signature.unlink()
    assert not build_site(root, site, key=public.with_name("site.key")).unchanged
    assert verify_site(site, [load_public_key(public)]).ok
    other = generate_key(tmp_path / "other.key")
    assert not build_site(root, site, key=tmp_path / "other.key").unchanged
    assert verify_site(site, [other.public_raw]).ok
    assert not verify_site(site, [load_public_key(public)]).ok
