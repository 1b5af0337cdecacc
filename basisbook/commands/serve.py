"""``basisbook serve``: build, serve on 127.0.0.1, rebuild on every save.

A watcher thread rebuilds incrementally (``Builder``) whenever a file in the
project folder changes; the open page reloads itself through a small script
of our own, which is added to HTML only as it is served (never written into
the site or an archive).  A broken input keeps the last good site and shows
the problems on the page and in the terminal until they are fixed.
"""

from __future__ import annotations

import json
import sys
import threading
import time
from functools import partial
from http.server import SimpleHTTPRequestHandler, ThreadingHTTPServer
from pathlib import Path
from typing import Any

from basisbook.commands.build import Builder
from basisbook.contract.errors import EnvironmentFailure, ProjectError

STATE_PATH = "/__basisbook/state"
SCRIPT_PATH = "/__basisbook/live.js"

LIVE_JS = """// basisbook live view: reload when the site is rebuilt, show input problems.
(function () {
  "use strict";
  var seen = null;
  var banner = null;
  function show(text) {
    if (!banner) {
      banner = document.createElement("pre");
      banner.id = "bb-live-problems";
      banner.setAttribute("role", "alert");
      banner.style.cssText = "position:fixed;left:0;right:0;bottom:0;margin:0;max-height:40vh;" +
        "overflow:auto;padding:0.8rem;background:#fff6d6;border-top:3px solid #a3231a;" +
        "font:13px/1.4 monospace;z-index:1000;white-space:pre-wrap";
      document.body.appendChild(banner);
    }
    banner.textContent = text;  // text, never markup
  }
  function poll() {
    var r = new XMLHttpRequest();
    r.open("GET", "/__basisbook/state?t=" + Date.now());
    r.onload = function () {
      try {
        var s = JSON.parse(r.responseText);
        if (seen !== null && s.generation !== seen) { window.location.reload(); return; }
        seen = s.generation;
        if (s.error) { show("The last edit did not build; this page shows the last good handbook.\\n\\n" + s.error); }
        else if (banner) { banner.remove(); banner = null; }
      } catch (e) { /* a server restart: keep polling */ }
      setTimeout(poll, 500);
    };
    r.onerror = function () { setTimeout(poll, 1500); };
    r.send();
  }
  poll();
})();
"""


class LiveState:
    """What the page polls: the build generation and the current problems."""

    def __init__(self) -> None:
        self.generation = 0
        self.error = ""
        self.lock = threading.Lock()

    def snapshot(self) -> dict[str, Any]:
        with self.lock:
            return {"generation": self.generation, "error": self.error}


class Handler(SimpleHTTPRequestHandler):
    state: LiveState

    def log_message(self, format: str, *args: Any) -> None:  # noqa: A002 - stdlib signature
        pass  # the terminal shows builds and problems, not every request

    def do_GET(self) -> None:  # noqa: N802 - stdlib name
        path = self.path.split("?", 1)[0].split("#", 1)[0]
        if not _acceptable(path):
            self.send_error(400, "bad request path")
            return
        if path == STATE_PATH:
            self._send(json.dumps(self.state.snapshot()).encode(), "application/json")
            return
        if path == SCRIPT_PATH:
            self._send(LIVE_JS.encode(), "text/javascript")
            return
        if path.endswith("/"):
            path += "index.html"
        if path.endswith(".html"):
            file = Path(self.translate_path(path))
            if file.is_file():
                html = file.read_text(encoding="utf-8")
                tag = f'<script src="{SCRIPT_PATH}"></script>'
                html = html.replace("</body>", tag + "\n</body>", 1)
                self._send(html.encode("utf-8"), "text/html; charset=utf-8")
                return
        super().do_GET()

    def do_HEAD(self) -> None:  # noqa: N802 - stdlib name
        if not _acceptable(self.path.split("?", 1)[0]):
            self.send_error(400, "bad request path")
            return
        super().do_HEAD()

    def list_directory(self, path: Any) -> None:
        # a folder without index.html is not a page of the handbook: no listings
        self.send_error(404, "not found")
        return None

    def _send(self, body: bytes, ctype: str) -> None:
        self.send_response(200)
        self.send_header("Content-Type", ctype)
        self.send_header("Content-Length", str(len(body)))
        self.send_header("Cache-Control", "no-store")
        self.end_headers()
        self.wfile.write(body)


def _acceptable(path: str) -> bool:
    """A request path the server will look up: absolute, and no NUL or other control
    character once percent-decoded (the standard handler raises on an embedded NUL)."""
    from urllib.parse import unquote

    decoded = unquote(path)
    return path.startswith("/") and not any(ord(ch) < 32 or ch == "\x7f" for ch in decoded)


def _problems_text(exc: ProjectError) -> str:
    return "\n".join(str(p) for p in exc.problems)


def rebuild(builder: Builder, state: LiveState, log: Any = print) -> bool:
    t0 = time.perf_counter()
    try:
        stats = builder.build()
    except ProjectError as exc:
        text = _problems_text(exc)
        with state.lock:
            state.error = text
        log(f"{len(exc.problems)} problem(s); the last good site stays up:\n{text}")
        return False
    except Exception as exc:  # noqa: BLE001 - any failure must leave the watcher running
        # not an input problem (a full disk, or a bug): shown the same way, and the next
        # save builds again; the traceback goes to the terminal for a bug report
        import traceback

        text = f"the rebuild failed: {type(exc).__name__}: {exc}"
        with state.lock:
            state.error = text
        log(f"{text}; the last good site stays up\n{traceback.format_exc()}")
        return False
    with state.lock:
        state.error = ""
        state.generation += 1
    log(f"rebuilt in {1e3 * (time.perf_counter() - t0):.0f} ms: {stats.calcs_run} calcs run, "
        f"{stats.calcs_reused} reused, {stats.figures_drawn} figures drawn, "
        f"{stats.files_written} files written")
    return True


def watch_loop(builder: Builder, state: LiveState, stop: threading.Event) -> None:
    from watchfiles import watch

    root = builder.root.resolve()
    out = builder.out

    def relevant(_change: Any, path: str) -> bool:
        p = Path(path).resolve()
        # the site (if inside the project) and archived snapshots never trigger a rebuild
        return not (p.is_relative_to(out) or p.is_relative_to(root / "archive")
                    or p.name.startswith(".") or p.name.endswith(("~", ".swp")))

    for _changes in watch(root, watch_filter=relevant, stop_event=stop, debounce=150, step=50):
        rebuild(builder, state)


def serve(root: Path, out: Path, port: int = 8765) -> int:
    builder = Builder(root, out)
    state = LiveState()
    try:
        stats = builder.build()
    except ProjectError as exc:
        print(_problems_text(exc), file=sys.stderr)
        if not (builder.out / "index.html").is_file():
            builder.close()
            raise  # nothing good to show yet
        state.error = _problems_text(exc)
    else:
        print(f"built {stats.pages} pages into {builder.out}")
    handler = partial(type("BoundHandler", (Handler,), {"state": state}), directory=str(builder.out))
    try:
        httpd = ThreadingHTTPServer(("127.0.0.1", port), handler)
    except OSError as exc:
        builder.close()
        raise EnvironmentFailure(f"cannot listen on 127.0.0.1:{port}: {exc.strerror or exc} "
                                 "(choose another with --port; --port 0 picks a free one)") from None
    stop = threading.Event()
    watcher = threading.Thread(target=watch_loop, args=(builder, state, stop), daemon=True)
    watcher.start()
    print(f"serving http://127.0.0.1:{httpd.server_address[1]}/ ; watching {Path(root).resolve()} "
          "(Ctrl-C stops)", flush=True)
    try:
        httpd.serve_forever()
    except KeyboardInterrupt:
        pass
    finally:
        stop.set()
        httpd.server_close()
        watcher.join(timeout=5)
        builder.close()
    return 0
