"""HTML pages from results: a Jinja2 environment that autoescapes and fails on undefined names.

Templates live in ``site_templates/``; nothing here decides a verdict, it only
passes the results (and the page's position in the site, for relative links)
to the templates.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any
from urllib.parse import unquote

import jinja2
from markdown_it import MarkdownIt
from markupsafe import Markup

from ..integrity import SignatureStatus
from ..resources import templates_dir
from ..results import Verdict, VisitState
from ..text import url_path, url_segment, visible

__all__ = ["make_environment", "render_markdown", "SIGNATURE_SHAPES"]

# Sign-off states, also a word and a shape; "altered" is drawn like a failure because the
# verdicts shown are no longer the ones that were signed.
SIGNATURE_SHAPES: dict[str, str] = {
    "unsigned": "○",
    "signed": "✓",
    "altered": "✗",
    "invalid": "✗",
}

_SAFE_SCHEMES = ("http:", "https:", "mailto:")


def _normalised_link(url: str) -> str:
    """A link target as a browser would follow it, for the filter to judge: percent-decoded
    until it no longer changes (``%252e`` is ``%2e`` is ``.``), without control and white-space
    characters (a browser drops them inside a scheme), lower case."""
    for _ in range(8):
        decoded = unquote(url)
        if decoded == url:
            break
        url = decoded
    return "".join(c for c in url if c.isprintable() and not c.isspace()).lower()


def _markdown() -> MarkdownIt:
    md = MarkdownIt("commonmark", {"html": False, "linkify": False, "typographer": False})
    md.disable("image")  # notes never pull files into the record; attachments are listed

    def validate_link(url: str) -> bool:
        lowered = _normalised_link(url)
        if ":" not in lowered.split("/")[0]:
            # Relative links stay inside the site: from a folder opened with file:// a
            # link from the root ('/etc/passwd') or one climbing out ('../..') would open
            # a file of the reader's computer.
            segments = lowered.replace("\\", "/").split("?")[0].split("#")[0].split("/")
            return not lowered.startswith(("/", "\\")) and ".." not in segments
        return lowered.startswith(_SAFE_SCHEMES)

    md.validateLink = validate_link  # type: ignore[method-assign]
    return md


_MD = _markdown()


def render_markdown(text: str | None) -> Markup:
    """Markdown with raw HTML off and links limited to http, https, mailto and relative."""
    if not text:
        return Markup("")
    return Markup(_MD.render(visible(text)))  # markdown-it escapes; raw HTML is off


def _shown(value: Any) -> Any:
    """Every value a template prints: text with its invisible and direction-changing
    characters spelt out (acceptance.text), so a name cannot display as another; markup
    the filters built is left as it is."""
    if isinstance(value, str) and not isinstance(value, Markup):
        return visible(value)
    return value


def _verdict_badge(verdict: Verdict | VisitState) -> Markup:
    """A verdict's or state's word and mark, both from their one definition in ``results``."""
    return Markup('<span class="badge v-{slug}"><span class="shape" aria-hidden="true">'
                  '{shape}</span> {word}</span>').format(
        slug=verdict.slug, shape=verdict.mark, word=verdict.word)


def _signature_badge(status: Any) -> Markup:
    state = getattr(status, "state", "unsigned")
    phrase = getattr(status, "phrase", "not signed")
    return Markup('<span class="badge sig sig-{state}"><span class="shape" aria-hidden="true">'
                  '{shape}</span> {phrase}</span>').format(
        state=state, shape=SIGNATURE_SHAPES.get(state, "?"), phrase=phrase)


def _unsigned(visit: Any) -> Any:
    return SignatureStatus("unsigned")


def make_environment(extra_globals: dict[str, Any] | None = None,
                     directory: Path | None = None) -> jinja2.Environment:
    env = jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(directory or templates_dir())),
        autoescape=jinja2.select_autoescape(("html", "j2", "svg", "xml"), default=True),
        undefined=jinja2.StrictUndefined,
        trim_blocks=True,
        lstrip_blocks=True,
        keep_trailing_newline=True,
        finalize=_shown,
    )
    env.filters["markdown"] = render_markdown
    env.filters["badge"] = _verdict_badge
    env.filters["signature_badge"] = _signature_badge
    # Every machine, visit and attachment name in a link is percent-encoded (RFC 3986 §2.1):
    # a space, '#', '?' or '%' in a folder or file name must still link to its file.
    env.filters["urlpart"] = url_segment
    env.filters["urlpath"] = url_path
    # Pages show a visit's sign-off through signature_of(visit); the build replaces this
    # default with the states it checked (acceptance.integrity).
    env.globals["signature_of"] = _unsigned
    env.globals.update(extra_globals or {})
    env.globals["Verdict"] = Verdict
    env.globals["VisitState"] = VisitState
    return env
