"""memo.html rendered once in headless Chromium: every embedded figure decodes (naturalWidth > 0, equal to the PNG's
own width). A deliberately broken control image proves the check can fail. Skipped without /usr/bin/chromium."""

from __future__ import annotations

import re
import struct
import subprocess
from pathlib import Path

import pytest

from pathcast.cli import main

CHROMIUM = Path("/usr/bin/chromium")

PROBE = """
<img id="control" src="data:image/png;base64,AAAA" alt="control">
<script>
window.addEventListener("load", function () {
  var widths = [], broken = 0;
  var images = document.querySelectorAll("figure img");
  for (var i = 0; i < images.length; i++) {
    widths.push(images[i].naturalWidth);
    if (!images[i].complete || images[i].naturalWidth === 0) { broken++; }
  }
  var control = document.getElementById("control");
  document.body.setAttribute("data-images", String(images.length));
  document.body.setAttribute("data-broken", String(broken));
  document.body.setAttribute("data-widths", widths.join(","));
  document.body.setAttribute("data-control-width", String(control.naturalWidth));
});
</script>
"""


@pytest.mark.browser
@pytest.mark.skipif(not CHROMIUM.is_file(), reason="needs headless Chromium at /usr/bin/chromium")
def test_figures_load_in_chromium(tiny_folder, tmp_path):
    out = tmp_path / "memo"
    assert main(["memo", str(tiny_folder), "--out", str(out), "--quiet"]) == 0
    page = tmp_path / "probe.html"
    page.write_text((out / "memo.html").read_text().replace("</body>", PROBE + "</body>"))
    run = subprocess.run(
        [
            str(CHROMIUM),
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            f"--user-data-dir={tmp_path / 'profile'}",
            "--virtual-time-budget=10000",
            "--dump-dom",
            page.as_uri(),
        ],
        capture_output=True,
        text=True,
        timeout=180,
        check=False,
    )
    assert run.returncode == 0, run.stderr[-2000:]
    body = re.search(r"<body([^>]*)>", run.stdout)
    assert body, run.stdout[:500]
    attributes = dict(re.findall(r'data-([a-z-]+)="([^"]*)"', body.group(1)))
    pngs = sorted((out / "figures").glob("*.png"))
    assert int(attributes["images"]) == len(pngs) == 8
    assert attributes["broken"] == "0"
    assert attributes["control-width"] == "0"  # the probe does see a broken image
    widths = sorted(int(w) for w in attributes["widths"].split(","))
    assert widths == sorted(struct.unpack(">I", p.read_bytes()[16:20])[0] for p in pngs)
