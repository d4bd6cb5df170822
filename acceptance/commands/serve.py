"""``acceptance serve JOB``: a live preview on 127.0.0.1 that rebuilds when the job changes.

The last good build keeps being served when a rebuild fails; the input problems are
shown in a banner on every page until they are fixed. Pages reload themselves after
each rebuild (a small script polls a status address of this server only).
"""

from __future__ import annotations

import argparse
import html
import json
import shutil
import signal
import sys
import tempfile
import threading
import time
from functools import partial
from http.server import SimpleHTTPRequestHandler, ThreadingHTTPServer
from pathlib import Path

from ..build import build_site
from ..errors import AcceptanceError, InputError
from ..resources import checklists_dir, templates_dir

_STATUS_PATH = "/__acceptance/status"
_RELOAD_SCRIPT = """<script>
(function () {
  var seen = null;
  function poll() {
    fetch("STATUS", {cache: "no-store"}).then(function (r) { return r.json(); }).then(function (s) {
      if (seen !== null && s.generation !== seen) { location.reload(); }
      seen = s.generation;
    }).catch(function () {}).finally(function () { setTimeout(poll, 1000); });
  }
  poll();
})();
</script>""".replace("STATUS", _STATUS_PATH)


def register(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("job", type=Path, help="the job folder (holding job.yaml)")
    parser.add_argument("--port", type=int, default=8765, help="port on 127.0.0.1 (0: any free)")
    parser.add_argument("--pdf", action="store_true",
                        help="also render the PDFs on every rebuild (slower)")
    parser.add_argument("-o", "--output", type=Path,
                        help="folder for the preview build (default: a temporary folder)")
    parser.add_argument("--interval", type=float, default=0.5,
                        help="seconds between checks for changed files")


class _Preview:
    def __init__(self, job: Path, output: Path, with_pdf: bool) -> None:
        self.job, self.output, self.with_pdf = job, output, with_pdf
        self.problems: list[str] = []
        self.generation = 0
        self.lock = threading.Lock()

    def fingerprint(self) -> tuple[tuple[str, int, int], ...]:
        entries = []
        for root in (self.job, checklists_dir(), templates_dir()):
            for path in sorted(root.rglob("*")):
                if path.is_file() and not path.name.startswith("."):
                    stat = path.stat()
                    entries.append((str(path), stat.st_mtime_ns, stat.st_size))
        return tuple(entries)

    def rebuild(self) -> None:
        try:
            build_site(self.job, self.output, with_pdf=self.with_pdf)
        except InputError as error:
            problems = [str(p) for p in error.problems]
        except AcceptanceError as error:
            problems = [str(error)]
        else:
            problems = []
        with self.lock:
            self.problems = problems
            self.generation += 1
        stamp = time.strftime("%H:%M:%S")
        if problems:
            print(f"[{stamp}] rebuild failed; still serving the last good build:",
                  file=sys.stderr)
            for line in problems:
                print(f"  {line}", file=sys.stderr)
        else:
            print(f"[{stamp}] rebuilt", file=sys.stderr)


class _Handler(SimpleHTTPRequestHandler):
    preview: _Preview

    def log_message(self, format: str, *args: object) -> None:  # http.server names it
        return  # the terminal shows rebuilds, not every request

    def do_GET(self) -> None:  # http.server names it
        if self.path.split("?")[0] == _STATUS_PATH:
            with self.preview.lock:
                body = json.dumps({"generation": self.preview.generation,
                                   "problems": self.preview.problems}).encode()
            self._send(body, "application/json")
            return
        target = Path(self.translate_path(self.path))
        if target.is_dir():
            target = target / "index.html"
        if target.suffix == ".html" and target.is_file():
            text = target.read_text(encoding="utf-8")
            text = text.replace("</body>", self._banner() + _RELOAD_SCRIPT + "</body>", 1)
            self._send(text.encode("utf-8"), "text/html; charset=utf-8")
            return
        super().do_GET()

    def _banner(self) -> str:
        with self.preview.lock:
            problems = list(self.preview.problems)
        if not problems:
            return ""
        items = "".join(f"<li><code>{html.escape(p)}</code></li>" for p in problems)
        return ('<div role="alert" class="preview-errors" style="position:fixed;bottom:0;'
                'left:0;right:0;max-height:45vh;overflow:auto;background:#fff3f0;'
                'border-top:4px solid #8c1d18;padding:.5rem 1rem;font-size:14px">'
                f"<strong>✗ The last change has input problems; this is the last good build."
                f"</strong><ul>{items}</ul></div>")

    def _send(self, body: bytes, content_type: str) -> None:
        self.send_response(200)
        self.send_header("Content-Type", content_type)
        self.send_header("Content-Length", str(len(body)))
        self.send_header("Cache-Control", "no-store")
        self.end_headers()
        self.wfile.write(body)


def _interrupt(_signum: int, _frame: object) -> None:
    # SIGTERM (a service manager, `kill`) stops the server the way Ctrl-C does, so the
    # temporary preview folder is removed either way.
    raise KeyboardInterrupt


def run(args: argparse.Namespace) -> int:
    temporary = args.output is None
    output = args.output or Path(tempfile.mkdtemp(prefix="acceptance-preview-")) / "site"
    signal.signal(signal.SIGTERM, _interrupt)
    stop = threading.Event()
    server: ThreadingHTTPServer | None = None
    try:
        preview = _Preview(args.job, output, args.pdf)
        preview.rebuild()
        if not output.is_dir():
            # Nothing good to serve yet: the first build itself failed. Keep watching anyway.
            output.mkdir(parents=True, exist_ok=True)
        handler = type("Handler", (_Handler,), {"preview": preview})
        server = ThreadingHTTPServer(("127.0.0.1", args.port),
                                     partial(handler, directory=str(output)))
        print(f"serving http://127.0.0.1:{server.server_address[1]}/index.html "
              "(Ctrl-C to stop)", flush=True)

        def watch() -> None:
            seen = preview.fingerprint()
            while not stop.wait(args.interval):
                current = preview.fingerprint()
                if current != seen:
                    seen = current
                    preview.rebuild()

        threading.Thread(target=watch, daemon=True).start()
        server.serve_forever()
    except KeyboardInterrupt:
        pass
    finally:
        stop.set()
        if server is not None:
            server.server_close()
        if temporary:
            shutil.rmtree(output.parent, ignore_errors=True)
    return 0
