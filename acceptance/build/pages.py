"""Render the pages: every output file but the PDFs, in memory (rendering HTML is cheap,
PDFs are not) — the pages, the assets, the attachments, ``results.json`` and the index's
filter data and punch list."""

from __future__ import annotations

import io
import json

import jinja2
from markupsafe import Markup

from .. import __version__
from ..integrity import SignatureStatus, signature_statuses
from ..loading import Job
from ..rendering.html import make_environment
from ..rendering.review import (
    DEFICIENCIES_CSV_NAME,
    INDEX_DATA_NAME,
    deficiencies_csv,
    index_data_script,
    review_globals,
)
from ..resources import templates_dir
from ..results import JobResult, VisitResult, to_json
from .context import BuildContext

__all__ = ["render_pages", "review_environment"]


def render_pages(ctx: BuildContext) -> None:
    """Fill ``ctx.files`` with every output file but the PDFs, and ``ctx.signatures`` with
    each visit's sign-off state (the pages show it)."""
    ctx.signatures = _signature_states(ctx.job, ctx.result)
    files: dict[str, bytes] = {}
    env = review_environment(ctx.result, ctx.signatures)
    for page in ctx.pages:
        template = env.get_template(page.template)
        extra: dict[str, object] = {}
        if page.template == "visit.html":
            extra["plots"] = _capture_plots(env, page.context["visit"])  # type: ignore[arg-type]
        elif page.template == "machine.html":
            # numpy loads only here: the PDF workers import this package and draw no plots.
            from ..rendering.plots import render_machine_trends

            extra["trends"] = render_machine_trends(
                env, page.context["machine"])  # type: ignore[arg-type]
        files[page.path] = template.render(root=page.root, **page.context, **extra).encode()
    assets = templates_dir() / "assets"
    for path in sorted(assets.rglob("*")):
        if path.is_file():
            files[f"assets/{path.relative_to(assets).as_posix()}"] = path.read_bytes()
    for machine in ctx.job.machines:
        for visit in machine.visits:
            for attachment in visit.model.attachments:
                source = (machine.folder / attachment.path).resolve()
                files[f"machines/{machine.id}/attachments/{attachment.path}"] = \
                    source.read_bytes()
    files["results.json"] = _results_json(ctx.result)
    files.update(_review_files(ctx.result, ctx.signatures))
    ctx.files = files


def review_environment(result: JobResult, signatures: dict[str, SignatureStatus]
                       ) -> jinja2.Environment:
    """The site's template environment, with the job and the review globals."""
    return make_environment({"job": result, "tool_version": __version__,
                             **review_globals(signatures, package_pdf=True)})


def _capture_plots(env: jinja2.Environment, visit: VisitResult
                   ) -> dict[str, dict[str, object]]:
    """SVG plots of every capture attached to a visit's readings, keyed item/element."""
    # numpy loads only here: the PDF workers import this package and draw no plots.
    from ..rendering.plots import PlotTrace, render_spectrum_svg, render_waveform_svg

    plots: dict[str, dict[str, object]] = {}
    for item in visit.items:
        for element in item.elements:
            capture = element.capture
            if capture is None:
                continue
            # A few cycles are enough to see the shape; the analysis used the whole capture.
            cycles = 3 / capture.frequency
            mask = capture.time - capture.time[0] <= cycles
            traces = [PlotTrace(f"{c.name} ({'voltage' if c.unit == 'V' else 'current'})",
                               c.unit, capture.signals[c.name][mask]) for c in capture.channels]
            waveform = render_waveform_svg(env, capture.time[mask] - capture.time[0], traces)
            spectra = []
            for channel in capture.channels:
                spectrum = channel.spectrum
                spectra.append((channel.name, Markup(render_spectrum_svg(
                    env, list(spectrum.orders), list(spectrum.percent_of_fundamental)))))
            plots[f"{item.key}/{element.element or ''}"] = {
                "waveform": Markup(waveform), "spectra": spectra}
    return plots


def _results_json(result: JobResult) -> bytes:
    """``results.json``, encoded as it is serialised: ``json.dumps`` with an indent joins a
    list of every token first, over 300 MB for a 46 MB file of 600 visits."""
    buffer = io.BytesIO()
    with io.TextIOWrapper(buffer, encoding="utf-8", newline="\n", write_through=True) as text:
        json.dump(to_json(result), text, ensure_ascii=False, indent=2)
        text.write("\n")
        text.flush()
        return buffer.getvalue()


def _signature_states(job: Job, result: JobResult) -> dict[str, SignatureStatus]:
    return dict(signature_statuses(job, result))


def _review_files(result: JobResult, signatures: dict[str, SignatureStatus]
                  ) -> dict[str, bytes]:
    """The index filters' data and the punch list as CSV (acceptance.rendering.review)."""
    return {INDEX_DATA_NAME: index_data_script(result).encode(),
            DEFICIENCIES_CSV_NAME: deficiencies_csv(result.punch_list, result,
                                                    signatures).encode()}
