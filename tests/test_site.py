"""The built site: links that resolve offline, nothing fetched, PDFs, manifest, atomic swap."""

from __future__ import annotations

import hashlib
import json
import re
import shutil
from html.parser import HTMLParser
from pathlib import Path
from urllib.parse import unquote, urlsplit

import pytest
from pypdf import PdfReader

import acceptance.rendering.pdf
from acceptance import cli
from acceptance.build import MANIFEST_NAME, build_site
from acceptance.errors import BuildError
from tests.conftest import DEMO_JOB

DEMO_VISITS = sorted(DEMO_JOB.glob("machines/*/visits/*.yaml"))

# Elements whose attribute makes a browser load something (HTML Living Standard, the
# "fetch" processing of each element) [S]; an <a href> only navigates when followed.
LOADING = {("script", "src"), ("link", "href"), ("img", "src"), ("img", "srcset"),
           ("iframe", "src"), ("embed", "src"), ("object", "data"), ("source", "src"),
           ("source", "srcset"), ("video", "src"), ("video", "poster"), ("audio", "src"),
           ("track", "src"), ("input", "src"), ("image", "href"), ("use", "href")}
NAVIGATING = {("a", "href"), ("area", "href"), ("form", "action")}


class _Links(HTMLParser):
    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.references: list[tuple[str, str, str]] = []  # (tag, attribute, url)
        self.ids: set[str] = set()
        self.styles: list[str] = []
        self._in_style = False

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        for name, value in attrs:
            if value is None:
                continue
            if name == "id":
                self.ids.add(value)
            elif name == "style":
                self.styles.append(value)
            elif (tag, name) in LOADING | NAVIGATING or name in ("src", "href", "xlink:href"):
                self.references.append((tag, name, value))
        self._in_style = tag == "style"

    def handle_endtag(self, tag: str) -> None:
        self._in_style = False

    def handle_data(self, data: str) -> None:
        if self._in_style:
            self.styles.append(data)


def parse(path: Path) -> _Links:
    parser = _Links()
    parser.feed(path.read_text(encoding="utf-8"))
    parser.close()
    return parser


@pytest.fixture(scope="session")
def demo_results(demo_site) -> dict:
    return json.loads((demo_site / "results.json").read_text(encoding="utf-8"))


def html_pages(site: Path) -> list[Path]:
    pages = sorted(site.rglob("*.html"))
    assert pages
    return pages


def test_every_relative_link_resolves(demo_site):
    broken = []
    checked = anchors = 0
    for page in html_pages(demo_site):
        for tag, attribute, url in parse(page).references:
            parts = urlsplit(url)
            if parts.scheme or url.startswith("//"):
                continue  # checked by test_nothing_is_loaded_from_outside
            checked += 1
            anchors += bool(parts.fragment)
            if not parts.path:
                target = page
            else:
                target = (page.parent / unquote(parts.path)).resolve()
            if not target.is_file() or not target.is_relative_to(demo_site.resolve()):
                broken.append(f"{page.relative_to(demo_site)}: <{tag} {attribute}={url!r}>")
                continue
            if parts.fragment and target.suffix == ".html":
                if parts.fragment not in parse(target).ids:
                    broken.append(f"{page.relative_to(demo_site)}: {url!r} (no such anchor)")
    assert broken == []
    # The demo's pages link to one another, their style sheet and instruments by anchor.
    assert checked > 50 and anchors > 5


def test_nothing_is_loaded_from_outside(demo_site):
    offending = []
    for page in html_pages(demo_site):
        links = parse(page)
        for tag, attribute, url in links.references:
            scheme = urlsplit(url).scheme.lower()
            if (tag, attribute) in LOADING and (scheme or url.startswith("//")):
                offending.append(f"{page.name}: <{tag} {attribute}={url!r}>")
            elif scheme not in ("", "http", "https", "mailto"):
                offending.append(f"{page.name}: <{tag} {attribute}={url!r}>")
        for style in links.styles:
            if re.search(r"url\(\s*['\"]?\s*(?:[a-z]+:|//)", style, re.I) or "@import" in style:
                offending.append(f"{page.name}: style {style[:60]!r}")
    for sheet in demo_site.rglob("*.css"):
        text = sheet.read_text(encoding="utf-8")
        for url in re.findall(r"url\(\s*['\"]?([^'\")]+)", text):
            if urlsplit(url.strip()).scheme or url.strip().startswith("//"):
                offending.append(f"{sheet.name}: url({url})")
        assert "@import" not in text
    assert offending == []


def pdf_text(path: Path) -> tuple[int, str]:
    reader = PdfReader(path)
    text = "\n".join(page.extract_text() or "" for page in reader.pages)
    return len(reader.pages), text


def squeeze(text: str) -> str:
    """Without white space: a PDF line break may fall anywhere in a long name."""
    return re.sub(r"\s+", "", text)


def test_each_visit_has_its_pdf_record(demo_site, demo_results):
    visits = [(m, v) for m in demo_results["machines"] for v in m["visits"]]
    assert len(visits) == len(DEMO_VISITS)
    for machine, visit in visits:
        pdf = demo_site / "machines" / machine["id"] / f"{visit['id']}.pdf"
        assert pdf.is_file(), pdf
        assert pdf.read_bytes().startswith(b"%PDF-")
        pages, text = pdf_text(pdf)
        assert pages >= 1
        flat = squeeze(text)
        assert squeeze(machine["name"]) in flat
        assert visit["id"] in flat
        assert f"page 1 of {pages}" in text
        assert "Sign-off" in text
        for checklist in visit["checklists"]:
            for item in checklist["items"]:
                assert f"{item['checklist']}.{item['id']}" in flat, (pdf.name, item["id"])


def test_results_json_matches_check_json(demo_results, capsys):
    cli.main(["check", "--json", str(DEMO_JOB)])
    assert json.loads(capsys.readouterr().out) == demo_results
    assert demo_results["schema"] == "acceptance-results/1"


def test_manifest_lists_and_verifies_every_file(demo_site):
    lines = (demo_site / MANIFEST_NAME).read_text(encoding="utf-8").splitlines()
    listed = {}
    for line in lines:
        # sha256sum's text format: 64 hex digits, two spaces, the path (GNU coreutils) [S]
        match = re.fullmatch(r"([0-9a-f]{64})  (.+)", line)
        assert match, line
        listed[match[2]] = match[1]
    for name, digest in listed.items():
        assert hashlib.sha256((demo_site / name).read_bytes()).hexdigest() == digest, name
    # Left out: the build's bookkeeping, every name starting ".acceptance-" at the top.
    on_disk = {p.relative_to(demo_site).as_posix() for p in demo_site.rglob("*")
               if p.is_file() and p.name != MANIFEST_NAME
               and not p.relative_to(demo_site).parts[0].startswith(".acceptance-")}
    assert set(listed) == on_disk
    assert lines == sorted(lines, key=lambda line: line[66:])


def snapshot(folder: Path) -> dict[str, bytes]:
    return {p.relative_to(folder).as_posix(): p.read_bytes()
            for p in sorted(folder.rglob("*")) if p.is_file()}


def test_failed_build_leaves_the_previous_site_intact(demo_site, tmp_path, monkeypatch):
    previous = tmp_path / "site"
    shutil.copytree(demo_site, previous)
    before = snapshot(previous)
    real_render = acceptance.rendering.pdf.render_pdf
    calls = []

    def failing_render(*args, **kwargs):
        calls.append(args)
        if len(calls) == 2:
            raise RuntimeError("renderer stopped halfway")
        return real_render(*args, **kwargs)

    monkeypatch.setattr(acceptance.rendering.pdf, "render_pdf", failing_render)
    # A changed title changes every page, so every PDF must be rendered again.
    job = tmp_path / "job"
    shutil.copytree(DEMO_JOB, job)
    job_file = job / "job.yaml"
    job_file.write_text(job_file.read_text(encoding="utf-8").replace(
        "title: Grinding", "title: Revised grinding", 1), encoding="utf-8")
    with pytest.raises(RuntimeError, match="renderer stopped halfway"):
        build_site(job, previous)
    assert len(calls) == 2
    assert snapshot(previous) == before
    assert [p.name for p in tmp_path.iterdir() if "staging" in p.name] == []


def test_build_refuses_a_foreign_folder(tmp_path):
    foreign = tmp_path / "documents"
    foreign.mkdir()
    (foreign / "letter.txt").write_text("not a site\n", encoding="utf-8")
    before = snapshot(foreign)
    with pytest.raises(BuildError, match="was not written by acceptance; it is left untouched"):
        build_site(DEMO_JOB, foreign, with_pdf=False)
    assert snapshot(foreign) == before
    assert [p.name for p in tmp_path.iterdir() if "staging" in p.name] == []


def test_build_refuses_a_foreign_folder_from_the_command_line(tmp_path, capsys):
    foreign = tmp_path / "documents"
    foreign.mkdir()
    (foreign / "letter.txt").write_text("not a site\n", encoding="utf-8")
    assert cli.main(["build", str(DEMO_JOB), "-o", str(foreign), "--no-pdf", "-q"]) == 3
    assert "left untouched" in capsys.readouterr().err
    assert snapshot(foreign) == {"letter.txt": b"not a site\n"}


def test_rebuild_replaces_its_own_site(demo_site, tmp_path):
    previous = tmp_path / "site"
    shutil.copytree(demo_site, previous)
    (previous / "stale.html").write_text("left from an older build\n", encoding="utf-8")
    build_site(DEMO_JOB, previous, with_pdf=False)
    assert not (previous / "stale.html").exists()
    assert (previous / "index.html").is_file()
    assert not list(previous.rglob("*.pdf"))


def test_a_replaced_pdf_is_rendered_again_not_carried_forward(demo_site, tmp_path):
    site = tmp_path / "site"
    shutil.copytree(demo_site, site)
    pdf = next(site.glob("machines/*/*.pdf"))
    original = pdf.read_bytes()
    pdf.unlink()
    pdf.write_bytes(b"%PDF-1.7 not the record that was built\n")
    report = build_site(DEMO_JOB, site, jobs=1)
    assert not report.unchanged and report.rendered == 1
    assert pdf.read_bytes() == original
