"""Assemble ``package.pdf`` from the PDFs in staging (see :mod:`acceptance.rendering.package`)
and keep its cover and contents for the next build."""

from __future__ import annotations

from functools import partial
from typing import TYPE_CHECKING

from ..results import RESULTS_SCHEMA
from .context import BuildContext
from .pages import review_environment
from .pdfs import in_worker
from .staging import link_or_copy
from .stale import documents, file_digest

if TYPE_CHECKING:  # the PDF stack loads only when a build renders PDFs
    from ..rendering.package import KeptPart
    from ..rendering.pdf import PdfInfo

__all__ = ["find_kept_front", "assemble_package"]


def find_kept_front(ctx: BuildContext) -> None:
    """The previous build's package front, if it is still the file that build recorded."""
    if not ctx.with_pdf:
        return
    # The PDF stack loads only when a build renders PDFs.
    from ..rendering.package import FRONT_NAME, PARTS_FOLDER, KeptPart

    name = f"{PARTS_FOLDER}/{FRONT_NAME}"
    state = ctx.previous
    key, pages, digest = state.keys.get(name), state.pages.get(name), state.kept.get(name)
    if key is None or pages is None or digest is None \
            or file_digest(ctx.output / name) != digest:
        return
    ctx.kept_front = KeptPart(key, pages, ctx.output / name)


def assemble_package(ctx: BuildContext) -> None:
    """Write package.pdf when it is stale, every other PDF being in staging with its page
    count in ``ctx.state``; record its front for the next build and count the pages
    rendered."""
    if ctx.package_info is None:  # set with the tasks: this build renders no PDF
        return
    package_pages, front = _render_package(ctx, ctx.package_info)
    _keep_front(ctx, front)
    ctx.report.pdf_pages = package_pages + sum(
        ctx.state.pages[t.pdf] for t in documents(ctx.fresh, package=False) if not t.part)


def _render_package(ctx: BuildContext, info: PdfInfo) -> tuple[int, KeptPart | None]:
    """Write package.pdf when its task is among ``ctx.fresh``; return its page count and its
    front part (or the kept front when the package was not written)."""
    # The PDF stack loads only when a build renders PDFs.
    from ..rendering.package import lay_out_part, render_package
    from ..rendering.pdf import PdfSource

    if not documents(ctx.fresh, package=True):
        return 0, ctx.kept_front
    results = PdfSource("results.json", (ctx.staging / "results.json").read_bytes(),
                        "the computed results (schema " + RESULTS_SCHEMA + ")")
    lay_out = partial(in_worker, lay_out_part) if ctx.jobs > 1 else lay_out_part
    return render_package(review_environment(ctx.result, ctx.signatures), ctx.result,
                          ctx.staging, ctx.signatures, [results], info,
                          ctx.state.pages, ctx.front_prefix, ctx.kept_front, ctx.progress,
                          lay_out)


def _keep_front(ctx: BuildContext, front: KeptPart | None) -> None:
    """Record the package's front (and every kept part's digest) for the next build; a
    front kept from the previous build when the package was not joined again is carried
    over."""
    # The PDF stack loads only when a build renders PDFs.
    from ..rendering.package import FRONT_NAME, PARTS_FOLDER

    staging, state = ctx.staging, ctx.state
    name = f"{PARTS_FOLDER}/{FRONT_NAME}"
    if front is not None:
        target = staging / name
        if not target.exists():
            link_or_copy(front.pdf, target)
        state.keys[name] = front.key
        state.pages[name] = front.pages
    folder = staging / PARTS_FOLDER
    if folder.is_dir():
        state.kept = {path.relative_to(staging).as_posix(): file_digest(path) or ""
                      for path in sorted(folder.iterdir()) if path.is_file()}
