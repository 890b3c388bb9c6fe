"""The interactive map page: self-contained, and working in a real (headless Chromium) browser.

The browser is driven over the DevTools protocol on a pipe (no network, no
extra package): the page is loaded from a file, the mouse is moved over
known points, the slider is stepped, and a screenshot is compared with the
map by structure (each domain's tint shows as its own region).
"""

import json
import os
import re
import subprocess
import time

import numpy as np
import pytest
from browser import browser_or_skip

import pourbaix
from pourbaix.cli.commands import main
from pourbaix.errors import OptionError
from pourbaix.plot.interactive import interactive_page, write_interactive

# Nernst factor at 25 °C, R T ln10 / F (CODATA 2018 constants; exact to the digits shown)
K25 = 0.0591597


def _fe():
    return pourbaix.compute_map("Fe", activity=1e-6)


# ---------------------------------------------------------------------- the file itself
def test_page_is_self_contained_and_carries_every_domain(tmp_path):
    m = _fe()
    page = interactive_page(m)
    body = page.split("<body", 1)[1]
    # no network: nothing fetched from elsewhere (the SVG namespace is an identifier, not a fetch)
    assert not re.search(r"""(src|href)\s*=\s*["']?(https?:)?//""", page)
    assert "@import" not in page and "url(http" not in page
    assert "fetch(" not in body and "XMLHttpRequest" not in body
    data = json.loads(re.search(r'<script id="map-data"[^>]*>(.*?)</script>', page, re.S).group(1))
    frame = data["frames"][0]
    assert [d["label"] for d in frame["domains"]] == [d.label for d in m.domains]
    # formulas typeset as the figures do (Fe₂O₃, Fe²⁺), reactions too
    assert "Fe₂O₃" in {d["label"] for d in frame["domains"]}
    assert any("Fe²⁺ + 2 e⁻ = Fe" == b["reaction"] for b in frame["boundaries"])
    assert "thermodynamic prediction" in page


def test_page_refuses_bad_input(tmp_path):
    with pytest.raises(OptionError, match="at least one map"):
        interactive_page([])
    with pytest.raises(OptionError, match="valid: temperature, activity"):
        interactive_page(_fe(), parameter="pressure")
    fe_sce = pourbaix.compute_map("Fe", reference="SCE")
    with pytest.raises(OptionError, match="one reference electrode"):
        interactive_page([_fe(), fe_sce], parameter="activity")
    with pytest.raises(OptionError, match="finite"):
        interactive_page(_fe(), readings=[{"ph": float("nan"), "potential_v": 0.0}])
    out = tmp_path / "page.html"
    with pytest.raises(OptionError):
        write_interactive(out, [])
    assert not out.exists()


def test_cli_writes_the_page_with_a_slider(tmp_path, capsys):
    out = tmp_path / "fe.html"
    code = main(["map", "Fe", "--out", str(out), "--slider-temperature", "25", "150"])
    assert code == 0, capsys.readouterr().err
    page = out.read_text(encoding="utf-8")
    data = json.loads(re.search(r'<script id="map-data"[^>]*>(.*?)</script>', page, re.S).group(1))
    assert [f["label"] for f in data["frames"]] == ["25 °C", "150 °C"]
    assert data["parameter"] == "temperature"
    code = main(
        ["map", "Fe", "--out", str(tmp_path / "x.html"), "--slider-temperature", "25",
         "--slider-activity", "1e-6"]
    )  # fmt: skip
    assert code == 2
    assert "not both" in capsys.readouterr().err
    assert not (tmp_path / "x.html").exists()


# ---------------------------------------------------------------------- a real browser
class _Browser:
    """Headless Chromium driven over the DevTools protocol on a pipe (fd 3 in, fd 4 out)."""

    def __init__(self, exe, profile):
        to_browser_r, self._to_browser = os.pipe()
        self._from_browser, from_browser_w = os.pipe()

        def child_fds():
            # via fresh numbers first, so that neither end is overwritten when it already is 3 or 4
            a, b = os.dup(to_browser_r), os.dup(from_browser_w)
            os.dup2(a, 3)  # dup2 leaves the copies inheritable: the browser gets 3 and 4
            os.dup2(b, 4)

        self.proc = subprocess.Popen(
            [
                exe,
                "--headless",
                "--no-sandbox",
                "--disable-gpu",
                "--disable-quic",
                "--no-first-run",
                "--disable-background-networking",
                "--disable-component-update",
                "--disable-sync",
                "--hide-scrollbars",
                "--force-device-scale-factor=1",
                f"--user-data-dir={profile}",
                "--remote-debugging-pipe",
                "about:blank",
            ],
            preexec_fn=child_fds,  # noqa: PLW1509 - fds 3 and 4 must be set in the child
            close_fds=False,
            stdout=subprocess.DEVNULL,
            stderr=subprocess.DEVNULL,
        )
        os.close(to_browser_r)
        os.close(from_browser_w)
        self._buffer = b""
        self._id = 0
        self.session = None

    def send(self, method, params=None, session=True, timeout=60):
        self._id += 1
        msg = {"id": self._id, "method": method, "params": params or {}}
        if session and self.session:
            msg["sessionId"] = self.session
        os.write(self._to_browser, json.dumps(msg).encode() + b"\0")
        return self._wait(lambda m: m.get("id") == self._id, timeout)

    def _wait(self, match, timeout):
        deadline = time.monotonic() + timeout
        while True:
            while b"\0" in self._buffer:
                raw, self._buffer = self._buffer.split(b"\0", 1)
                m = json.loads(raw)
                if match(m):
                    if "error" in m:
                        raise RuntimeError(m["error"])
                    return m.get("result", m.get("params"))
            if time.monotonic() > deadline:
                raise TimeoutError("no answer from the browser")
            chunk = os.read(self._from_browser, 1 << 20)
            if not chunk:
                raise RuntimeError("the browser closed the pipe")
            self._buffer += chunk

    def open(self, url, width, height):
        target = self.send("Target.createTarget", {"url": "about:blank"}, session=False)
        attached = self.send(
            "Target.attachToTarget",
            {"targetId": target["targetId"], "flatten": True},
            session=False,
        )
        self.session = attached["sessionId"]
        self.send(
            "Emulation.setDeviceMetricsOverride",
            {"width": width, "height": height, "deviceScaleFactor": 1, "mobile": False},
        )
        self.send("Page.enable")
        self.send("Page.navigate", {"url": url})
        self._wait(lambda m: m.get("method") == "Page.loadEventFired", 60)

    def js(self, expression):
        r = self.send("Runtime.evaluate", {"expression": expression, "returnByValue": True})
        if "exceptionDetails" in r:
            raise RuntimeError(r["exceptionDetails"])
        return r["result"].get("value")

    def hover(self, x, y):
        self.send("Input.dispatchMouseEvent", {"type": "mouseMoved", "x": x, "y": y})

    def screenshot(self, path):
        import base64

        r = self.send("Page.captureScreenshot", {"format": "png"})
        path.write_bytes(base64.b64decode(r["data"]))

    def close(self):
        try:
            self.send("Browser.close", session=False, timeout=10)
        except (RuntimeError, TimeoutError, OSError):
            pass
        try:
            self.proc.wait(timeout=20)
        except subprocess.TimeoutExpired:
            self.proc.kill()
        os.close(self._to_browser)
        os.close(self._from_browser)


_POINT_JS = """(function (ph, e) {
  const svg = document.getElementById('map');
  const w = DATA.frames[current].window, f = DATA.frame;
  const x = f[0] + (ph - w[0]) / (w[1] - w[0]) * (f[2] - f[0]);
  const y = f[3] - (e - w[2]) / (w[3] - w[2]) * (f[3] - f[1]);
  const pt = svg.createSVGPoint(); pt.x = x; pt.y = y;
  const s = pt.matrixTransform(svg.getScreenCTM());
  return [s.x, s.y];
})(%r, %r)"""


def _text(b, element_id):
    return b.js(f"(document.getElementById('{element_id}') || {{}}).textContent || ''")


@pytest.fixture(scope="module")
def browser(tmp_path_factory):
    exe = browser_or_skip()
    b = _Browser(exe, tmp_path_factory.mktemp("profile"))
    yield b
    b.close()


def test_page_in_headless_chromium(tmp_path, browser):
    maps = [pourbaix.compute_map("Fe", temperature_c=t) for t in (25.0, 150.0)]
    readings = [
        {"label": "well 3, May", "ph": 8.1, "potential_v": -0.52, "details": {"site": "well 3"}},
    ]
    page = tmp_path / "fe page.html"
    write_interactive(page, maps, parameter="temperature", readings=readings)
    browser.open(page.resolve().as_uri(), 1200, 900)

    # DOM after the script ran: one polygon per domain, the slider at the first map
    assert browser.js("document.querySelectorAll('#map polygon.domain').length") == len(
        maps[0].domains
    )
    assert _text(browser, "frame-label") == "25 °C"

    # Hover at pH 7, E = -0.3 V vs SHE: Fe²⁺, corrosion, at 25 °C and 1e-6 (Pourbaix 1974, iron;
    # from memory). The boundary above is Fe²⁺ | Fe₃O₄, whose line falls 8/2 k = 0.2366 V per pH
    # (3 Fe²⁺ + 4 H₂O = Fe₃O₄ + 8 H⁺ + 2 e⁻; Pourbaix 1974, iron, eq. 27; from memory).
    x, y = browser.js(_POINT_JS % (7.0, -0.3))
    browser.hover(x, y)
    assert _text(browser, "probe-species") == "Fe²⁺"
    assert "corrosion" in _text(browser, "probe-state")
    up = _text(browser, "probe-up")
    assert "Fe₃O₄" in up
    boundary = _text(browser, "probe-boundary")
    assert "Fe₃O₄" in boundary and "Fe²⁺" in boundary
    slope = float(re.search(r"- (0\.\d+) pH", boundary).group(1))
    assert slope == pytest.approx(4 * K25, abs=2e-5)  # printed to 5 decimals
    # the mouse sits on whole pixels: read back the point the page shows, then its margin up to the
    # Fe²⁺/Fe₃O₄ line must be that line's height there (E = e0 + slope pH) minus the point's E
    ph = float(_text(browser, "probe-ph"))
    e = float(_text(browser, "probe-e").split()[0].replace("−", "-"))
    assert ph == pytest.approx(7.0, abs=0.05) and e == pytest.approx(-0.3, abs=0.01)
    line = next(b for b in maps[0].boundaries if set(b.between) == {"Fe^2+", "Fe3O4"})
    up_mv = float(re.search(r"(\d+) mV", up).group(1))
    # page rounds pH to 0.01 and E to 1 mV: 0.24 V/pH x 0.005 + 0.5 mV + 0.5 mV rounding of the margin
    assert up_mv == pytest.approx((line.e_at_ph0_v + line.slope_v_per_ph * ph - e) * 1000, abs=2.3)

    # a reading shows its details on hover
    x, y = browser.js(_POINT_JS % (8.1, -0.52))
    browser.hover(x, y)
    assert _text(browser, "reading-name") == "well 3, May"
    assert "well 3" in browser.js("document.getElementById('panel').textContent")

    # screenshot, compared with the map by structure: every domain's tint is on screen, and the
    # tints form as many separate regions as the map has domains of each tint
    shot = tmp_path / "shot.png"
    browser.hover(5, 5)  # the mouse off the map
    browser.screenshot(shot)
    from PIL import Image
    from scipy import ndimage

    rgb = np.asarray(Image.open(shot).convert("RGB")).astype(int)
    frame = json.loads(browser.js("JSON.stringify(DATA.frames[0].domains.map(d => d.colour))"))
    for colour in set(frame):
        target = np.array([int(colour[i : i + 2], 16) for i in (1, 3, 5)])
        mask = np.abs(rgb - target).max(axis=2) <= 2
        regions, n = ndimage.label(mask)
        sizes = np.bincount(regions.ravel())[1:]
        big = int((sizes > 150).sum())  # ignore anti-aliased specks
        expected = frame.count(colour)
        assert big >= expected, f"{colour}: {big} regions on screen for {expected} domains"

    # the slider steps to the map at 150 °C: its own domains are drawn
    browser.js(
        "slider.value = 1; slider.dispatchEvent(new Event('input')); 0"
    )  # fmt: skip
    assert _text(browser, "frame-label") == "150 °C"
    assert browser.js("document.querySelectorAll('#map polygon.domain').length") == len(
        maps[1].domains
    )
    assert "150 °C" in _text(browser, "title")


def test_field_readings_page_steps_through_their_temperatures(tmp_path, capsys):
    from pathlib import Path

    data = Path(__file__).parent / "data" / "field" / "two_sites.csv"
    out = tmp_path / "readings.html"
    code = main(["field", "Pb", "--readings", str(data), "--out", str(out)])
    assert code == 0, capsys.readouterr().err
    page = out.read_text(encoding="utf-8")
    doc = json.loads(re.search(r'<script id="map-data"[^>]*>(.*?)</script>', page, re.S).group(1))
    assert [f["label"] for f in doc["frames"]] == ["12 °C", "15 °C", "18 °C"]
    assert len(doc["readings"]) == 6
    first = doc["readings"][0]
    assert first["details"]["site"] == "north reservoir outlet"
    assert "the map at 12 °C" in first["details"]["classified on"]
