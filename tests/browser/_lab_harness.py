"""A real JupyterLab on 127.0.0.1 for one browser round trip (and the latency benchmark).

What docs/widget-testing.md describes for these machines, in one place:

- the server runs as root (``ServerApp.allow_root=True``) in its own process group,
  stopped with SIGTERM and then SIGKILL of the group;
- it gets its own config, data, runtime, settings and workspace folders, so no
  trust database or setting of an earlier run changes the result;
- the notebook tracker starts the default kernel by itself, news and update checks
  are off and the extension manager is read-only (no outside calls);
- the app is exposed in the page (``window.jupyterapp``) so that the test can wait
  for a connected, idle kernel before running cells, and JupyterLab commands are
  started from ``page.evaluate`` but never awaited there.
"""
from __future__ import annotations

import json
import os
import secrets
import shutil
import signal
import socket
import subprocess
import sys
import time
import urllib.request
from pathlib import Path

LAB_SETTINGS = {
    "@jupyterlab/notebook-extension/tracker.jupyterlab-settings": {"autoStartDefaultKernel": True},
    "@jupyterlab/apputils-extension/notification.jupyterlab-settings": {"fetchNews": "false",
                                                                        "checkForUpdates": False},
}


def free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


class LabServer:
    """``with LabServer(root, work) as lab: lab.url("notebook.ipynb")``."""

    def __init__(self, root: Path, work: Path, *, startup_timeout: float = 120.0, app: str = "lab"):
        if app not in ("lab", "notebook"):
            raise ValueError(f"app must be 'lab' (JupyterLab) or 'notebook' (Notebook 7), got {app!r}")
        self.app = app
        self.root = Path(root)
        self.work = Path(work)
        self.port = free_port()
        self.token = secrets.token_hex(16)
        self.startup_timeout = startup_timeout
        self.process: subprocess.Popen | None = None
        self.log_path = self.work / "jupyterlab.log"

    # ------------------------------------------------------------------ process
    def _env(self) -> dict:
        env = dict(os.environ)
        dirs = {"JUPYTER_CONFIG_DIR": "config", "JUPYTER_DATA_DIR": "data",
                "JUPYTER_RUNTIME_DIR": "runtime", "JUPYTERLAB_SETTINGS_DIR": "settings",
                "JUPYTERLAB_WORKSPACES_DIR": "workspaces", "IPYTHONDIR": "ipython"}
        for var, name in dirs.items():
            path = self.work / name
            path.mkdir(parents=True, exist_ok=True)
            env[var] = str(path)
        for rel, values in LAB_SETTINGS.items():
            target = self.work / "settings" / rel
            target.parent.mkdir(parents=True, exist_ok=True)
            target.write_text(json.dumps(values), encoding="utf-8")
        env["PYTHONUNBUFFERED"] = "1"
        return env

    def start(self) -> "LabServer":
        self.work.mkdir(parents=True, exist_ok=True)
        common = [f"--ServerApp.ip=127.0.0.1", f"--ServerApp.port={self.port}",
                  "--ServerApp.port_retries=0", "--ServerApp.allow_root=True",
                  f"--IdentityProvider.token={self.token}", f"--ServerApp.root_dir={self.root}",
                  "--ServerApp.terminals_enabled=False"]
        if self.app == "lab":
            cmd = [sys.executable, "-m", "jupyterlab", "--no-browser", *common,
                   "--LabApp.expose_app_in_browser=True", "--LabApp.news_url=",
                   "--LabApp.check_for_updates_class=jupyterlab.NeverCheckForUpdate",
                   "--LabApp.extension_manager=readonly"]
        else:  # Notebook 7 (the notebook package), the same page helpers work on it
            cmd = [sys.executable, "-m", "notebook", "--no-browser", *common,
                   "--JupyterNotebookApp.expose_app_in_browser=True"]
        log = open(self.log_path, "wb")
        self.process = subprocess.Popen(cmd, env=self._env(), stdout=log, stderr=subprocess.STDOUT,
                                        cwd=str(self.root), start_new_session=True)
        deadline = time.monotonic() + self.startup_timeout
        while time.monotonic() < deadline:
            if self.process.poll() is not None:
                raise RuntimeError(f"jupyter lab exited early; log:\n{self.log_tail()}")
            try:
                with urllib.request.urlopen(f"{self.base}/api/status?token={self.token}", timeout=2) as r:
                    if r.status == 200:
                        return self
            except OSError:
                time.sleep(0.5)
        self.stop()
        raise RuntimeError(f"jupyter lab did not answer within {self.startup_timeout:.0f} s; log:\n{self.log_tail()}")

    def stop(self) -> None:
        if self.process is None or self.process.poll() is not None:
            return
        group = os.getpgid(self.process.pid)
        os.killpg(group, signal.SIGTERM)
        try:
            self.process.wait(timeout=15)
        except subprocess.TimeoutExpired:
            os.killpg(group, signal.SIGKILL)
            self.process.wait(timeout=10)
        # kernels started by the server are in its group too: make sure none is left
        try:
            os.killpg(group, signal.SIGKILL)
        except ProcessLookupError:
            pass

    def __enter__(self) -> "LabServer":
        return self.start()

    def __exit__(self, *exc) -> None:
        self.stop()

    def log_tail(self, chars: int = 3000) -> str:
        try:
            return self.log_path.read_text(errors="replace")[-chars:]
        except OSError:
            return ""

    # ------------------------------------------------------------------ urls
    @property
    def base(self) -> str:
        return f"http://127.0.0.1:{self.port}"

    def url(self, notebook: str) -> str:
        if self.app == "notebook":
            return f"{self.base}/notebooks/{notebook}?token={self.token}"
        return f"{self.base}/lab/tree/{notebook}?token={self.token}&reset"


def copy_notebook(source: Path, root: Path, name: str | None = None) -> str:
    """Copy a notebook into the server's root; returns its name there."""
    name = name or Path(source).name
    shutil.copyfile(source, Path(root) / name)
    return name


# ---------------------------------------------------------------------- page helpers
KERNEL_READY = """() => {
  const app = window.jupyterapp; if (!app) return false;
  const w = app.shell.currentWidget; const ctx = w && w.sessionContext;
  const k = ctx && ctx.session && ctx.session.kernel;
  return !!(k && k.connectionStatus === "connected" && k.status === "idle");
}"""

ALL_CELLS_RAN = """() => {
  const w = window.jupyterapp.shell.currentWidget; if (!w || !w.content) return false;
  const k = w.sessionContext.session && w.sessionContext.session.kernel;
  const cells = w.content.widgets.filter((c) => c.model.type === "code");
  return !!k && k.status === "idle" && cells.length > 0 && cells.every((c) => c.model.executionCount !== null);
}"""

RUN_ALL = """() => { window.jupyterapp.commands.execute("notebook:run-all-cells"); return true; }"""

KERNEL_EXEC = """async ([code, ms]) => {
  const k = window.jupyterapp.shell.currentWidget.sessionContext.session.kernel;
  let out = "";
  const future = k.requestExecute({ code, store_history: false });
  future.onIOPub = (msg) => {
    const t = msg.header.msg_type;
    if (t === "stream") out += msg.content.text;
    else if (t === "error") out += `${msg.content.ename}: ${msg.content.evalue}`;
  };
  const timeout = new Promise((_, reject) => setTimeout(() => reject(new Error("kernel timeout")), ms));
  await Promise.race([future.done, timeout]);
  return out;
}"""

KERNEL_PING = """async (ms) => {
  const k = window.jupyterapp.shell.currentWidget.sessionContext.session.kernel;
  const t0 = performance.now();
  const future = k.requestExecute({ code: "", silent: true, store_history: false });
  const timeout = new Promise((_, reject) => setTimeout(() => reject(new Error("kernel timeout")), ms));
  await Promise.race([future.done, timeout]);
  return performance.now() - t0;
}"""


def open_notebook_and_run_all(page, lab: LabServer, name: str, *, timeout_ms: int = 180_000) -> None:
    """Open ``name``, wait for an idle kernel, run every cell and wait until all ran."""
    page.goto(lab.url(name))
    page.wait_for_function(KERNEL_READY, timeout=timeout_ms, polling=250)
    page.evaluate(RUN_ALL)
    page.wait_for_function(ALL_CELLS_RAN, timeout=timeout_ms, polling=250)


def kernel_exec(page, code: str, *, timeout_ms: int = 60_000) -> str:
    """Run ``code`` in the notebook's kernel through JupyterLab; returns its printed text."""
    return page.evaluate(KERNEL_EXEC, [code, timeout_ms])


def kernel_ping_ms(page, *, timeout_ms: int = 30_000) -> float:
    """Milliseconds of one empty execute request through the page and the kernel."""
    return float(page.evaluate(KERNEL_PING, timeout_ms))
