"""The PDF records as archival files: PDF/A-3b with their sources, metadata, outline,
byte-identical rebuilds, and the site package with its contents and every visit."""

from __future__ import annotations

import re
import subprocess
from pathlib import Path

import pytest
from pypdf import PdfReader

from acceptance.build import build_site
from tests.conftest import PASSING_SUPPLY, write_job

# ISO 19005-3 6.6.4 / 6.8: a PDF/A-3 file names its part and conformance level in XMP
# (pdfaid namespace) and links each embedded file with an /AFRelationship [S].
PDFAID = "http://www.aiim.org/pdfa/ns/id/"
# 2026-03-12T08:00:00Z (reproducible-builds.org SOURCE_DATE_EPOCH) [S]
EPOCH = "1773302400"

pytestmark = pytest.mark.slow


def _job(root: Path) -> Path:
    """Two visits of one machine, one with an attached file, one with a deficiency."""
    return write_job(root, visits={
        "v1": {"readings": {"supply": PASSING_SUPPLY},
               "attachments": [{"path": "photos/panel.txt", "title": "Panel"}]},
        "v2": {"date": "2026-03-11",
               "readings": {"supply": {**PASSING_SUPPLY, "frequency": "51 Hz"}}},
    }, files={"machines/m1/photos/panel.txt": "photo stand-in\n"})


@pytest.fixture(scope="module")
def two_builds(tmp_path_factory):
    base = tmp_path_factory.mktemp("archival")
    job = _job(base / "job")
    monkeypatch = pytest.MonkeyPatch()
    monkeypatch.setenv("SOURCE_DATE_EPOCH", EPOCH)
    try:
        first = base / "first"
        build_site(job, first, jobs=1)
        second = base / "second"
        build_site(job, second, jobs=2)  # another order of rendering, same bytes
    finally:
        monkeypatch.undo()
    return job, first, second


def test_two_builds_give_byte_identical_pdfs(two_builds):
    _, first, second = two_builds
    pdfs = sorted(p.relative_to(first).as_posix() for p in first.rglob("*.pdf")
                  if not p.relative_to(first).parts[0].startswith("."))
    assert pdfs == ["machines/m1/v1.pdf", "machines/m1/v2.pdf", "package.pdf"]
    for name in pdfs:
        assert (first / name).read_bytes() == (second / name).read_bytes(), name


def test_a_visit_record_is_pdf_a_3b(two_builds):
    _, site, _ = two_builds
    reader = PdfReader(site / "machines/m1/v1.pdf")
    assert reader.pdf_header == "%PDF-1.7"  # ISO 19005-3 builds on ISO 32000-1 [S]
    xmp = reader.xmp_metadata
    assert xmp is not None
    described = [node for node in xmp.rdf_root.getElementsByTagNameNS(
        "http://www.w3.org/1999/02/22-rdf-syntax-ns#", "Description")
        if node.hasAttributeNS(PDFAID, "part")]
    assert [(d.getAttributeNS(PDFAID, "part"), d.getAttributeNS(PDFAID, "conformance"))
            for d in described] == [("3", "B")]
    assert "/OutputIntents" in reader.trailer["/Root"]


def test_a_visit_record_embeds_its_source_files(two_builds):
    job, site, _ = two_builds
    reader = PdfReader(site / "machines/m1/v1.pdf")
    attachments = reader.attachments
    visit_file = job / "machines/m1/visits/v1.yaml"
    assert attachments["machines/m1/visits/v1.yaml"] == [visit_file.read_bytes()]
    assert attachments["machines/m1/machine.yaml"] == [
        (job / "machines/m1/machine.yaml").read_bytes()]
    assert attachments["machines/m1/photos/panel.txt"] == [b"photo stand-in\n"]
    assert {"job.yaml", "instruments.yaml", "built-in/checklists/supply.yaml"} <= set(attachments)
    catalog = reader.trailer["/Root"]
    associated = [entry.get_object() for entry in catalog["/AF"]]
    assert len(associated) == len(attachments)  # each file named once in /AF
    assert {spec["/AFRelationship"] for spec in associated} == {"/Source"}


def test_a_visit_record_has_metadata_and_an_outline(two_builds):
    _, site, _ = two_builds
    reader = PdfReader(site / "machines/m1/v2.pdf")
    info = reader.metadata
    assert info.title == "Commissioning record: Test machine — v2"
    assert info.author == "Test person"
    assert info.subject == ("commissioning record of Test machine (m1), 2026-03-11: "
                            "pass with deficiencies")
    assert "m1" in info["/Keywords"] and "supply" in info["/Keywords"]
    assert info["/CreationDate"] == "D:20260311000000Z"  # the visit's date
    assert info["/ModDate"] == "D:20260312080000Z"  # SOURCE_DATE_EPOCH
    titles = [entry.title for entry in reader.outline if not isinstance(entry, list)]
    assert titles[0].startswith("Commissioning record: Test machine")
    nested = [e.title for part in reader.outline if isinstance(part, list) for e in part
              if not isinstance(e, list)]
    assert any(title.startswith("Supply") for title in nested)
    assert "Sign-off" in nested


def test_links_in_a_record_stay_inside_the_site(two_builds):
    _, site, _ = two_builds
    reader = PdfReader(site / "machines/m1/v1.pdf")
    targets = [annotation.get_object()["/A"]["/URI"]
               for page in reader.pages for annotation in page.get("/Annots", [])
               if "/URI" in annotation.get_object().get("/A", {})]
    assert targets
    for target in targets:
        assert not target.startswith("file:"), target  # never the staging folder's address
        if not re.match(r"https?:|mailto:", target):
            assert (site / "machines/m1" / target.partition("#")[0]).resolve().is_file()


def test_the_package_has_contents_an_outline_and_every_visit(two_builds):
    _, site, _ = two_builds
    reader = PdfReader(site / "package.pdf")
    top = [entry.title for entry in reader.outline if not isinstance(entry, list)]
    assert top[0].startswith("Site package: Test job")
    assert "Test machine — v1" in top and "Test machine — v2" in top
    assert top[-2:] == ["Deficiencies", "Instruments"]
    records = {name: len(PdfReader(site / f"machines/m1/{name}.pdf").pages)
               for name in ("v1", "v2")}
    contents = reader.pages[0].extract_text() + (reader.pages[1].extract_text()
                                                 if len(reader.pages) > 1 else "")
    assert "Contents" in contents
    # Each part starts on the page the contents give, and that page is its first page.
    start = int(re.search(r"Test machine — v1 pass\s+not signed\s+(\d+)\s+(\d+)",
                          contents).group(2))
    assert start >= 2
    first_page = reader.pages[start - 1].extract_text()
    assert "v1" in first_page and "page 1 of" in first_page
    following = start + records["v1"]
    assert "v2" in reader.pages[following - 1].extract_text()
    assert list(reader.attachments) == ["results.json"]


def test_the_package_keeps_the_archival_catalog_and_each_part_links_within_itself(two_builds):
    _, site, _ = two_builds
    reader = PdfReader(site / "package.pdf")
    assert reader.pdf_header == "%PDF-1.7"
    assert reader.xmp_metadata is not None and "/OutputIntents" in reader.trailer["/Root"]
    assert reader.metadata.title.startswith("Site package: Test job")
    numbers = {page.indirect_reference.idnum: index for index, page in enumerate(reader.pages)}
    starts = sorted(reader.get_destination_page_number(entry) for entry in reader.outline
                    if not isinstance(entry, list))

    def part(page: int) -> int:
        return max(start for start in starts if start <= page)

    links = 0
    for index, page in enumerate(reader.pages):
        for annotation in page.get("/Annots", []):
            target = annotation.get_object().get("/Dest")
            if target is None:
                continue
            # Every record names its sections alike: a name would lead to the first record's.
            assert not isinstance(target, str), target
            assert part(numbers[target[0].idnum]) == part(index)
            links += 1
    assert links


def test_the_package_and_the_records_pass_an_independent_pdf_check(two_builds):
    # The package is joined by our own writer (rendering/pdfjoin.py): qpdf, an independent
    # PDF library, checks its cross-reference table, object streams and page tree. Exit 0 is
    # clean; 3 would mean warnings, 2 errors (qpdf manual, "Exit Status").
    _, site, _ = two_builds
    for name in ("package.pdf", "machines/m1/v1.pdf"):
        checked = subprocess.run(["qpdf", "--check", str(site / name)], capture_output=True,
                                 text=True)
        assert checked.returncode == 0, (name, checked.stdout, checked.stderr)
        assert "No syntax or stream encoding errors found" in checked.stdout


def test_the_package_parts_carry_the_package_metadata_not_a_records(two_builds):
    # The deficiencies and the instrument register are parts of the site package: laid out
    # with its title, never with the metadata of whichever visit record came last.
    _job, site, _second = two_builds
    for name in ("deficiencies", "instruments"):
        title = PdfReader(site / ".acceptance-package" / f"{name}.pdf").metadata.title
        assert title.startswith("Site package: Test job"), (name, title)
