"""A real headless Chromium for the report checks, driven through the DevTools protocol.

``chromium()`` finds Debian's ``chromium`` (installing it with apt-get where
it is missing and the machine allows it) or says why it cannot be had.
``Page`` opens a file, collects every console message, uncaught exception
and failed load, evaluates expressions and takes screenshots.

Used by ``tests/test_report.py`` and by ``make report-check``
(``tests/report_check.py``).
"""

from __future__ import annotations

import base64
import json
import os
import re
import shutil
import subprocess
import tempfile
import time
import urllib.request
from pathlib import Path

#: Launch flags that work on this project's machines (headless, as root, no network features).
FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
         "--disable-background-networking", "--disable-component-update", "--disable-sync",
         "--hide-scrollbars", "--remote-debugging-port=0", "--remote-allow-origins=*"]


def _install() -> str | None:
    """Install Debian's chromium with apt-get; None when done, else why not."""
    if shutil.which("apt-get") is None:
        return "no apt-get on this machine to install chromium with"
    if os.geteuid() != 0:
        return "not root: cannot install chromium with apt-get"
    env = {**os.environ, "DEBIAN_FRONTEND": "noninteractive"}
    for step in (["apt-get", "update", "-qq"], ["apt-get", "install", "-y", "-qq", "chromium"]):
        done = subprocess.run(step, env=env, capture_output=True, text=True, timeout=900)
        if done.returncode != 0:
            return f"'{' '.join(step)}' failed: {(done.stderr or done.stdout).strip().splitlines()[-1:]}"
    return None


def chromium() -> tuple[str | None, str]:
    """(path of the chromium binary, "") or (None, why it cannot be had)."""
    found = shutil.which("chromium")
    if found:
        return found, ""
    why = _install()
    found = shutil.which("chromium")
    return (found, "") if found else (None, why or "chromium not found after installing it")


class Page:
    """One Chromium with one page; ``close()`` ends the browser this object started."""

    def __init__(self, binary: str, width: int = 1280, height: int = 900):
        import websocket

        self.profile = tempfile.mkdtemp(prefix="towercost-chromium-")
        self.process = subprocess.Popen([binary, *FLAGS, f"--user-data-dir={self.profile}",
                                         f"--window-size={width},{height}", "about:blank"],
                                        stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
        port = self._port()
        deadline = time.time() + 30
        while True:
            try:
                pages = json.loads(urllib.request.urlopen(f"http://127.0.0.1:{port}/json/list", timeout=5).read())
                target = next(p for p in pages if p.get("type") == "page")
                break
            except (OSError, StopIteration):
                if time.time() > deadline:
                    raise RuntimeError("chromium opened no page") from None
                time.sleep(0.2)
        self.socket = websocket.create_connection(target["webSocketDebuggerUrl"], timeout=60,
                                                  suppress_origin=True)
        self.next_id = 0
        self.events: list[dict] = []
        for domain in ("Page", "Runtime", "Log", "Network"):
            self.call(f"{domain}.enable")
        self.call("Emulation.setDeviceMetricsOverride", width=width, height=height, deviceScaleFactor=1,
                  mobile=False)

    def _port(self) -> int:
        deadline = time.time() + 60
        while time.time() < deadline:
            line = self.process.stderr.readline()
            match = re.search(r"DevTools listening on ws://[^:]+:(\d+)/", line)
            if match:
                return int(match.group(1))
            if not line and self.process.poll() is not None:
                break
        raise RuntimeError("chromium did not start its DevTools endpoint")

    def call(self, method: str, **params) -> dict:
        self.next_id += 1
        ident = self.next_id
        self.socket.send(json.dumps({"id": ident, "method": method, "params": params}))
        while True:
            message = json.loads(self.socket.recv())
            if message.get("id") == ident:
                if "error" in message:
                    raise RuntimeError(f"{method}: {message['error']}")
                return message.get("result", {})
            self.events.append(message)

    def open(self, path: Path) -> None:
        """Load a local file and wait for its load event."""
        self.call("Page.navigate", url=Path(path).resolve().as_uri())
        deadline = time.time() + 60
        while not any(e.get("method") == "Page.loadEventFired" for e in self.events):
            if time.time() > deadline:
                raise RuntimeError(f"{path} did not finish loading")
            self.events.append(json.loads(self.socket.recv()))

    def evaluate(self, expression: str):
        result = self.call("Runtime.evaluate", expression=expression, returnByValue=True, awaitPromise=True)
        if "exceptionDetails" in result:
            raise RuntimeError(f"{expression}: {result['exceptionDetails']}")
        return result["result"].get("value")

    def problems(self) -> list[str]:
        """Console errors and warnings, uncaught exceptions, failed loads and any request off this machine."""
        found = []
        for e in self.events:
            method, params = e.get("method"), e.get("params", {})
            if method == "Runtime.consoleAPICalled" and params.get("type") in ("error", "warning", "assert"):
                found.append(f"console {params['type']}: {params.get('args')}")
            elif method == "Runtime.exceptionThrown":
                found.append(f"exception: {params.get('exceptionDetails')}")
            elif method == "Log.entryAdded" and params.get("entry", {}).get("level") in ("error", "warning"):
                found.append(f"log: {params['entry'].get('text')} {params['entry'].get('url', '')}")
            elif method == "Network.loadingFailed":
                found.append(f"failed load: {params.get('errorText')}")
            elif method == "Network.requestWillBeSent":
                url = params.get("request", {}).get("url", "")
                if not url.startswith(("file:", "data:", "about:")):
                    found.append(f"network request: {url}")
        return found

    def screenshot(self, path: Path) -> Path:
        data = self.call("Page.captureScreenshot", format="png")["data"]
        Path(path).write_bytes(base64.b64decode(data))
        return Path(path)

    def close(self) -> None:
        try:
            self.socket.close()
        finally:
            self.process.terminate()
            try:
                self.process.wait(timeout=10)
            except subprocess.TimeoutExpired:
                self.process.kill()
            shutil.rmtree(self.profile, ignore_errors=True)


#: What the report must show, checked in the page: every plot decoded and drawn, and no script in it.
CHECKS = """(() => {
  const plots = [...document.querySelectorAll('img.plot')];
  return {
    plots: plots.map(p => ({id: p.id, complete: p.complete, width: p.naturalWidth, height: p.naturalHeight,
                            shown: p.getBoundingClientRect().width})),
    scripts: document.querySelectorAll('script').length,
    title: document.getElementById('report-title').textContent,
    injected: document.querySelectorAll('#report-title *').length,
    bold: document.querySelectorAll('b.injected').length,
    marker: window.__towercost_injected === true,
    sections: [...document.querySelectorAll('h2')].map(h => h.id),
  };
})()"""
