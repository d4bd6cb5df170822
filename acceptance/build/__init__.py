"""The build: load → evaluate → plan the site → render the pages → decide what is stale →
write staging → render the PDFs → assemble the package → manifest → exchange.

Each stage is a module of this package and a verb taking the one :class:`BuildContext`.
Everything is written into a staging folder beside the output; only when every page and
PDF is complete is the staging folder exchanged with the previous site in one rename, so a
failed or interrupted build leaves the previous site intact.
"""

from __future__ import annotations

from pathlib import Path

from ..clock import source_date_epoch
from ..errors import BuildError
from ..evaluation import evaluate_job
from ..loading import load_job
from .context import MANIFEST_NAME, BuildContext, BuildReport, Progress, SitePage
from .exchange import build_lock, check_output, clear_leftovers, exchange
from .manifest import sign_unchanged_manifest, write_manifest
from .package import assemble_package, find_kept_front
from .pages import render_pages
from .pdfs import render_pdfs
from .plan import plan_site
from .staging import discard_staging, open_staging, write_staging
from .stale import decide_stale, write_build_state

__all__ = ["BuildReport", "SitePage", "build_site", "plan_site", "MANIFEST_NAME"]


def build_site(job_root: Path, output: Path, with_pdf: bool = True,
               progress: Progress | None = None, jobs: int = 1,
               key: Path | None = None, strict: bool = False) -> BuildReport:
    """Build the site for the job at ``job_root`` into ``output``.

    Only what changed is rendered again: a PDF whose page, styles and tool version are
    unchanged is taken from the previous site, and a rebuild that changes nothing writes
    nothing at all. A signed visit altered after sign-off is listed in the report's
    ``altered``; with ``strict`` the build stops there and writes nothing.
    """
    job_root, output = Path(job_root), Path(output)
    source_date_epoch()  # a malformed value is refused before anything is read or written
    job = load_job(job_root)  # raises InputError before anything is written
    result = evaluate_job(job)
    check_output(output, job_root)
    ctx = BuildContext(job_root, output, job, result, with_pdf=with_pdf, jobs=jobs, key=key,
                       progress=progress, strict=strict)
    try:
        _write_site(ctx, key)
    except OSError as error:
        # A full or read-only disk, a folder one may not write: the staging folder is gone
        # or never made, and the previous site was not touched.
        where = error.filename or output
        reason = error.strerror or str(error)
        raise BuildError(f"cannot write the site to {output}: {reason} at {where}. The "
                         f"previous site (if any) is intact; nothing was replaced. Free space "
                         f"or choose a folder you may write to, then build again") from None
    return ctx.report


def _write_site(ctx: BuildContext, key: Path | None) -> None:
    output = ctx.output
    with build_lock(output):
        clear_leftovers(output)
        ctx.pages = plan_site(ctx.result)
        ctx.report.pages = len(ctx.pages)
        render_pages(ctx)
        ctx.report.altered = [
            f"{name}: {status.phrase}: {'; '.join(status.reasons)}"
            for name, status in ctx.signatures.items() if status.state in ("altered", "invalid")]
        if ctx.strict and ctx.report.altered:
            raise BuildError("--strict: signed visits changed since sign-off; nothing was "
                             "written. Review the changes and sign the visits again:\n  "
                             + "\n  ".join(ctx.report.altered))
        if decide_stale(ctx):
            if key is not None:
                sign_unchanged_manifest(output, key)
            return
        find_kept_front(ctx)
        open_staging(ctx)
        try:
            write_staging(ctx)
            render_pdfs(ctx)
            assemble_package(ctx)
            write_build_state(ctx)
            write_manifest(ctx)
            exchange(ctx.staging, output)
        except BaseException:
            discard_staging(ctx)
            raise
