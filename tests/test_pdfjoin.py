"""The streaming PDF join behind package.pdf, on small documents, read back by pypdf and
checked by qpdf (independent readers)."""

from __future__ import annotations

import subprocess
from pathlib import Path

import pytest
from pypdf import PdfReader
from weasyprint import HTML

from acceptance.rendering.pdfjoin import join_pdfs

pytestmark = pytest.mark.slow


def _pdf(path: Path, html: str) -> Path:
    HTML(string=html).write_pdf(path)
    return path


def _qpdf_clean(path: Path) -> bool:
    checked = subprocess.run(["qpdf", "--check", str(path)], capture_output=True, text=True)
    return checked.returncode == 0


def test_a_front_page_alone_joins_to_itself(tmp_path):
    front = _pdf(tmp_path / "front.pdf", "<p>Cover</p>")
    assert join_pdfs(tmp_path / "out.pdf", front, []) == 1
    assert _qpdf_clean(tmp_path / "out.pdf")
    assert "Cover" in PdfReader(tmp_path / "out.pdf").pages[0].extract_text()


def test_parts_follow_the_front_in_order_each_under_one_outline_entry(tmp_path):
    front = _pdf(tmp_path / "front.pdf", "<h1>Cover</h1>")
    first = _pdf(tmp_path / "a.pdf", "<h1>Alpha</h1><h2>Inside alpha</h2>"
                                     "<p style='break-before: page'>Alpha 2</p>")
    second = _pdf(tmp_path / "b.pdf", "<p>Beta, no headings</p>")
    target = tmp_path / "out.pdf"
    assert join_pdfs(target, front, [("Part A", first), ("Part B", second)]) == 4
    assert _qpdf_clean(target)
    reader = PdfReader(target)
    texts = [page.extract_text() for page in reader.pages]
    assert ["Cover" in texts[0], "Alpha" in texts[1], "Alpha 2" in texts[2],
            "Beta" in texts[3]] == [True] * 4
    top = [entry for entry in reader.outline if not isinstance(entry, list)]
    assert [entry.title for entry in top] == ["Cover", "Part A", "Part B"]
    assert [reader.get_destination_page_number(entry) for entry in top] == [0, 1, 3]
    nested = reader.outline[reader.outline.index(top[1]) + 1]
    assert [entry.title for entry in nested if not isinstance(entry, list)] == ["Alpha"]
