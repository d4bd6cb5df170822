"""The built site in a real headless Chromium over file://: every visit reached from the index
and back, every filter, nothing requested from outside the site folder, no console error,
and no serious or critical accessibility violation (axe-core, vendored in tests/vendor)."""

from __future__ import annotations

import json
import shutil
from collections.abc import Iterator
from pathlib import Path

import pytest

from acceptance.build import build_site
from tests.conftest import DEMO_JOB

playwright_sync = pytest.importorskip("playwright.sync_api")

CHROMIUM = Path("/usr/bin/chromium")
ARGS = ["--no-sandbox", "--disable-gpu", "--disable-background-networking",
        "--disable-component-update", "--disable-sync", "--no-first-run"]
AXE = Path(__file__).parent / "vendor" / "axe.min.js"

pytestmark = [pytest.mark.slow,
              pytest.mark.skipif(not CHROMIUM.exists(), reason="needs Debian's chromium")]


@pytest.fixture(scope="module")
def site(tmp_path_factory) -> Path:
    output = tmp_path_factory.mktemp("browser") / "site"
    build_site(DEMO_JOB, output, with_pdf=False)
    return output


@pytest.fixture(scope="module")
def browser() -> Iterator[object]:
    with playwright_sync.sync_playwright() as playwright:
        instance = playwright.chromium.launch(executable_path=str(CHROMIUM), args=ARGS,
                                              headless=True)
        yield instance
        instance.close()


class Watched:
    """A page that records every request it makes and every console error."""

    def __init__(self, browser: object, site: Path, java_script: bool = True) -> None:
        self.context = browser.new_context(java_script_enabled=java_script)  # type: ignore[attr-defined]
        self.page = self.context.new_page()
        self.site = site.resolve()
        self.outside: list[str] = []
        self.errors: list[str] = []
        self.page.on("request", self._request)
        self.page.on("console", lambda m: self.errors.append(m.text) if m.type == "error"
                     else None)
        self.page.on("pageerror", lambda e: self.errors.append(str(e)))

    def _request(self, request: object) -> None:
        url: str = request.url  # type: ignore[attr-defined]
        from urllib.parse import unquote, urlsplit

        parts = urlsplit(url)
        if parts.scheme == "file" and Path(unquote(parts.path)).resolve().is_relative_to(
                self.site):
            return
        if parts.scheme in ("data", "about"):
            return
        self.outside.append(url)

    def open(self, relative: str) -> None:
        self.page.goto((self.site / relative).as_uri())


@pytest.fixture
def watched(browser, site) -> Iterator[Watched]:
    page = Watched(browser, site)
    yield page
    page.context.close()


def visible_rows(page: object) -> list[dict[str, str]]:
    return page.eval_on_selector_all(  # type: ignore[attr-defined]
        "#visit-table tbody tr.visit-row",
        "rows => rows.filter(r => !r.hidden).map(r => ({...r.dataset}))")


def test_walk_from_the_index_to_every_visit_and_back(watched, site):
    results = json.loads((site / "results.json").read_text(encoding="utf-8"))
    visits = [(m["id"], v["id"], m["name"]) for m in results["machines"] for v in m["visits"]]
    watched.open("index.html")
    for machine, visit, name in visits:
        link = watched.page.locator(f'#visit-table a[href="machines/{machine}/{visit}.html"]')
        link.click()
        watched.page.wait_for_load_state()
        assert watched.page.url.endswith(f"/machines/{machine}/{visit}.html")
        assert name in watched.page.locator("h1").inner_text()
        watched.page.go_back()
        watched.page.wait_for_load_state()
        assert watched.page.url.endswith("/index.html")
        assert watched.page.locator("#filters form").count() == 1
    # and from a visit through its machine page back to the index
    machine, visit, _ = visits[0]
    watched.open(f"machines/{machine}/{visit}.html")
    watched.page.locator(".crumbs a", has_text="Machines").click()
    watched.page.wait_for_load_state()
    assert watched.page.url.endswith("/index.html")
    assert watched.outside == []
    assert watched.errors == []


def test_each_filter_shows_the_matching_visits(watched, site):
    results = json.loads((site / "results.json").read_text(encoding="utf-8"))
    visits = [(m, v) for m in results["machines"] for v in m["visits"]]
    watched.open("index.html")
    page = watched.page
    assert len(visible_rows(page)) == len(visits)
    status = page.locator("#filter-status")
    assert status.inner_text() == f"Showing {len(visits)} of {len(visits)} visits."
    for state in sorted({v["state"] for _, v in visits}):
        page.select_option("#filter-state", state.replace(" ", "-"))
        expected = sum(1 for _, v in visits if v["state"] == state)
        assert len(visible_rows(page)) == expected, state
        assert status.inner_text() == f"Showing {expected} of {len(visits)} visits."
    page.select_option("#filter-state", "")
    for area in sorted({m["area"] for m, _ in visits if m["area"]}):
        page.select_option("#filter-area", area)
        assert {r["area"] for r in visible_rows(page)} == {area}
        assert len(visible_rows(page)) == sum(1 for m, _ in visits if m["area"] == area)
    page.select_option("#filter-area", "")
    checklist = visits[0][1]["checklists"][-1]["id"]
    page.select_option("#filter-checklist", checklist)
    assert len(visible_rows(page)) == sum(
        1 for _, v in visits if checklist in [c["id"] for c in v["checklists"]])
    page.select_option("#filter-checklist", "")
    page.select_option("#filter-open", "yes")
    with_open = visible_rows(page)
    assert with_open and all(int(r["open"]) > 0 for r in with_open)
    page.select_option("#filter-open", "no")
    assert all(int(r["open"]) == 0 for r in visible_rows(page))
    page.locator("#filters button[type=reset]").click()
    page.wait_for_function("document.getElementById('filter-open').value === ''")
    page.wait_for_function(
        f"document.getElementById('filter-status').textContent.startsWith('Showing "
        f"{len(visits)} ')")
    assert watched.outside == [] and watched.errors == []


def test_without_javascript_the_index_is_the_plain_list(browser, site):
    plain = Watched(browser, site, java_script=False)
    try:
        plain.open("index.html")
        rows = plain.page.locator("#visit-table tbody tr.visit-row")
        results = json.loads((site / "results.json").read_text(encoding="utf-8"))
        visits = sum(len(m["visits"]) or 1 for m in results["machines"])
        assert rows.count() == visits
        assert plain.page.locator("#filters form").count() == 0
        assert all(rows.nth(n).is_visible() for n in range(rows.count()))
    finally:
        plain.context.close()


@pytest.mark.parametrize("relative", ["index.html", "deficiencies.html", "instruments.html",
                                      "machines/press-brake-1/index.html",
                                      "machines/press-brake-1/2026-03-10-commissioning.html"])
def test_no_serious_or_critical_accessibility_violation(watched, relative):
    watched.open(relative)
    watched.page.add_script_tag(content=AXE.read_text(encoding="utf-8"))
    # preload off: axe would otherwise re-read the style sheet by XMLHttpRequest, which a
    # file:// page may not do (and the site never does).
    result = watched.page.evaluate("async () => await axe.run(document, {resultTypes: "
                                   "['violations'], preload: false})")
    serious = [(v["id"], v["impact"], [n["target"] for n in v["nodes"]][:3])
               for v in result["violations"] if v["impact"] in ("serious", "critical")]
    assert serious == []
    assert watched.outside == [] and watched.errors == []


def test_the_site_opens_from_a_copied_folder(browser, site, tmp_path):
    # A USB stick: the same folder elsewhere, still nothing fetched from outside it.
    copy = tmp_path / "stick" / "site"
    shutil.copytree(site, copy)
    moved = Watched(browser, copy)
    try:
        moved.open("index.html")
        moved.page.select_option("#filter-open", "yes")
        assert moved.outside == [] and moved.errors == []
    finally:
        moved.context.close()
