"""Render the stale PDFs into staging, in a pool of worker processes when ``jobs`` > 1.

The pool is started by a ``forkserver`` that has imported WeasyPrint already, and each
worker exits after :data:`TASKS_PER_WORKER` documents so the memory it held is given back
(WeasyPrint keeps a whole document in memory).
"""

from __future__ import annotations

import multiprocessing
from collections.abc import Callable
from multiprocessing.context import ForkServerContext
from pathlib import Path

from .context import BuildContext, PdfTask, Progress
from .staging import release_memory
from .stale import documents

__all__ = ["render_pdfs", "in_worker", "TASKS_PER_WORKER"]

#: Documents a PDF worker renders before it is replaced (WeasyPrint keeps what it loaded).
TASKS_PER_WORKER = 16


def render_pdfs(ctx: BuildContext) -> None:
    """Render every stale PDF but the package into staging and record each page count in
    ``ctx.state`` (counting the pages of reused PDFs the previous build did not record)."""
    ctx.state.pages.update(_render_pdfs(documents(ctx.fresh, package=False), ctx.staging,
                                        ctx.jobs, ctx.progress))
    _count_missing_pages(ctx)
    ctx.report.rendered = sum(1 for t in ctx.fresh if not t.part)


def in_worker(function: Callable[..., int], *arguments: object) -> int:
    """``function(*arguments)`` in a PDF worker that exits afterwards, so what WeasyPrint
    held is given back rather than added to this process, which lives to the end."""
    with _pdf_context().Pool(processes=1, maxtasksperchild=1) as pool:
        result: int = pool.apply(function, arguments)
        return result


def _pdf_context() -> ForkServerContext:
    # forkserver: workers start from a process that has already imported WeasyPrint.
    context = multiprocessing.get_context("forkserver")
    context.set_forkserver_preload(["acceptance.rendering.pdf"])
    return context


def _count_missing_pages(ctx: BuildContext) -> None:
    """Count the pages of PDFs reused from a site built before page counts were recorded."""
    if not ctx.tasks:  # a build without PDFs does not load the PDF stack
        return
    # The PDF stack loads only when a build renders PDFs.
    from ..rendering.package import page_count

    for task in ctx.tasks:
        if task.pdf not in ctx.state.pages and (ctx.staging / task.pdf).is_file():
            ctx.state.pages[task.pdf] = page_count(ctx.staging / task.pdf)


def _render_one(task: PdfTask, staging: str) -> tuple[str, int]:
    # The PDF stack loads only when a build renders PDFs.
    from ..rendering.pdf import render_pdf

    root = Path(staging)
    (root / task.pdf).parent.mkdir(parents=True, exist_ok=True)
    pages = render_pdf(root / task.html, root / task.pdf, roots=[root],
                       attachments=task.attachments, info=task.info,
                       links_from=root if task.part else None)
    if task.part:  # a long document: give back what its layout held before the next one
        release_memory()
    return task.pdf, pages


def _render_star(arguments: tuple[PdfTask, str]) -> tuple[str, int]:
    return _render_one(*arguments)


def _render_pdfs(tasks: list[PdfTask], staging: Path, jobs: int,
                 progress: Progress | None) -> dict[str, int]:
    """Render ``tasks`` into ``staging``, in worker processes when ``jobs`` > 1; return the
    page count of each PDF."""
    pages: dict[str, int] = {}
    if jobs <= 1 or len(tasks) <= 1:
        for number, task in enumerate(tasks, start=1):
            pages[task.pdf] = _render_one(task, str(staging))[1]
            if progress:
                progress(f"[{number}/{len(tasks)}] {task.pdf}")
        return pages
    # Each worker is replaced after a few documents so the memory it held is given back;
    # the older multiprocessing.Pool is used because ProcessPoolExecutor's
    # max_tasks_per_child can stop replacing workers on Python 3.11 and hang the build.
    with _pdf_context().Pool(processes=jobs, maxtasksperchild=TASKS_PER_WORKER) as pool:
        work = [(task, str(staging)) for task in tasks]
        for number, (name, count) in enumerate(
                pool.imap_unordered(_render_star, work, chunksize=1), start=1):
            pages[name] = count
            if progress:
                progress(f"[{number}/{len(tasks)}] {name}")
    return pages
