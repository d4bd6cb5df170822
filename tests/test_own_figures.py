"""The tool's examples are figures of our own invented scenario.

A few figures of a field observation of a rectifier-fed magnet may serve as check values in
the tests (marked as common practice, [P], in tests/computations/test_waveform.py); outside
the tests they must not appear, not even in another spelling of the same value.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]

# Each figure with the spellings a person or the unit table could give it: a space or none
# before the unit, and every accepted spelling of that unit (units.py).
FORBIDDEN = {
    "221.3 V": r"221\.3\s*V\b",
    "18.4 µF": r"18\.4\s*(?:µ|μ|u)F",
    "28.2 Ω": r"28\.2\s*(?:Ω|\u2126|ohms?\b)",
    "10.4 A": r"10\.4\s*A\b",
    "0.03 Ω": r"0\.030*\s*(?:Ω|\u2126|ohms?\b)",
}

PLACES = ["README.md", "acceptance", "checklists", "site_templates", "demo_job"]
TEXT_SUFFIXES = {".py", ".md", ".yaml", ".yml", ".html", ".j2", ".css", ".js", ".csv", ".txt",
                 ".json", ".pub"}


def _files() -> list[Path]:
    files: list[Path] = []
    for place in PLACES:
        path = ROOT / place
        if path.is_file():
            files.append(path)
            continue
        files.extend(p for p in sorted(path.rglob("*"))
                     if p.is_file() and p.suffix in TEXT_SUFFIXES
                     and "__pycache__" not in p.parts)
    return files


def test_the_places_exist_and_hold_files() -> None:
    # A renamed folder must not make the search below pass by finding nothing.
    assert len(_files()) > 50


@pytest.mark.parametrize("figure", sorted(FORBIDDEN))
def test_figure_not_taken_over_outside_the_tests(figure: str) -> None:
    pattern = re.compile(FORBIDDEN[figure])
    hits = []
    for path in _files():
        for number, line in enumerate(path.read_text(encoding="utf-8").splitlines(), start=1):
            if pattern.search(line):
                hits.append(f"{path.relative_to(ROOT)}:{number}: {line.strip()[:80]}")
    assert hits == [], f"{figure} is not a figure of our own scenario:\n" + "\n".join(hits)


@pytest.mark.parametrize(("figure", "text"), [
    ("221.3 V", "L-N: 221.3 V"), ("18.4 µF", "18.4 uF"), ("28.2 Ω", "28.2 ohm"),
    ("28.2 Ω", "28.2\u2126"), ("10.4 A", "value: 10.4 A"), ("0.03 Ω", "0.030 Ω"),
])
def test_the_patterns_catch_each_spelling(figure: str, text: str) -> None:
    assert re.search(FORBIDDEN[figure], text)
