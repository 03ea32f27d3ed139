"""Make the README's pictures: the TBP plot of the demo crude and the explorer at laptop size.

    python docs/make_images.py     (needs Debian's chromium for the explorer picture)
"""

from __future__ import annotations

import shutil
import subprocess
import sys
from pathlib import Path

HERE = Path(__file__).parent


def tbp_plot() -> None:
    from assaycut.cutting.cutset import default_cut_set
    from assaycut.io import load_assay
    from assaycut.io.tomlfiles import demo_assay_paths
    from assaycut.report import plots
    from assaycut.report.write import png_bytes
    from assaycut.yields import run_yields

    result = run_yields(load_assay(demo_assay_paths()[2]), default_cut_set())
    (HERE / "tbp_tarn_heavy.png").write_bytes(png_bytes(plots.plot_tbp, result))


def explorer_picture() -> None:
    from playwright.sync_api import sync_playwright

    chromium = shutil.which("chromium") or shutil.which("chromium-browser")
    proc = subprocess.Popen([sys.executable, "-m", "assaycut", "explore"], stdout=subprocess.PIPE,
                            stderr=subprocess.DEVNULL, text=True)
    try:
        url = proc.stdout.readline().strip()
        with sync_playwright() as p:
            browser = p.chromium.launch(executable_path=chromium, args=["--headless", "--no-sandbox"])
            page = browser.new_page(viewport={"width": 1100, "height": 800})
            page.goto(url)
            page.wait_for_selector("body[data-ready=yes]", timeout=20_000)
            page.wait_for_timeout(800)
            page.screenshot(path=str(HERE / "explorer.png"))
            browser.close()
    finally:
        proc.terminate()
        proc.wait()


if __name__ == "__main__":
    tbp_plot()
    explorer_picture()
