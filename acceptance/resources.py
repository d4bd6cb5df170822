"""Where the built-in checklists and site templates are, in a checkout or an installed wheel."""

from __future__ import annotations

from pathlib import Path

__all__ = ["checklists_dir", "templates_dir"]

_PACKAGE = Path(__file__).resolve().parent


def _find(name: str) -> Path:
    # An installed wheel carries the folders as package data (see pyproject.toml,
    # force-include); a source checkout has them beside the package.
    for candidate in (_PACKAGE / "_data" / name, _PACKAGE.parent / name):
        if candidate.is_dir():
            return candidate
    raise FileNotFoundError(f"the {name}/ folder is missing from this installation")


def checklists_dir() -> Path:
    return _find("checklists")


def templates_dir() -> Path:
    return _find("site_templates")
