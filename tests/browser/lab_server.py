"""A throwaway JupyterLab server for the browser test: its own port, token, settings and
working copy of the notebooks, shut down (kernels included) when the block ends."""

from __future__ import annotations

import contextlib
import json
import os
import re
import secrets
import shutil
import socket
import subprocess
import sys
import time
import urllib.error
import urllib.request
from pathlib import Path

REPO = Path(__file__).resolve().parents[2]

#: Settings that keep a first open quiet: no news or update prompts.
SETTINGS = {
    "@jupyterlab/apputils-extension:notification": {"fetchNews": "false", "checkForUpdates": False},
    "@jupyterlab/notebook-extension:tracker": {"windowingMode": "none", "autoStartDefaultKernel": True},
}


def free_port() -> int:
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


@contextlib.contextmanager
def lab_server(notebooks: Path, workdir: Path, *, start_timeout: float = 60.0):
    """Serve a copy of ``notebooks`` from ``workdir``; yields (base_url, token, root)."""
    root = workdir / "notebooks"
    shutil.copytree(notebooks, root)
    settings_dir = workdir / "lab-settings"
    for key, values in SETTINGS.items():
        plugin, name = key.split(":")
        target = settings_dir / plugin / f"{name}.jupyterlab-settings"
        target.parent.mkdir(parents=True, exist_ok=True)
        target.write_text(json.dumps(values))
    env = dict(os.environ,
               JUPYTERLAB_SETTINGS_DIR=str(settings_dir),
               JUPYTERLAB_WORKSPACES_DIR=str(workdir / "lab-workspaces"),
               JUPYTER_CONFIG_DIR=str(workdir / "jupyter-config"),
               JUPYTER_RUNTIME_DIR=str(workdir / "jupyter-runtime"),
               IPYTHONDIR=str(workdir / "ipython"),
               MPLBACKEND="module://matplotlib_inline.backend_inline",
               # the kernels import this checkout's package, whatever the environment's install points to
               PYTHONPATH=os.pathsep.join([str(REPO)] + [p for p in [os.environ.get("PYTHONPATH")] if p]))
    port, token = free_port(), secrets.token_hex(16)
    log = open(workdir / "jupyterlab.log", "wb")
    proc = subprocess.Popen(
        [sys.executable, "-m", "jupyterlab", "--no-browser", "--ServerApp.ip=127.0.0.1",
         f"--ServerApp.port={port}", "--ServerApp.port_retries=0",
         f"--IdentityProvider.token={token}", f"--ServerApp.root_dir={root}",
         "--ServerApp.open_browser=False", "--LabApp.extension_manager=readonly",
         *(["--allow-root"] if hasattr(os, "geteuid") and os.geteuid() == 0 else [])],
        cwd=root, env=env, stdout=log, stderr=subprocess.STDOUT)
    base = f"http://127.0.0.1:{port}"
    try:
        _wait_ready(proc, f"{base}/api/status?token={token}", start_timeout, workdir / "jupyterlab.log")
        yield base, token, root
    finally:
        _shutdown(proc, base, token)
        log.close()


def _wait_ready(proc, url, timeout, log_path):
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        if proc.poll() is not None:
            raise RuntimeError(f"JupyterLab exited with {proc.returncode}:\n{log_path.read_text()[-3000:]}")
        try:
            with urllib.request.urlopen(url, timeout=2) as response:
                if response.status == 200:
                    return
        except (urllib.error.URLError, ConnectionError, TimeoutError):
            pass
        time.sleep(0.25)   # polling the server's status endpoint, bounded by the deadline
    raise TimeoutError(f"JupyterLab did not answer within {timeout:.0f} s:\n{log_path.read_text()[-3000:]}")


def _shutdown(proc, base, token):
    """Ask the server to stop (it shuts its kernels down), then make sure it has."""
    if proc.poll() is None:
        request = urllib.request.Request(f"{base}/api/shutdown", method="POST",
                                         headers={"Authorization": f"token {token}"})
        with contextlib.suppress(Exception):
            urllib.request.urlopen(request, timeout=5).close()
    try:
        proc.wait(timeout=20)
    except subprocess.TimeoutExpired:
        proc.terminate()
        try:
            proc.wait(timeout=10)
        except subprocess.TimeoutExpired:
            proc.kill()
            proc.wait(timeout=10)


def run_all_cells(page, *, attempts: int = 3, started_ms: int = 30_000) -> None:
    """Run > Run All Cells, as a person would, and make sure it took.

    Right after a notebook opens, JupyterLab may not yet count it as the current widget; the
    menu item is then disabled and a click on it does nothing (seen once in CI: every prompt
    stayed "[ ]:" until the wait for the last output ran out). So wait for the item to be
    enabled, click it, and check that some cell's prompt shows it queued or run; else retry."""
    from playwright.sync_api import Error as PlaywrightError

    notebook = page.locator(".jp-NotebookPanel:not(.lm-mod-hidden) .jp-Notebook")
    started = notebook.locator(".jp-InputPrompt", has_text=re.compile(r"\[(\*|\d+)\]"))
    for attempt in range(1, attempts + 1):
        notebook.locator(".jp-Cell .jp-InputPrompt").first.click()   # focus the notebook: it becomes current
        page.locator(".lm-MenuBar-item", has_text=re.compile(r"^Run$")).click()
        item = page.locator(".lm-Menu-item[data-command='runmenu:run-all']:not(.lm-mod-disabled)")
        item.wait_for(state="visible")
        item.click()
        try:
            started.first.wait_for(state="attached", timeout=started_ms)
            return
        except PlaywrightError:
            page.keyboard.press("Escape")                 # close the menu should it still be open
            if attempt == attempts:
                raise AssertionError(f"Run All Cells did not start the notebook in {attempts} tries")


def open_notebook(page, base: str, token: str, name: str, *, timeout_ms: int) -> None:
    """Open notebook ``name`` of the served folder in ``page``, wait for its kernel to be idle,
    fold the file list and run all cells (:func:`run_all_cells`); a "Select Kernel" dialog,
    should one appear, is answered with the notebook's own kernel."""
    from playwright.sync_api import expect

    page.set_default_timeout(timeout_ms)
    expect.set_options(timeout=timeout_ms)
    page.add_locator_handler(
        page.get_by_role("dialog").filter(has_text="Select Kernel"),
        lambda dialog: dialog.get_by_role("button", name="Select Kernel").click())
    page.goto(f"{base}/lab/tree/{name}?token={token}")
    expect(page.locator(".jp-StatusBar-Widget", has_text="Python 3 (ipykernel) | Idle")).to_be_visible()
    file_list = page.locator(".jp-SideBar.jp-mod-left .lm-TabBar-tab.lm-mod-current")
    if file_list.count():
        file_list.click()
    run_all_cells(page)
