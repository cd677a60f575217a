"""A small headless-Chromium driver for tests and the screenshot script: the DevTools protocol over a pipe.

No third-party package: Chromium is started with ``--remote-debugging-pipe``
and reads JSON commands on file descriptor 3 and writes replies and events on
4, each message ending in a NUL byte. Only what the page tests need is here:
open a file, evaluate JavaScript, collect console messages and exceptions,
print to PDF on a chosen paper size, take a screenshot.
"""

from __future__ import annotations

import base64
import json
import os
import shutil
import subprocess
import tempfile
import time
from pathlib import Path

#: Flags for a quiet, offline, throw-away browser.
FLAGS = ("--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
         "--disable-background-networking", "--disable-component-update", "--disable-sync",
         "--disable-default-apps", "--disable-extensions", "--mute-audio", "--hide-scrollbars",
         "--remote-debugging-pipe")

#: Paper sizes in inches (width, height).
PAPER = {"A4": (8.27, 11.69), "Letter": (8.5, 11.0)}

CANDIDATES = ("chromium", "chromium-browser", "google-chrome", "google-chrome-stable")


def find_browser() -> str | None:
    """The path of a Chromium-family browser, or None."""
    env = os.environ.get("AERIAL_BROWSER")
    if env and Path(env).exists():
        return env
    for name in CANDIDATES:
        path = shutil.which(name)
        if path:
            return path
    return None


class BrowserError(RuntimeError):
    pass


class Browser:
    """One headless Chromium with one page; use as a context manager."""

    def __init__(self, executable: str | None = None, timeout: float = 30.0, width: int = 1200, height: int = 900):
        self.executable = executable or find_browser()
        if not self.executable:
            raise BrowserError("no Chromium-family browser found")
        self.timeout = timeout
        self.size = (width, height)
        self.events: list[dict] = []
        self._id = 0
        self._buf = b""

    # ----------------------------------------------------------------- process and pipe

    def __enter__(self):
        self._profile = tempfile.mkdtemp(prefix="aerial-chromium-")
        to_child_r, self._to_child = os.pipe()
        self._from_child, from_child_w = os.pipe()

        def wire_fds():  # in the child: the protocol's fds 3 (commands in) and 4 (replies out)
            a, b = os.dup(to_child_r), os.dup(from_child_w)  # first out of the way of 3 and 4
            os.dup2(a, 3)
            os.dup2(b, 4)

        args = [self.executable, *FLAGS, f"--user-data-dir={self._profile}",
                f"--window-size={self.size[0]},{self.size[1]}", "about:blank"]
        self._proc = subprocess.Popen(args, stdin=subprocess.DEVNULL, stdout=subprocess.DEVNULL,
                                      stderr=subprocess.DEVNULL, preexec_fn=wire_fds, close_fds=False)
        os.close(to_child_r)
        os.close(from_child_w)
        targets = self.send("Target.getTargets")["targetInfos"]
        page = next(t for t in targets if t["type"] == "page")
        self._session = self.send("Target.attachToTarget", targetId=page["targetId"], flatten=True)["sessionId"]
        for domain in ("Page", "Runtime", "Log"):
            self.send(f"{domain}.enable", session=True)
        self.send("Emulation.setDeviceMetricsOverride", session=True, width=self.size[0], height=self.size[1],
                  deviceScaleFactor=1, mobile=False)
        return self

    def __exit__(self, *exc):
        try:
            self.send("Browser.close")
        except Exception:
            pass
        try:
            self._proc.wait(timeout=5)
        except subprocess.TimeoutExpired:
            self._proc.kill()
            self._proc.wait()
        for fd in (self._to_child, self._from_child):
            try:
                os.close(fd)
            except OSError:
                pass
        shutil.rmtree(self._profile, ignore_errors=True)

    def _read_message(self, deadline: float) -> dict:
        import select

        while b"\0" not in self._buf:
            left = deadline - time.monotonic()
            if left <= 0:
                raise BrowserError("the browser did not answer in time")
            ready, _, _ = select.select([self._from_child], [], [], left)
            if ready:
                chunk = os.read(self._from_child, 1 << 16)
                if not chunk:
                    raise BrowserError("the browser closed its pipe")
                self._buf += chunk
        raw, self._buf = self._buf.split(b"\0", 1)
        return json.loads(raw)

    def send(self, method: str, session: bool = False, **params) -> dict:
        """Send one command and wait for its reply (events that arrive meanwhile are kept in ``events``)."""
        self._id += 1
        msg = {"id": self._id, "method": method, "params": params}
        if session:
            msg["sessionId"] = self._session
        os.write(self._to_child, json.dumps(msg).encode() + b"\0")
        deadline = time.monotonic() + self.timeout
        while True:
            reply = self._read_message(deadline)
            if reply.get("id") == self._id:
                if "error" in reply:
                    raise BrowserError(f"{method}: {reply['error']}")
                return reply.get("result", {})
            self.events.append(reply)

    def wait_for(self, event: str, after: int = 0) -> dict:
        """Wait until an event named ``event`` has arrived (at or after index ``after`` of ``events``)."""
        deadline = time.monotonic() + self.timeout
        while True:
            for e in self.events[after:]:
                if e.get("method") == event:
                    return e
            self.events.append(self._read_message(deadline))

    # ----------------------------------------------------------------- page actions

    def open(self, path) -> None:
        """Load a local file and wait for its load event."""
        mark = len(self.events)
        self.send("Page.navigate", session=True, url=Path(path).resolve().as_uri())
        self.wait_for("Page.loadEventFired", mark)

    def evaluate(self, expression: str):
        """The value of a JavaScript expression in the page (JSON-serialisable values only)."""
        reply = self.send("Runtime.evaluate", session=True, expression=expression, returnByValue=True,
                          awaitPromise=True)
        if "exceptionDetails" in reply:
            raise BrowserError(f"script failed: {reply['exceptionDetails'].get('text')}")
        return reply["result"].get("value")

    def problems(self) -> list[str]:
        """Console errors and warnings, uncaught exceptions and browser log errors seen so far."""
        out = []
        for e in self.events:
            m, p = e.get("method"), e.get("params", {})
            if m == "Runtime.consoleAPICalled" and p.get("type") in ("error", "warning", "assert"):
                out.append(f"console {p['type']}: " + " ".join(str(a.get("value", a.get("description", "")))
                                                                for a in p.get("args", [])))
            elif m == "Runtime.exceptionThrown":
                out.append("exception: " + p.get("exceptionDetails", {}).get("text", ""))
            elif m == "Log.entryAdded" and p.get("entry", {}).get("level") in ("error", "warning"):
                out.append(f"log {p['entry']['level']}: {p['entry'].get('text', '')}")
        return out

    def pdf(self, paper: str = "A4") -> bytes:
        """The page printed (print style sheet) on ``paper`` ("A4" or "Letter") with the page's own margins."""
        w, h = PAPER[paper]
        reply = self.send("Page.printToPDF", session=True, paperWidth=w, paperHeight=h, printBackground=True,
                          preferCSSPageSize=False, marginTop=0, marginBottom=0, marginLeft=0, marginRight=0)
        return base64.b64decode(reply["data"])

    def screenshot(self) -> bytes:
        """PNG of the first screen (the window's size)."""
        return base64.b64decode(self.send("Page.captureScreenshot", session=True, format="png")["data"])


def pdf_page_count(data: bytes) -> int:
    """Pages in a PDF as Chromium writes it (each page object is ``/Type /Page``)."""
    import re

    return len(re.findall(rb"/Type\s*/Page(?![s\w])", data))
