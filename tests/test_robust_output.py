"""The output side of robustness: a built site is verified before it is trusted, damaged
output is written again, a laundered site cannot be signed, and unreadable bookkeeping,
keys and output paths give a sentence, never a traceback.

Each case is made the way a careless or hostile user would: by editing, adding, deleting or
replacing files in a built site or around it, then running the tool as usual.
"""

from __future__ import annotations

import errno
import hashlib
import json
import os
import shutil
from pathlib import Path

import pytest

from acceptance import cli
from acceptance.build import build_site
from acceptance.integrity import generate_key, load_public_key, sign_visit, verify_site
from acceptance.loading import load_job
from acceptance.sitefiles import BOOKKEEPING_NAMES
from tests.conftest import PASSING_SUPPLY, write_job


def _no_traceback(text: str) -> None:
    assert "Traceback" not in text and "internal error" not in text


@pytest.fixture
def html_site(make_job, tmp_path) -> tuple[Path, Path]:
    root = make_job(visit={"readings": {"supply": PASSING_SUPPLY}})
    site = tmp_path / "site"
    build_site(root, site, with_pdf=False)
    assert verify_site(site).ok
    return root, site


# ------------------------------------------------------------------ a damaged site is rebuilt


@pytest.mark.parametrize("damage", ["deleted", "added", "edited", "edited-same-size",
                                    "manifest-line-rewritten"])
def test_a_rebuild_writes_a_damaged_site_again(html_site, damage):
    root, site = html_site
    page = site / "machines" / "m1" / "v1.html"
    if damage == "deleted":
        page.unlink()
    elif damage == "added":
        (site / "machines" / "m1" / "planted.html").write_text("<p>x</p>", encoding="utf-8")
    elif damage == "edited":
        page.write_text(page.read_text(encoding="utf-8") + "<p>x</p>", encoding="utf-8")
    elif damage == "edited-same-size":
        # Same size, mtime put back: only the build state's digest can tell.
        status = page.stat()
        data = bytearray(page.read_bytes())
        data[-2:-1] = b"X" if data[-2:-1] != b"X" else b"Y"
        page.write_bytes(bytes(data))
        os.utime(page, ns=(status.st_atime_ns, status.st_mtime_ns))
        report = build_site(root, site, with_pdf=False)
        # Size and mtime unchanged: the fast check trusts the file (documented); the
        # verification by digest still sees it, and a build with --key digests everything.
        assert report.unchanged
        assert not verify_site(site).ok
        return
    else:
        data = page.read_text(encoding="utf-8") + "<p>x</p>"
        page.write_text(data, encoding="utf-8")
        manifest = site / "MANIFEST.sha256"
        digest = hashlib.sha256(data.encode()).hexdigest()
        manifest.write_text("".join(
            f"{digest}  machines/m1/v1.html\n" if line.endswith("  machines/m1/v1.html\n")
            else line for line in manifest.read_text(encoding="utf-8").splitlines(True)),
            encoding="utf-8")
        assert verify_site(site).ok  # the manifest alone is fooled; the build is not
    report = build_site(root, site, with_pdf=False)
    assert not report.unchanged, damage
    assert verify_site(site).ok
    assert not (site / "machines" / "m1" / "planted.html").exists()
    assert "<p>x</p>" not in page.read_text(encoding="utf-8")
    # Once whole again, a rebuild writes nothing.
    assert build_site(root, site, with_pdf=False).unchanged


def test_the_build_state_records_size_mtime_and_digest_of_every_site_file(html_site):
    _, site = html_site
    state = json.loads((site / ".acceptance-build.json").read_text(encoding="utf-8"))
    listed = {line.split("  ", 1)[1]: line.split("  ", 1)[0] for line in
              (site / "MANIFEST.sha256").read_text(encoding="utf-8").splitlines()}
    assert set(state["files"]) == set(listed)
    for name, (size, mtime, digest) in state["files"].items():
        status = (site / name).stat()
        assert (size, mtime, digest) == (status.st_size, status.st_mtime_ns, listed[name])


# ------------------------------------------------------------------ verify: one list, exactly


def test_verify_skips_the_bookkeeping_names_at_the_top_level_only(html_site):
    _, site = html_site
    assert {".acceptance-site", ".acceptance-build.json", ".acceptance-package",
            "MANIFEST.sha256", "MANIFEST.sha256.sig"} == BOOKKEEPING_NAMES
    (site / "machines" / ".acceptance-site").write_text("x", encoding="utf-8")
    (site / "assets" / ".acceptance-evil.html").write_text("x", encoding="utf-8")
    (site / ".acceptance-other").write_text("x", encoding="utf-8")
    (site / "machines" / "MANIFEST.sha256").write_text("x", encoding="utf-8")
    assert sorted(verify_site(site).problems) == [
        ".acceptance-other: not in the manifest (added after the build)",
        "assets/.acceptance-evil.html: not in the manifest (added after the build)",
        "machines/.acceptance-site: not in the manifest (added after the build)",
        "machines/MANIFEST.sha256: not in the manifest (added after the build)"]


def test_verify_reports_a_planted_symbolic_link(html_site, tmp_path):
    _, site = html_site
    outside = tmp_path / "outside.html"
    outside.write_text("<p>outside</p>", encoding="utf-8")
    (site / "machines" / "m1" / "link.html").symlink_to(outside)
    assert verify_site(site).problems == [
        "machines/m1/link.html: not in the manifest (added after the build)"]


# ------------------------------------------------------------------ laundering with --key


@pytest.fixture(scope="module")
def signed_site(tmp_path_factory):
    base = tmp_path_factory.mktemp("launder")
    root = write_job(base / "job", visit={"readings": {"supply": PASSING_SUPPLY}})
    key = generate_key(base / "site.key")
    sign_visit(load_job(root), "m1", "v1", "P. Test-Supervisor", "supervisor", key)
    site = base / "site"
    build_site(root, site, key=base / "site.key")
    return root, site, base / "site.key"


@pytest.mark.parametrize("also_state", [False, True])
def test_a_laundered_site_is_not_signed_again(signed_site, tmp_path, also_state):
    # A record replaced, its manifest line rewritten to match (and the build state too);
    # the signature no longer verifies, so a rebuild with the key must not sign this
    # manifest: the record is rendered again from the job and the result verifies.
    root, original, key = signed_site
    site = tmp_path / "site"
    shutil.copytree(original, site)
    record = site / "machines" / "m1" / "v1.pdf"
    genuine = hashlib.sha256(record.read_bytes()).hexdigest()
    record.write_bytes((site / "package.pdf").read_bytes())
    forged = hashlib.sha256(record.read_bytes()).hexdigest()
    manifest = site / "MANIFEST.sha256"
    manifest.write_text(manifest.read_text(encoding="utf-8").replace(genuine, forged),
                        encoding="utf-8")
    if also_state:
        state_path = site / ".acceptance-build.json"
        state = json.loads(state_path.read_text(encoding="utf-8"))
        status = record.stat()
        state["files"]["machines/m1/v1.pdf"] = [status.st_size, status.st_mtime_ns, forged]
        state_path.write_text(json.dumps(state), encoding="utf-8")
    assert not verify_site(site, [load_public_key(key)]).ok
    report = build_site(root, site, key=key)
    assert not report.unchanged
    assert verify_site(site, [load_public_key(key)]).ok
    assert hashlib.sha256(record.read_bytes()).hexdigest() != forged


# ------------------------------------------------------------------ clear errors


def test_a_manifest_that_is_not_utf8_is_a_clear_error(html_site, capsys):
    root, site = html_site
    (site / "MANIFEST.sha256").write_bytes(b"\xff\xfe not text\n")
    assert cli.main(["verify", str(site)]) == 2
    err = capsys.readouterr().err
    _no_traceback(err)
    assert f"{site / 'MANIFEST.sha256'}: the manifest is not UTF-8 text" in err
    # The build takes it as damage and writes the site again.
    assert not build_site(root, site, with_pdf=False).unchanged
    assert verify_site(site).ok


def test_a_manifest_signature_that_is_not_utf8_does_not_verify(html_site, capsys):
    _, site = html_site
    (site / "MANIFEST.sha256.sig").write_bytes(b"signature: \xff\xff\n")
    assert cli.main(["verify", str(site)]) == 1
    captured = capsys.readouterr()
    _no_traceback(captured.err)
    assert "MANIFEST.sha256.sig: the signature does not verify the manifest" in captured.err


def test_a_signature_record_that_is_not_utf8_is_a_clear_error(make_job, capsys):
    root = make_job(visit={"readings": {"supply": PASSING_SUPPLY}})
    record = root / "machines" / "m1" / "signatures" / "v1.yaml"
    record.parent.mkdir()
    record.write_bytes(b"schema: \xff\n")
    assert cli.main(["verify", str(root)]) == 2
    err = capsys.readouterr().err
    _no_traceback(err)
    assert "v1.yaml" in err and "UTF-8" in err


@pytest.mark.parametrize("command", ["build", "verify"])
def test_a_key_path_that_is_a_folder_is_a_clear_error(html_site, tmp_path, capsys, command):
    root, site = html_site
    folder = tmp_path / "keys"
    folder.mkdir()
    argv = (["build", str(root), "-o", str(site), "--no-pdf", "--key", str(folder)]
            if command == "build" else ["verify", str(site), "--public-key", str(folder)])
    assert cli.main(argv) == 2
    err = capsys.readouterr().err
    _no_traceback(err)
    assert f"{folder}: is a folder, not a key file" in err


def test_an_output_path_that_is_a_symbolic_link_is_refused(make_job, tmp_path, capsys):
    root = make_job(visit={"readings": {"supply": PASSING_SUPPLY}})
    target = tmp_path / "elsewhere"
    target.mkdir()
    link = tmp_path / "site"
    link.symlink_to(target)
    assert cli.main(["build", str(root), "-o", str(link), "--no-pdf", "-q"]) == 3
    err = capsys.readouterr().err
    _no_traceback(err)
    assert f"{link} is a symbolic link" in err
    assert not any(target.iterdir()) and link.is_symlink()


@pytest.mark.parametrize("code", [errno.EROFS, errno.ENOSPC, errno.EACCES])
def test_a_full_or_read_only_disk_is_a_sentence_with_the_path(html_site, tmp_path, capsys,
                                                               monkeypatch, code):
    # The system refuses to write (root ignores chmod, so the refusal is made at the call).
    root, _ = html_site
    site = tmp_path / "fresh-site"
    real_mkdir = Path.mkdir

    def refuse(self, *args, **kwargs):
        if ".staging-" in self.name:
            raise OSError(code, os.strerror(code), str(self))
        return real_mkdir(self, *args, **kwargs)

    monkeypatch.setattr(Path, "mkdir", refuse)
    assert cli.main(["build", str(root), "-o", str(site), "--no-pdf", "-q"]) == 3
    err = capsys.readouterr().err
    _no_traceback(err)
    assert "cannot write" in err and str(site.parent) in err
    assert "nothing was replaced" in err


# ------------------------------------------------------------------ upgrades are not tampering


@pytest.fixture
def signed_job(make_job, monkeypatch):
    """A visit signed by an earlier tool version that computed a verdict otherwise."""
    import acceptance.integrity as integrity
    from acceptance.evaluation import evaluate_job

    root = make_job(visit={"readings": {"supply": PASSING_SUPPLY}})
    job = load_job(root)
    computed = integrity.visit_verdicts(evaluate_job(job).visits[0])
    then = dict(computed, visit="fail")  # what the earlier version's rules gave
    monkeypatch.setattr(integrity, "__version__", "0.0.1")
    integrity.sign_visit(job, "m1", "v1", "P. Test-Supervisor", "supervisor",
                         verdicts=then)
    monkeypatch.undo()
    return root, computed


def test_a_tool_upgrade_is_not_an_alteration(signed_job, capsys):
    from acceptance.integrity import check_visit_signatures

    root, computed = signed_job
    job = load_job(root)
    machine = job.machines[0]
    status = check_visit_signatures(job, machine, machine.visits[0], verdicts=computed)
    assert status.state == "signed" and status.reasons == []
    assert status.phrase == "signed, unchanged since sign-off"
    assert status.upgrade_notes == [
        f"the visit: fail when signed with acceptance 0.0.1, {computed['visit']} with "
        f"acceptance {__import__('acceptance').__version__} from the same inputs (a rule "
        "corrected in a later version, not a change to the visit)"]
    assert cli.main(["check", str(root)]) in (0, 1)
    out = capsys.readouterr().out
    assert "ALTERED" not in out and "a rule corrected in a later version" in out
    assert cli.main(["verify", str(root)]) == 0
    assert "a rule corrected in a later version" in capsys.readouterr().out


def test_a_record_without_kept_verdicts_still_reads(make_job):
    # Records written before the verdicts were kept have no "verdicts": they are checked as
    # before, and an upgrade alone does not flag them.
    import yaml

    from acceptance.integrity import check_visit_signatures

    root = make_job(visit={"readings": {"supply": PASSING_SUPPLY}})
    sign_visit(load_job(root), "m1", "v1", "P. Test-Supervisor", "supervisor")
    record = root / "machines" / "m1" / "signatures" / "v1.yaml"
    data = yaml.safe_load(record.read_text(encoding="utf-8"))
    assert "verdicts" not in data["signatures"][0]
    job = load_job(root)
    status = check_visit_signatures(job, job.machines[0], job.machines[0].visits[0],
                                    verdicts={"visit": "fail"})
    assert status.state == "signed" and status.upgrade_notes == []


def test_build_warns_about_an_altered_signed_visit_and_strict_fails(signed_job, tmp_path,
                                                                     capsys):
    root, _ = signed_job
    visit = root / "machines" / "m1" / "visits" / "v1.yaml"
    visit.write_text(visit.read_text(encoding="utf-8").replace("401 V", "402 V", 1),
                     encoding="utf-8")
    site = tmp_path / "site"
    assert cli.main(["build", str(root), "-o", str(site), "--no-pdf", "--strict"]) == 3
    err = capsys.readouterr().err
    _no_traceback(err)
    assert "--strict" in err and "m1/v1: altered after sign-off" in err
    assert not site.exists()
    assert cli.main(["build", str(root), "-o", str(site), "--no-pdf"]) == 0
    err = capsys.readouterr().err
    assert "warning: m1/v1: altered after sign-off: visit file" in err
    assert verify_site(site).ok


# ------------------------------------------------------------------ text stays text


def test_deficiency_cells_are_never_formulas(make_job, tmp_path):
    # The usual neutralisation (OWASP "CSV Injection") [P]: a leading apostrophe on a cell
    # starting with =, +, -, @, tab or CR.
    import csv

    from acceptance.text import csv_cell

    for value in ("=1+1", "+1", "-2", "@SUM(A1)", "\tx", "\rx"):
        assert csv_cell(value) == "'" + value
    assert csv_cell("plain") == "plain" and csv_cell("") == ""
    root = make_job(machine={"name": '=HYPERLINK("http://example.invalid","open")'},
                    visit={"readings": {"supply": {"voltage": {"L1-L2": "300 V"}}}})
    site = tmp_path / "site"
    build_site(root, site, with_pdf=False)
    rows = list(csv.reader((site / "deficiencies.csv").read_text(encoding="utf-8")
                           .splitlines()))
    assert len(rows) > 1
    for row in rows[1:]:
        assert any(cell.startswith("'=HYPERLINK") for cell in row)  # the machine's name
        assert not any(cell.startswith(("=", "+", "-", "@", "\t", "\r")) for cell in row)


def test_control_characters_never_reach_a_terminal_raw(make_job, capsys):
    from acceptance.text import terminal_text

    assert terminal_text("a\x1b[2Jb\u202ec\nd") == "a\\u001b[2Jb\\u202ec\nd"
    assert terminal_text("\x9b31m") == "\\u009b31m"
    # An escape sequence in a value that check echoes in its message.
    root = make_job(visit={"readings": {"supply": {"voltage": {"L1-L2": "\x1b[2J401 V"}}}})
    code = cli.main(["check", str(root)])
    captured = capsys.readouterr()
    assert code in (0, 1, 2)
    assert "\x1b" not in captured.out + captured.err
    assert "\\u001b[2J" in captured.out + captured.err


def test_xml_invalid_characters_never_reach_pdf_metadata(make_job, tmp_path):
    # XML 1.0 (5th ed.) clause 2.2 production [2] Char [S]: no C0 control but tab, LF, CR.
    from pypdf import PdfReader

    from acceptance.text import xml_text

    assert xml_text("a\x00b\x1bc\x0bd\ufffee\tf") == "abcde\tf"
    root = make_job(job={"title": "Line\x0b one\x1b", "site": {"name": "Hall\x07 2"}},
                    visit={"readings": {"supply": PASSING_SUPPLY}})
    site = tmp_path / "site"
    build_site(root, site)
    import xml.dom.minidom

    for pdf in (site / "package.pdf", site / "machines" / "m1" / "v1.pdf"):
        metadata = PdfReader(pdf).trailer["/Root"]["/Metadata"].get_object().get_data()
        xml.dom.minidom.parseString(metadata)  # well formed


@pytest.mark.parametrize("target", ["%2e%2e/%2e%2e/etc/passwd", "%252e%252e/secret",
                                    "..%2fjob.yaml", "%2Fetc/passwd",
                                    "java%0ascript:alert(1)", "jav%09ascript:alert(1)"])
def test_percent_encoded_links_out_of_the_site_are_refused(target):
    from acceptance.rendering.html import render_markdown

    html = str(render_markdown(f"[x]({target})"))
    assert "href" not in html, html


def test_links_inside_the_site_are_kept():
    from acceptance.rendering.html import render_markdown

    assert 'href="attachments/a%20b.txt"' in str(render_markdown("[x](attachments/a%20b.txt)"))


# ------------------------------------------------------------------ names that link


def test_awkward_names_link_to_their_files(tmp_path):
    # Folder and file names with a space, '#', '?' and '%' (and a '+' and an '&'): every
    # link of every page, and of the visit's PDF record, resolves to a file of the site.
    import re
    from urllib.parse import unquote, urlsplit

    from pypdf import PdfReader

    machine_id, visit_id, attachment = "m 1#?%", "v 1#?%&+", "photo #2 ?% 50%.txt"
    root = write_job(tmp_path / "job", machine_id=machine_id,
                     visits={visit_id: {"readings": {"supply": PASSING_SUPPLY},
                                        "attachments": [{"path": attachment,
                                                         "title": "a photo"}]},
                             "v2": {"date": "2026-03-11",
                                    "readings": {"supply": {"voltage": {"L1-L2": "300 V"}}}}},
                     files={f"machines/{machine_id}/{attachment}": "taken on site\n"})
    site = tmp_path / "site"
    build_site(root, site)
    pages = sorted(site.rglob("*.html"))
    assert (site / "machines" / machine_id / f"{visit_id}.html") in pages
    checked = 0
    for page in pages:
        for href in re.findall(r'href="([^"]*)"', page.read_text(encoding="utf-8")):
            href = href.replace("&amp;", "&")
            parts = urlsplit(href)
            if parts.scheme or not parts.path:
                continue
            target = (page.parent / unquote(parts.path)).resolve()
            assert target.is_file(), f"{page.relative_to(site)}: {href}"
            checked += 1
    assert checked > 20
    record = site / "machines" / machine_id / f"{visit_id}.pdf"
    for pdf in (record,):
        for page in PdfReader(pdf).pages:
            for annotation in page.get("/Annots") or []:
                action = annotation.get_object().get("/A") or {}
                uri = action.get("/URI")
                if not uri or urlsplit(uri).scheme or not urlsplit(uri).path:
                    continue
                assert (pdf.parent / unquote(urlsplit(uri).path)).resolve().is_file(), uri
