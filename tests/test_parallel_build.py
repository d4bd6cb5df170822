"""PDF workers are replaced as they retire, and parallel output equals serial output."""

from __future__ import annotations

import acceptance.build.pdfs as pdfs
from acceptance.build import build_site
from tests.conftest import DEMO_JOB


def test_workers_retiring_after_every_document_still_render_every_pdf(
        demo_site, tmp_path, monkeypatch):
    # One document per worker forces a replacement after every PDF: a pool that stops
    # replacing its workers would hang here rather than in a large customer build.
    monkeypatch.setattr(pdfs, "TASKS_PER_WORKER", 1)
    site = tmp_path / "site"
    report = build_site(DEMO_JOB, site, jobs=2)
    assert report.rendered == report.pdfs > 2
    for pdf in sorted(demo_site.rglob("*.pdf")):
        twin = site / pdf.relative_to(demo_site)
        assert twin.read_bytes() == pdf.read_bytes(), pdf.name
