"""Hostile content: markup in free text stays text, links stay safe, nothing leaves the job.

A job whose every free-text field holds HTML and script is built; the pages are parsed
and the PDFs' text extracted, and the markup must appear as the characters typed, never
as elements. Links in Markdown notes keep to http, https, mailto and links inside the
site. The PDF renderer's fetcher reads only inside its roots, refuses the network and
oversized files, whether asked directly or through a page or style sheet that tries.
YAML that would blow up (aliases, deep nesting, huge files) is refused in bounded time
and memory.
"""

from __future__ import annotations

import html
import http.server
import re
import threading
import time
import tracemalloc
from html.parser import HTMLParser
from pathlib import Path
from urllib.parse import unquote

import pytest
from pypdf import PdfReader

from acceptance.build import build_site
from acceptance.errors import InputError
from acceptance.loading import load_job
from acceptance.rendering.html import render_markdown
from acceptance.rendering.pdf import ConfinedFetcher, RefusedFetch
from acceptance.yamlfile import MAX_FILE_BYTES, load_yaml
from tests.conftest import PASSING_SUPPLY, write_job


def payload(tag: str) -> str:
    return f"<script>alert('{tag}')</script><img src=x onerror=alert('{tag}')>"


def marker(tag: str) -> str:
    """What a reader must see: the typed characters of the script element."""
    return f"<script>alert('{tag}')</script>"


ATTACHMENT = "photos/<img src=x onerror=alert('att')>.txt"

HOSTILE_LINKS = [
    "[js](javascript:alert('js'))", "[upper](JaVaScRiPt:alert('upper'))",
    "[data](data:text/html;base64,PHNjcmlwdD4=)", "[file](file:///etc/passwd)",
    "[vb](vbscript:msgbox('vb'))", "[tab](java\tscript:alert('tab'))",
    "[entity](&#106;avascript:alert('entity'))", "[proto](//evil.example/x)",
    "[root](/etc/passwd)", "[climb](../../../../etc/passwd)", "<javascript:alert('auto')>",
    "![img](file:///etc/passwd)", "<a href=\"javascript:alert('raw')\">raw</a>",
]
SAFE_LINKS = {"https://example.invalid/rules": "[rules](https://example.invalid/rules)",
              "mailto:office@example.invalid": "[mail](mailto:office@example.invalid)",
              "attachments/photos/panel.txt": "[panel](attachments/photos/panel.txt)"}

# Free-text fields (by their tag in the payload) that the site shows; the visit record and
# the site package PDF show the ones of the visit and, for the package, of the register.
# Not shown anywhere (so not listed): a survey point's name when no item is recorded for
# survey points, and a checklist's purpose.
FIELDS_ON_SITE = ["job-title", "site-name", "contractor-name", "instrument-kind",
                  "instrument-model", "instrument-serial", "machine-name", "machine-kind",
                  "machine-area", "winding-name", "capacitor-name", "performed-by",
                  "reading-note", "notes", "attachment-title", "signer-name", "signer-role",
                  "signer-statement", "item-title", "item-guidance", "item-caution",
                  "checklist-title", "checklist-caution"]
FIELDS_IN_VISIT_PDF = ["job-title", "site-name", "machine-name", "machine-kind",
                       "winding-name", "capacitor-name", "performed-by", "reading-note",
                       "notes", "attachment-title", "signer-name", "signer-role",
                       "signer-statement", "item-title", "item-guidance", "item-caution",
                       "checklist-title", "checklist-caution"]
FIELDS_IN_PACKAGE_PDF = [*FIELDS_IN_VISIT_PDF, "contractor-name", "instrument-kind",
                         "instrument-model", "instrument-serial"]


def hostile_job(root: Path) -> Path:
    checklist = {
        "checklist": "local", "title": payload("checklist-title"),
        "purpose": payload("checklist-purpose"),
        "caution": payload("checklist-caution"),
        "items": [{"id": "done", "title": payload("item-title"), "record": "confirmation",
                   "guidance": payload("item-guidance"), "caution": payload("item-caution")}],
    }
    notes = "\n\n".join([f"Notes {payload('notes')}", *HOSTILE_LINKS, *SAFE_LINKS.values()])
    write_job(
        root,
        job={"title": payload("job-title"), "site": {"name": payload("site-name")},
             "contractor": {"name": payload("contractor-name")}},
        instruments={"instruments": [
            {"id": "dmm-1", "kind": payload("instrument-kind"),
             "model": payload("instrument-model"), "serial": payload("instrument-serial"),
             "response": "true-rms", "category": "CAT III 600 V",
             "calibrated": "2026-01-05", "calibration_due": "2027-01-05"}]},
        machine={
            "name": payload("machine-name"), "kind": payload("machine-kind"),
            "area": payload("machine-area"),
            "nameplate": {"windings": [{"id": "main", "name": payload("winding-name"),
                                        "material": "copper", "thermal_class": "F"}],
                          "capacitors": [{"id": "run", "name": payload("capacitor-name"),
                                          "nominal": "20 µF", "tolerance": "J"}]},
            "survey_points": [{"id": "sink", "name": payload("survey-name")}],
            "checklists": ["supply", "local"]},
        visit={
            "performed_by": [payload("performed-by")],
            "readings": {"supply": {**PASSING_SUPPLY,
                                    "frequency": {"value": "50 Hz",
                                                  "note": payload("reading-note")}},
                         "local": {"done": "yes"}},
            "notes": notes,
            "attachments": [{"path": ATTACHMENT, "title": payload("attachment-title")},
                            {"path": "photos/panel.txt", "title": "Panel"}],
            "sign_off": [{"name": payload("signer-name"), "role": payload("signer-role"),
                          "date": "2026-03-10", "statement": payload("signer-statement")}]},
        checklists={"local.yaml": checklist},
        files={f"machines/m1/{ATTACHMENT}": "attached\n",
               "machines/m1/photos/panel.txt": "panel\n"})
    return root


class Page(HTMLParser):
    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.elements: list[tuple[str, dict[str, str | None]]] = []
        self.text: list[str] = []
        self.script_text: list[str] = []
        self._in_script = False

    def handle_starttag(self, tag, attrs):
        self.elements.append((tag, dict(attrs)))
        self._in_script = tag == "script"

    def handle_endtag(self, tag):
        if tag == "script":
            self._in_script = False

    def handle_data(self, data):
        (self.script_text if self._in_script else self.text).append(data)


def parse(path: Path) -> Page:
    page = Page()
    page.feed(path.read_text(encoding="utf-8"))
    return page


@pytest.fixture(scope="module")
def hostile_site(tmp_path_factory):
    base = tmp_path_factory.mktemp("hostile")
    job = hostile_job(base / "job")
    build_site(job, base / "site", jobs=1)
    return base / "site"


def test_markup_in_every_free_text_field_is_shown_as_text(hostile_site):
    pages = {p.relative_to(hostile_site).as_posix(): parse(p)
             for p in hostile_site.rglob("*.html")}
    shown = " ".join(" ".join(page.text) for page in pages.values())
    for name, page in pages.items():
        for tag, attrs in page.elements:
            assert not [a for a in attrs if a.startswith("on")], (name, tag, attrs)
            assert not (tag == "img" and attrs.get("src") == "x"), name
            if tag == "script":
                assert (attrs.get("src") or "").split("/")[-1].endswith(".js"), (name, attrs)
        assert "alert(" not in " ".join(page.script_text), name
    missing = [tag for tag in FIELDS_ON_SITE if marker(tag) not in shown]
    assert missing == []


def _pdf_text(path: Path) -> str:
    text = "".join(page.extract_text() for page in PdfReader(path).pages)
    return re.sub(r"\s+", "", text)


@pytest.mark.parametrize(("pdf", "fields"), [("machines/m1/v1.pdf", FIELDS_IN_VISIT_PDF),
                                             ("package.pdf", FIELDS_IN_PACKAGE_PDF)])
def test_markup_in_the_pdf_records_is_text(hostile_site, pdf, fields):
    text = _pdf_text(hostile_site / pdf)
    missing = [tag for tag in fields if re.sub(r"\s+", "", marker(tag)) not in text]
    assert missing == []


def test_only_safe_links_leave_the_notes(hostile_site):
    page = parse(hostile_site / "machines" / "m1" / "v1.html")
    hrefs = [attrs.get("href") or "" for tag, attrs in page.elements if tag == "a"]
    for href in hrefs:
        scheme = href.split(":")[0].lower() if ":" in href.split("/")[0] else ""
        assert scheme in ("", "http", "https", "mailto"), href
        assert not href.startswith(("/", "\\")), href
    for target in SAFE_LINKS:
        assert target in hrefs
    text = " ".join(page.text)
    for link in ("javascript:alert('js')", "vbscript:msgbox('vb')", "file:///etc/passwd"):
        assert link in text  # left as the text that was typed


@pytest.mark.parametrize("source", [*HOSTILE_LINKS, "[x](JAVASCRIPT:alert(1))",
                                    "[x]( javascript:alert(1))", "[x](%6Aavascript:x)",
                                    "[ref]\n\n[ref]: javascript:alert(1)",
                                    "[x](a/../../b.html)", "[x](file:relative)"])
def test_unsafe_markdown_links_are_not_rendered_as_links(source):
    rendered = render_markdown(source)
    assert "<a " not in rendered and "<img" not in rendered, rendered


def test_an_attachment_named_like_markup_is_linked_by_its_name(hostile_site):
    page = parse(hostile_site / "machines" / "m1" / "v1.html")
    hrefs = [unquote(html.unescape(attrs.get("href") or ""))
             for tag, attrs in page.elements if tag == "a"]
    linked = [h for h in hrefs if h.endswith(".txt") and "onerror" in h]
    assert linked, hrefs
    for href in linked:
        assert (hostile_site / "machines" / "m1" / href).read_text() == "attached\n"


# ------------------------------------------------------------------ paths out of the job


def _problems(root: Path) -> list[str]:
    with pytest.raises(InputError) as caught:
        load_job(root)
    return [p.message for p in caught.value.problems]


@pytest.mark.parametrize("path", ["../../../job.yaml", "/etc/passwd", "photos/../../../x",
                                  "photos/../../m2/secret.txt"])
def test_attachment_paths_out_of_the_machine_folder_are_refused(make_job, path):
    root = make_job(visit={"attachments": [{"path": path, "title": "Out"}]})
    assert _problems(root) == [f"'{path}' leaves the machine folder; attachments must sit "
                               "inside it (write a path relative to the machine folder)"]


def test_a_linked_folder_out_of_the_job_is_refused(make_job, tmp_path):
    outside = tmp_path / "elsewhere"
    outside.mkdir()
    (outside / "secret.txt").write_text("secret\n", encoding="utf-8")
    root = make_job(visit={"attachments": [{"path": "photos/secret.txt", "title": "Out"}]})
    (root / "machines" / "m1" / "photos").symlink_to(outside, target_is_directory=True)
    assert _problems(root) == ["'photos/secret.txt' resolves outside the machine folder "
                               "(a link?); copy the file into the machine folder"]


def test_a_capture_through_a_link_out_of_the_job_is_refused(make_job, tmp_path):
    outside = tmp_path / "capture.csv"
    outside.write_text("time_s,CH1\n", encoding="utf-8")
    capture = {"file": "captures/c.csv", "channels": {"CH1": "x100"}}
    root = make_job(machine={"checklists": ["supply", "current"]}, visit={"readings": {
        "current": {"load_current": {"L1": {"value": "1 A", "capture": capture}}}}})
    (root / "machines" / "m1" / "captures").mkdir()
    (root / "machines" / "m1" / "captures" / "c.csv").symlink_to(outside)
    assert _problems(root) == ["'captures/c.csv' resolves outside the machine folder (a "
                               "link?); copy the file into the machine folder"]


# ------------------------------------------------------------------ the PDF fetcher


@pytest.fixture
def site_root(tmp_path):
    root = tmp_path / "site"
    (root / "assets").mkdir(parents=True)
    (root / "assets" / "style.css").write_text("p { color: black }\n", encoding="utf-8")
    (root / "assets" / "big.png").write_bytes(b"\x89PNG" + b"\0" * 4096)
    (tmp_path / "outside.css").write_text("p { color: red }\n", encoding="utf-8")
    (root / "assets" / "link.css").symlink_to(tmp_path / "outside.css")
    return root


@pytest.mark.parametrize("url", [
    "file:///etc/passwd", "http://127.0.0.1:9/x.png", "https://example.invalid/x.css",
    "ftp://example.invalid/x", "data:text/css,p{}", "file://otherhost/site/assets/style.css",
])
def test_fetcher_refuses_the_network_and_files_outside(site_root, url):
    fetcher = ConfinedFetcher([site_root])
    with pytest.raises(RefusedFetch):
        fetcher.fetch(url)
    assert fetcher.refused == [url]


@pytest.mark.parametrize("relative", ["assets/../../outside.css", "assets/link.css",
                                      "assets/%2e%2e/%2e%2e/outside.css"])
def test_fetcher_refuses_climbing_and_links_out_of_its_roots(site_root, relative):
    fetcher = ConfinedFetcher([site_root])
    with pytest.raises(RefusedFetch, match="outside the site folder"):
        fetcher.fetch(f"{site_root.as_uri()}/{relative}")


def test_fetcher_refuses_a_file_above_its_size_limit(site_root):
    fetcher = ConfinedFetcher([site_root], max_bytes=1024)
    with pytest.raises(RefusedFetch, match="bytes is above 1024"):
        fetcher.fetch((site_root / "assets" / "big.png").as_uri())
    assert fetcher.fetch((site_root / "assets" / "style.css").as_uri()).url.endswith(
        "style.css")


class _Counting(http.server.BaseHTTPRequestHandler):
    requests: list[str] = []

    def do_GET(self):  # http.server's name
        _Counting.requests.append(self.path)
        self.send_response(404)
        self.end_headers()

    def log_message(self, *args):
        pass


def test_a_page_that_asks_for_outside_files_renders_without_them(site_root, tmp_path):
    from weasyprint import HTML

    server = http.server.HTTPServer(("127.0.0.1", 0), _Counting)
    threading.Thread(target=server.serve_forever, daemon=True).start()
    port = server.server_address[1]
    (site_root / "assets" / "inject.css").write_text(
        f"@import url(file:///etc/passwd);\n@import url(http://127.0.0.1:{port}/a.css);\n"
        f"body {{ background: url(http://127.0.0.1:{port}/b.png) }}\n"
        "p { background: url(../../outside.css) }\n", encoding="utf-8")
    page = site_root / "page.html"
    page.write_text(
        "<html><head><link rel=stylesheet href='assets/inject.css'>"
        "<link rel=stylesheet href='file:///etc/passwd'></head><body>"
        f"<img src='http://127.0.0.1:{port}/c.png'><img src='file:///etc/hostname'>"
        "<img src='assets/big.png'><p>text</p></body></html>", encoding="utf-8")
    fetcher = ConfinedFetcher([site_root], max_bytes=1024)
    try:
        document = HTML(filename=str(page), url_fetcher=fetcher, media_type="print").render()
    finally:
        server.shutdown()
    assert len(document.pages) == 1
    assert _Counting.requests == []  # nothing reached the network
    refused = " ".join(fetcher.refused)
    for asked in ("file:///etc/passwd", f"127.0.0.1:{port}/a.css", f"127.0.0.1:{port}/b.png",
                  f"127.0.0.1:{port}/c.png", "file:///etc/hostname", "big.png",
                  "outside.css"):
        assert asked in refused, asked


# ------------------------------------------------------------------ YAML that blows up

# Bounds are generous (a slow shared machine) but far below what an unbounded expansion
# or a recursion would take: a nine-level bomb expands to 9⁹ ≈ 3.9e8 nodes.
TIME_BOUND = 5.0  # [s]
MEMORY_BOUND = 64 * 1024 * 1024  # [bytes] traced peak


def _bomb(levels: int) -> str:
    names = [f"l{n}" for n in range(levels)]
    lines = [f"{names[0]}: &{names[0]} [lol, lol, lol, lol, lol, lol, lol, lol, lol]"]
    for previous, name in zip(names, names[1:], strict=False):
        lines.append(f"{name}: &{name} [" + ", ".join([f"*{previous}"] * 9) + "]")
    return "\n".join(lines) + "\n"


YAML_ATTACKS = {
    "alias-bomb": _bomb(9),
    "deep-flow-nesting": "a: " + "[" * 20000 + "]" * 20000 + "\n",
    "deep-mapping-nesting": "a: " + "{b: " * 5000 + "1" + "}" * 5000 + "\n",
    "deep-block-nesting": "".join("  " * n + f"k{n}:\n" for n in range(400)) + "  " * 400
                          + "x: 1\n",
    "many-aliases": "a: &a x\n" + "".join(f"k{n}: *a\n" for n in range(50000)),
    "merge-bomb": "a: &a {x: 1}\nb: {<<: [*a, *a, *a, *a]}\n",
    "recursive-alias": "a: &a [*a]\n",
}


@pytest.mark.parametrize("name", list(YAML_ATTACKS))
def test_yaml_attacks_are_refused_in_bounded_time_and_memory(tmp_path, name):
    path = tmp_path / "attack.yaml"
    path.write_text(YAML_ATTACKS[name], encoding="utf-8")
    tracemalloc.start()
    started = time.perf_counter()
    try:
        with pytest.raises(InputError) as caught:
            load_yaml(path)
        elapsed = time.perf_counter() - started
        peak = tracemalloc.get_traced_memory()[1]
    finally:
        tracemalloc.stop()
    assert elapsed < TIME_BOUND
    assert peak < MEMORY_BOUND
    assert any(word in str(caught.value) for word in ("alias", "nesting", "merge")), \
        str(caught.value)


def test_a_huge_file_is_refused_without_being_read(tmp_path):
    path = tmp_path / "huge.yaml"
    with path.open("wb") as handle:
        handle.truncate(1024 * 1024 * 1024)  # 1 GiB, sparse
    tracemalloc.start()
    try:
        with pytest.raises(InputError, match=f"the limit is {MAX_FILE_BYTES} bytes"):
            load_yaml(path)
        peak = tracemalloc.get_traced_memory()[1]
    finally:
        tracemalloc.stop()
    assert peak < 1024 * 1024


def test_a_long_document_below_the_limit_loads_in_bounded_time(tmp_path):
    path = tmp_path / "long.yaml"
    lines = [f"key{n}: value {n}" for n in range(80_000)]
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    assert path.stat().st_size < MAX_FILE_BYTES
    started = time.perf_counter()
    document = load_yaml(path)
    assert time.perf_counter() - started < 4 * TIME_BOUND
    assert len(document.data) == 80_000
