"""Which charting library draws the page's picture: weight, time to draw 100,000 boxes, licence.

Each candidate is fetched from the npm registry (``npm pack``), loaded from a local file into headless
Chromium (Debian's, through Selenium), and asked to draw 100,000 panel boxes the way the page needs them: a
filled rectangle from f's low to f's high over each panel. The time is from the call that builds the chart to
the end of its first frame, best of three. Prints a table.

    python -m benchmarks.plot_libraries

Needs npm (the registry), /usr/bin/chromium and /usr/bin/chromedriver.
"""

from __future__ import annotations

import json
import subprocess
import tarfile
import tempfile
from pathlib import Path

BOXES = 100_000

CANDIDATES = {
    # name: (npm package@version, file in the package, script that draws BOXES boxes into #chart)
    "uPlot": (
        "uplot@1.6.32",
        "package/dist/uPlot.iife.min.js",
        """
        const xs = DATA.map(b => (b[0] + b[1]) / 2);
        new uPlot({width: 1000, height: 320, scales: {x: {time: false}, y: {range: () => [-1.2, 1.2]}},
          legend: {show: false}, series: [{}, {show: false}],
          hooks: {draw: [u => { const c = u.ctx; c.fillStyle = 'rgba(63,124,172,0.55)';
            for (const b of DATA) { const x0 = u.valToPos(b[0], 'x', true), x1 = u.valToPos(b[1], 'x', true);
              const y0 = u.valToPos(b[3], 'y', true), y1 = u.valToPos(b[2], 'y', true);
              c.fillRect(x0, y0, Math.max(x1 - x0, 1), Math.max(y1 - y0, 1)); } }]}},
          [xs, xs.map(() => null)], document.getElementById('chart'));
        """,
    ),
    "Chart.js": (
        "chart.js@4.6.1",
        "package/dist/chart.umd.min.js",
        """
        const canvas = document.createElement('canvas'); canvas.width = 1000; canvas.height = 320;
        document.getElementById('chart').append(canvas);
        new Chart(canvas, {type: 'bar', options: {animation: false, responsive: false, parsing: false,
            plugins: {legend: {display: false}}, scales: {x: {type: 'linear'}, y: {min: -1.2, max: 1.2}}},
          data: {datasets: [{data: DATA.map(b => ({x: (b[0] + b[1]) / 2, y: [b[2], b[3]]})),
            barPercentage: 1, categoryPercentage: 1, backgroundColor: 'rgba(63,124,172,0.55)'}]}});
        """,
    ),
}


def _fetch(spec: str, member: str, folder: Path) -> tuple[Path, str, int]:
    packed = subprocess.run(["npm", "pack", spec, "--silent"], cwd=folder, capture_output=True, text=True, check=True)
    archive = folder / packed.stdout.strip().splitlines()[-1]
    with tarfile.open(archive) as tar:
        tar.extract(member, folder, filter="data")
        manifest = json.load(tar.extractfile("package/package.json"))  # type: ignore[arg-type]
    path = folder / member
    return path, manifest.get("license", "?"), path.stat().st_size


def _boxes() -> list[list[float]]:
    import math

    out = []
    for i in range(BOXES):
        a, b = i / BOXES * 50, (i + 1) / BOXES * 50
        fa, fb = math.sin(400 * a) * math.exp(-a / 10), math.sin(400 * b) * math.exp(-b / 10)
        out.append([a, b, min(fa, fb) - 1e-3, max(fa, fb) + 1e-3])
    return out


def _driver():  # type: ignore[no-untyped-def]
    from selenium import webdriver
    from selenium.webdriver.chrome.service import Service

    options = webdriver.ChromeOptions()
    options.binary_location = "/usr/bin/chromium"
    for flag in (
        "--headless=new",
        "--no-sandbox",
        "--disable-gpu",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
        "--no-first-run",
    ):
        options.add_argument(flag)
    return webdriver.Chrome(service=Service("/usr/bin/chromedriver"), options=options)


def main() -> None:
    data = json.dumps(_boxes())
    rows = []
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        driver = _driver()
        try:
            for name, (spec, member, draw) in CANDIDATES.items():
                script, licence, size = _fetch(spec, member, folder)
                page = folder / f"{name}.html"
                page.write_text(
                    f"<!doctype html><meta charset=utf-8><div id=chart></div><script src='{script.as_uri()}'></script>"
                    f"<script>const DATA = {data};</script>",
                    encoding="utf-8",
                )
                times = []
                for _ in range(3):
                    driver.get(page.as_uri())
                    times.append(
                        driver.execute_async_script(
                            "const done = arguments[0]; document.getElementById('chart').textContent = '';"
                            "const t0 = performance.now();"
                            + draw
                            + "requestAnimationFrame(() => done(performance.now() - t0));"
                        )
                    )
                rows.append((name, spec, licence, size, min(times)))
        finally:
            driver.quit()
    print(f"| library | package | licence | minified script, bytes | draw {BOXES:,} boxes, ms (best of 3) |")
    print("| --- | --- | --- | ---: | ---: |")
    for name, spec, licence, size, ms in rows:
        print(f"| {name} | {spec} | {licence} | {size:,} | {ms:,.0f} |")


if __name__ == "__main__":
    main()
