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


def test_files_given_to_the_join_are_embedded_as_sources(tmp_path):
    import datetime as dt

    from acceptance.rendering.pdf import PdfSource

    front = _pdf(tmp_path / "front.pdf", "<h1>Cover</h1>")
    part = _pdf(tmp_path / "a.pdf", "<p>Alpha</p>")
    data = '{"schema": "ünïcode ok", "values": [1, 2, 3]}\n'.encode()
    target = tmp_path / "out.pdf"
    join_pdfs(target, front, [("Part A", part)],
              [PdfSource("results.json", data, "the computed results")],
              dt.datetime(2026, 3, 12, tzinfo=dt.UTC))
    assert _qpdf_clean(target)
    reader = PdfReader(target)
    assert reader.attachments == {"results.json": [data]}
    catalog = reader.trailer["/Root"]
    # ISO 19005-3 6.8 / ISO 32000-2 7.11.3: each embedded file is named in the catalog's /AF
    # with its relationship; the embedded stream's /Params carry its size (ISO 32000-1
    # 7.11.4, Table 45) and dates written D:YYYYMMDDHHmmSSZ (ISO 32000-1 7.9.4) [S].
    (spec,) = [entry.get_object() for entry in catalog["/AF"]]
    assert spec["/AFRelationship"] == "/Source" and spec["/UF"] == "results.json"
    params = spec["/EF"]["/F"].get_object()["/Params"]
    assert params["/Size"] == len(data) and params["/ModDate"] == "D:20260312000000Z"
    # qpdf, an independent reader, lists the file and gives back the same bytes.
    listed = subprocess.run(["qpdf", "--list-attachments", str(target)],
                            capture_output=True, text=True, check=True).stdout
    assert "results.json" in listed
    shown = subprocess.run(["qpdf", "--show-attachment=results.json", str(target)],
                           capture_output=True, check=True).stdout
    assert shown == data
