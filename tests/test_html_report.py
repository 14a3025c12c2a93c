"""The one-file HTML review report: self-contained, every check in it, and loaded by a
real headless browser (Chromium, Debian package) without a console error."""

from __future__ import annotations

import hashlib
import html
import os
import re
import shutil
import subprocess
import sys
from html.parser import HTMLParser
from pathlib import Path

import matplotlib.image
import pytest

import plumbrod
from designs import EXAMPLE, ROOT
from plumbrod.design.loading import load_design
from plumbrod.outputs.cautions import CAUTION
from plumbrod.outputs.plots import FIGURES
from plumbrod.verdict.findings import review

FAILING = ROOT / "examples" / "failing_short_lever.toml"
SCREENSHOT = (
    Path(os.environ.get("PLUMBROD_SCREENSHOT_DIR", ""))
    if os.environ.get("PLUMBROD_SCREENSHOT_DIR")
    else None
)


class _Refs(HTMLParser):
    """Every tag and every src/href attribute of a page."""

    def __init__(self) -> None:
        super().__init__()
        self.tags: list[str] = []
        self.refs: list[str] = []

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        self.tags.append(tag)
        for key, value in attrs:
            if key in ("src", "href", "xlink:href") and value is not None:
                self.refs.append(value)


def _report(path: Path, out: Path) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "plumbrod", "report", str(path), "-o", str(out)],
        capture_output=True,
        text=True,
        check=False,
        timeout=600,
    )


@pytest.fixture(scope="module")
def reports(tmp_path_factory: pytest.TempPathFactory) -> dict[str, tuple[Path, object]]:
    folder = tmp_path_factory.mktemp("reports")
    out = {}
    for name, path in (("splitter", EXAMPLE), ("failing", FAILING)):
        target = folder / f"{name}.html"
        out[name] = (target, _report(path, target))
    return out


def test_report_exit_codes_and_verdict_line(reports):
    _, ok = reports["splitter"]
    assert ok.returncode == 0, ok.stderr
    last = ok.stdout.strip().splitlines()[-1]
    assert last.startswith("verdict: ") and "verdict: FAIL" not in last
    _, bad = reports["failing"]
    assert bad.returncode == 1, bad.stderr  # the example fails on purpose (its header)
    assert bad.stdout.strip().splitlines()[-1].startswith("verdict: FAIL")


@pytest.mark.parametrize("name", ["splitter", "failing"])
def test_report_is_self_contained_and_holds_every_check(reports, name):
    target, _ = reports[name]
    text = target.read_text(encoding="utf-8")
    design = EXAMPLE if name == "splitter" else FAILING
    findings = review(load_design(design))
    for check in findings.checks:
        assert f'id="check-{check.id}"' in text, check.id
        assert check.status.upper() in text
    parser = _Refs()
    parser.feed(text)
    # nothing fetched from outside the file, no script
    assert "script" not in parser.tags and "link" not in parser.tags
    for ref in parser.refs:
        assert ref.startswith(("data:", "#")), ref
    assert text.count("<svg") == len(FIGURES)
    assert 'src="data:image/png;base64,' in text  # the sheet preview
    # source: FIPS 180-4 (SHA-256) via Python's hashlib on the design file's bytes
    assert hashlib.sha256(design.read_bytes()).hexdigest() in text
    assert f"plumbrod {plumbrod.__version__}" in text
    assert re.search(r"\b\d{4}-\d{2}-\d{2}\b", text)
    assert html.escape(CAUTION) in text
    # print-friendly: each section on a new page when printed
    assert "@media print" in text and "page-break-before: always" in text


# a probe put in a copy of the page: reports errors and broken images to the console
_PROBE = """<script>
window.addEventListener('error', function (e) {
  console.log('PROBE-ERROR ' + (e.message || (e.target && e.target.tagName)));
}, true);
console.error = function () { console.log('PROBE-ERROR ' + Array.from(arguments).join(' ')); };
window.addEventListener('load', function () {
  var broken = Array.from(document.images).filter(function (i) {
    return !(i.complete && i.naturalWidth > 0); }).length;
  console.log('PROBE-LOADED images=' + document.images.length + ' broken=' + broken +
              ' svgs=' + document.querySelectorAll('figure svg').length +
              ' checks=' + document.querySelectorAll('tr[id^=check-]').length);
});
</script>"""


def _chromium() -> str | None:
    return shutil.which("chromium") or shutil.which("chromium-browser")


@pytest.mark.skipif(_chromium() is None, reason="Chromium is not installed")
def test_chromium_loads_the_report_without_console_errors(reports, tmp_path):
    target, _ = reports["splitter"]
    page = tmp_path / "probed.html"
    page.write_text(
        target.read_text(encoding="utf-8").replace("<head>", "<head>" + _PROBE, 1),
        encoding="utf-8",
    )
    shot = (SCREENSHOT or tmp_path) / "report-screenshot.png"
    shot.parent.mkdir(parents=True, exist_ok=True)
    done = subprocess.run(
        [
            str(_chromium()),
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--hide-scrollbars",
            "--enable-logging=stderr",
            "--v=0",
            "--window-size=1100,2400",
            f"--screenshot={shot}",
            page.as_uri(),
        ],
        capture_output=True,
        text=True,
        timeout=300,
        check=False,
        cwd=tmp_path,
    )
    console = [line for line in done.stderr.splitlines() if ":CONSOLE" in line]
    assert done.returncode == 0, done.stderr[-2000:]
    loaded = [line for line in console if "PROBE-LOADED" in line]
    assert len(loaded) == 1, console
    findings = review(load_design(EXAMPLE))
    assert f"images=1 broken=0 svgs={len(FIGURES)} checks={len(findings.checks)}" in loaded[0]
    assert [line for line in console if "PROBE-LOADED" not in line] == []  # nothing else
    image = matplotlib.image.imread(shot)  # the screenshot, written by this run
    assert image.shape[0] > 1000 and image.shape[1] > 1000
    assert 0.005 < (image[..., :3].mean(axis=-1) < 0.5).mean() < 0.5
