"""Build a generated job of many machines and print ratios measured in one run.

    .venv/bin/python benchmarks/build_scale.py [--machines 200] [--visits 3] [--jobs 2]

Figures (each a ratio of two timings taken in this run, on this machine):
- full build ÷ PDF floor: the floor is the same HTML documents rendered by a bare WeasyPrint
  loop with the same number of worker processes (target ≤ 1.15);
- no-op rebuild ÷ full build (target ≤ 0.02);
- one-visit change ÷ full build (target ≤ 0.05);
- one worker ÷ two workers, full builds (target ≥ 1.8);
- peak memory of the build, summed over its processes (target ≤ 400 MB);
- ``check`` on the job ÷ ``python -c "import yaml, numpy"``, after one visit was edited
  (target ≤ 3); also printed: the first check (nothing cached) and an unchanged one.

The job is invented: copies of a three-phase motor-driven machine with readings varied a
little per machine, so that every page differs.
"""

from __future__ import annotations

import argparse
import multiprocessing
import os
import shutil
import subprocess
import sys
import tempfile
import threading
import time
from pathlib import Path

REPO = Path(__file__).resolve().parents[1]
ACCEPTANCE = [sys.executable, "-m", "acceptance.cli"]

JOB = """title: Generated job for the build benchmark
site: {name: Benchmark works}
contractor: {name: Benchmark installers}
decision_rule: guarded acceptance
"""

INSTRUMENTS = """instruments:
  - id: dmm-1
    kind: multimeter
    response: true-rms
    category: CAT III 600 V
    calibrated: 2026-01-12
    calibration_due: 2027-06-12
    functions:
      - {measures: V, range: 600 V, accuracy: "±(0.5 % of reading + 2 digits)", resolution: 0.1 V}
      - {measures: Hz, range: 100 Hz, accuracy: "±(0.1 % of reading + 2 digits)", resolution: 0.01 Hz}
  - id: clamp-1
    kind: clamp meter
    response: true-rms
    category: CAT IV 600 V
    calibrated: 2026-01-12
    calibration_due: 2027-06-12
    functions:
      - {measures: A, range: 40 A, accuracy: "±(2 % of reading + 5 digits)", resolution: 0.1 A}
  - id: ohm-1
    kind: low-resistance ohmmeter
    response: not applicable
    calibrated: 2026-01-12
    calibration_due: 2027-06-12
    functions:
      - {measures: Ω, range: 20 Ω, accuracy: "±(0.2 % of reading + 2 digits)", resolution: 0.001 Ω}
"""

MACHINE = """name: Conveyor drive {number}
kind: conveyor
area: Line {line}
nameplate:
  rated_voltage: 400 V
  phases: 3
  frequency: 50 Hz
  rated_current: 14.8 A
  rated_power: 7.5 kW
  windings:
    - {{id: u, name: Winding U, material: copper, thermal_class: F, resistance: 1.120 Ω, resistance_tolerance: 5 %, resistance_temperature: 20 °C}}
    - {{id: v, name: Winding V, material: copper, thermal_class: F, resistance: 1.120 Ω, resistance_tolerance: 5 %, resistance_temperature: 20 °C}}
    - {{id: w, name: Winding W, material: copper, thermal_class: F, resistance: 1.120 Ω, resistance_tolerance: 5 %, resistance_temperature: 20 °C}}
  protective_device: {{description: Motor-protective circuit breaker, rating: 16 A}}
checklists: [supply, windings, current]
"""

VISIT = """kind: {kind}
date: {date}
performed_by: [Benchmark installer]
default_instrument: dmm-1
conditions: {{ambient: 19.0 °C}}
readings:
  supply:
    voltage: {{L1-L2: {v1} V, L2-L3: 399.8 V, L3-L1: 401.0 V}}
    frequency: 50.00 Hz
    voltage_under_load: {{L1-L2: 396.3 V, L2-L3: 394.0 V, L3-L1: 398.2 V}}
  windings:
    resistance:
      u: {{value: {r} Ω, instrument: ohm-1, temperature: 18.5 °C}}
      v: {{value: 1.121 Ω, instrument: ohm-1, temperature: 18.5 °C}}
      w: {{value: 1.116 Ω, instrument: ohm-1, temperature: 18.5 °C}}
  current:
    load_current:
      L1: {{value: {i} A, instrument: clamp-1}}
      L2: {{value: 12.7 A, instrument: clamp-1}}
      L3: {{value: 13.1 A, instrument: clamp-1}}
"""


def generate(root: Path, machines: int, visits: int) -> None:
    (root / "machines").mkdir(parents=True)
    (root / "job.yaml").write_text(JOB, encoding="utf-8")
    (root / "instruments.yaml").write_text(INSTRUMENTS, encoding="utf-8")
    kinds = ["commissioning", "periodic", "periodic", "after-repair"]
    for number in range(machines):
        folder = root / "machines" / f"drive-{number:03d}"
        (folder / "visits").mkdir(parents=True)
        (folder / "machine.yaml").write_text(
            MACHINE.format(number=number, line=number % 8 + 1), encoding="utf-8")
        for visit in range(visits):
            kind = kinds[visit % len(kinds)]
            date = f"2026-{visit + 2:02d}-{number % 27 + 1:02d}"
            text = VISIT.format(kind=kind, date=date, v1=f"{400 + (number % 7) * 0.3:.1f}",
                                r=f"{1.110 + (number % 9) * 0.001:.3f}",
                                i=f"{12.0 + (number % 10) * 0.1:.1f}")
            (folder / "visits" / f"{date}-{kind}.yaml").write_text(text, encoding="utf-8")


class PeakMemory:
    """Peak of the summed memory (PSS) of a process and all its descendants."""

    def __init__(self, pid: int) -> None:
        self.pid, self.peak, self._stop = pid, 0, threading.Event()
        self._thread = threading.Thread(target=self._run, daemon=True)
        self._thread.start()

    def _tree(self) -> list[int]:
        children: dict[int, list[int]] = {}
        for entry in os.listdir("/proc"):
            if not entry.isdigit():
                continue
            try:
                with open(f"/proc/{entry}/stat") as handle:
                    parent = int(handle.read().rsplit(")", 1)[1].split()[1])
            except OSError:
                continue
            children.setdefault(parent, []).append(int(entry))
        found, queue = [], [self.pid]
        while queue:
            pid = queue.pop()
            found.append(pid)
            queue.extend(children.get(pid, []))
        return found

    def _rss(self, pid: int) -> int:
        # Proportional set size: pages shared after fork (the forkserver's preloaded
        # WeasyPrint) count once across the processes that share them, not once each.
        for source, key in ((f"/proc/{pid}/smaps_rollup", "Pss:"), (f"/proc/{pid}/status",
                                                                      "VmRSS:")):
            try:
                with open(source) as handle:
                    for line in handle:
                        if line.startswith(key):
                            return int(line.split()[1]) * 1024
            except OSError:
                continue
        return 0

    def _run(self) -> None:
        while not self._stop.wait(0.05):
            self.peak = max(self.peak, sum(self._rss(pid) for pid in self._tree()))

    def stop(self) -> int:
        self._stop.set()
        self._thread.join()
        return self.peak


def timed(command: list[str], memory: bool = False, allowed: tuple[int, ...] = (0,)
          ) -> tuple[float, int]:
    start = time.perf_counter()
    process = subprocess.Popen(command, cwd=REPO, stdout=subprocess.DEVNULL)
    watcher = PeakMemory(process.pid) if memory else None
    code = process.wait()
    elapsed = time.perf_counter() - start
    peak = watcher.stop() if watcher else 0
    if code not in allowed:
        raise SystemExit(f"{' '.join(command)} failed with exit code {code}")
    return elapsed, peak


def _floor_render(html: str) -> int:
    from weasyprint import HTML

    document = HTML(filename=html, media_type="print").render()
    document.write_pdf(html[:-5] + ".floor.pdf")
    return len(document.pages)


def pdf_floor(site: Path, jobs: int) -> float:
    """The same visit pages rendered by a bare WeasyPrint loop with ``jobs`` workers."""
    pages = sorted(str(p) for p in (site / "machines").glob("*/*.html")
                   if p.name != "index.html")
    context = multiprocessing.get_context("forkserver")
    context.set_forkserver_preload(["weasyprint"])
    start = time.perf_counter()
    with context.Pool(jobs, maxtasksperchild=16) as pool:
        list(pool.imap_unordered(_floor_render, pages, chunksize=1))
    elapsed = time.perf_counter() - start
    for path in (site / "machines").glob("*/*.floor.pdf"):
        path.unlink()
    return elapsed


def check_figures(job: Path, repeats: int = 15) -> None:
    """``check`` on the job: first run (nothing cached), after one visit edited, unchanged.

    Each figure is the fastest of ``repeats`` runs (as ``timeit`` reports), and the baseline
    runs alternate with the edited checks, so a change in the shared machine's speed during
    the measurement weighs on both sides of the ratio alike.
    """
    check = [*ACCEPTANCE, "check", str(job)]
    baseline_command = [sys.executable, "-c", "import yaml, numpy"]
    os.environ["ACCEPTANCE_NO_CACHE"] = "1"
    cold = min(timed(check, allowed=(0, 1))[0] for _ in range(2))
    del os.environ["ACCEPTANCE_NO_CACHE"]
    timed(check, allowed=(0, 1))  # fills the cache
    visit = sorted((job / "machines" / "drive-007" / "visits").glob("*.yaml"))[0]
    original = visit.read_text(encoding="utf-8")
    baseline, edited = [], []
    for number in range(repeats):
        baseline.append(timed(baseline_command)[0])
        # A reading edited as an installer would, to a value not checked before.
        visit.write_text(original.replace("frequency: 50.00 Hz",
                                          f"frequency: 50.{number + 11} Hz"), encoding="utf-8")
        edited.append(timed(check, allowed=(0, 1))[0])
    visit.write_text(original, encoding="utf-8")
    timed(check, allowed=(0, 1))
    unchanged = min(timed(check, allowed=(0, 1))[0] for _ in range(5))
    base = min(baseline)
    print(f"import yaml, numpy    {base:8.2f} s   (fastest of {repeats})")
    print(f"check, first run      {cold:8.2f} s   ÷ import = {cold / base:.2f} "
          "(nothing cached: every machine loaded and evaluated)")
    print(f"check, a visit edited {min(edited):8.2f} s   ÷ import = {min(edited) / base:.2f} "
          f"(target ≤ 3; fastest of {repeats}, median {sorted(edited)[repeats // 2]:.2f} s)")
    print(f"check, unchanged      {unchanged:8.2f} s   ÷ import = {unchanged / base:.2f}")


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--machines", type=int, default=200)
    parser.add_argument("--visits", type=int, default=3)
    parser.add_argument("--jobs", type=int, default=2)
    parser.add_argument("--skip-one-worker", action="store_true",
                        help="skip the single-worker full build (the slowest step)")
    parser.add_argument("--workers-only", action="store_true",
                        help="only the one-worker ÷ two-worker ratio (on a smaller job, say)")
    parser.add_argument("--memory-only", action="store_true",
                        help="only the full build and its peak memory")
    parser.add_argument("--check-only", action="store_true",
                        help="only the check figures (no build)")
    args = parser.parse_args()
    # Measured as installed: pip compiles a wheel's modules to bytecode, and bootstrap.sh
    # compiles the source tree; a shell with PYTHONDONTWRITEBYTECODE would otherwise time
    # compiling the tool on every start.
    subprocess.run([sys.executable, "-m", "compileall", "-q", str(REPO / "acceptance")],
                   check=True, stdout=subprocess.DEVNULL)
    work = Path(tempfile.mkdtemp(prefix="acceptance-bench-"))
    job, site = work / "job", work / "site"
    os.environ["XDG_CACHE_HOME"] = str(work / "cache")  # check's cache goes with the job
    try:
        generate(job, args.machines, args.visits)
        print(f"job: {args.machines} machines × {args.visits} visits, {args.jobs} workers")
        build = [*ACCEPTANCE, "build", str(job), "-o", str(site), "-q"]
        if args.check_only:
            check_figures(job)
            return 0
        if args.workers_only:
            single, _ = timed([*build, "-j", "1"])
            shutil.rmtree(site)
            double, _ = timed([*build, "-j", "2"])
            print(f"one worker ÷ two      {single:8.1f} s ÷ {double:.1f} s = "
                  f"{single / double:.2f} (target ≥ 1.8)")
            return 0

        full, peak = timed([*build, "-j", str(args.jobs)], memory=True)
        print(f"full build            {full:8.1f} s   peak memory {peak / 2**20:.0f} MB "
              "(target ≤ 400 MB)")
        if args.memory_only:
            return 0
        floor = pdf_floor(site, args.jobs)
        print(f"PDF floor             {floor:8.1f} s   full ÷ floor = {full / floor:.3f} "
              "(target ≤ 1.15)")
        noop, _ = timed([*build, "-j", str(args.jobs)])
        print(f"no-op rebuild         {noop:8.1f} s   ÷ full = {noop / full:.4f} "
              "(target ≤ 0.02)")
        visit = next((job / "machines" / "drive-000" / "visits").glob("*.yaml"))
        visit.write_text(visit.read_text(encoding="utf-8").replace(
            "frequency: 50.00 Hz", "frequency: 50.01 Hz"), encoding="utf-8")
        one, _ = timed([*build, "-j", str(args.jobs)])
        print(f"one-visit change      {one:8.1f} s   ÷ full = {one / full:.4f} "
              "(target ≤ 0.05)")
        check_figures(job)
        if not args.skip_one_worker:
            shutil.rmtree(site)
            single, _ = timed([*build, "-j", "1"])
            shutil.rmtree(site)
            double, _ = timed([*build, "-j", "2"])
            print(f"one worker ÷ two      {single:8.1f} s ÷ {double:.1f} s = "
                  f"{single / double:.2f} (target ≥ 1.8)")
    finally:
        shutil.rmtree(work, ignore_errors=True)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
