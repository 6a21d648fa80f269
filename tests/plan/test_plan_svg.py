"""The timeline chart: valid XML, one bar per system, escaped text, and it renders.

Rendering uses rsvg-convert (Debian/Ubuntu package librsvg2-bin) or ImageMagick 7's
``magick``; the test is skipped, with the reason, where neither is installed.
"""

from __future__ import annotations

import datetime
import shutil
import subprocess
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest
from plan_helpers import ECDH_P256, RSA_2048_KEY_TRANSPORT, RSA_2048_SIGNATURE, candidate
from png_reader import pixel, read_png

from pqtriage.formats.svg.plan import COLOURS, plan_svg
from pqtriage.plan.planner import Plan, build_plan
from pqtriage.plan.policies import select_policies
from pqtriage.plan.scheduler import Capacity

D = datetime.date
NS = {"svg": "http://www.w3.org/2000/svg"}
HOSTILE = 'Ledger </text><script>alert("x")</script> & \x1b[2J'


def make_plan() -> Plan:
    systems = [
        candidate("pki", rank=2, years=1.0, start_by=D(2027, 6, 30), uses=(RSA_2048_SIGNATURE,)),
        candidate("web", rank=1, years=0.5, depends_on=("pki",), start_by=D(2027, 9, 30),
                  uses=(ECDH_P256,), name=HOSTILE),
        candidate("mail", rank=3, years=4.0, start_by=D(2029, 1, 1),
                  uses=(RSA_2048_KEY_TRANSPORT,)),
    ]  # fmt: skip
    return build_plan(
        systems, D(2027, 2, 15), select_policies(["nist-ir-8547"]), Capacity(concurrent=1)
    )


def test_svg_parses_with_one_bar_per_system() -> None:
    plan = make_plan()
    root = ET.fromstring(plan_svg(plan))
    assert root.tag == "{http://www.w3.org/2000/svg}svg"
    bars = root.findall(".//svg:rect[@class='bar']", NS)
    assert sorted(b.get("data-system") for b in bars) == ["mail", "pki", "web"]
    # Start-by markers: one per system with a start-by date; deadline ticks: one per date.
    assert len(root.findall(".//svg:polygon[@class='start-by']", NS)) == 3
    ticks = root.findall(".//svg:line[@class='deadline']", NS)
    assert len(ticks) == 2 + 1 + 2  # pki 2030 & 2035, web 2035, mail 2030 & 2035


def test_bars_follow_the_schedule_and_status() -> None:
    plan = make_plan()
    root = ET.fromstring(plan_svg(plan))
    bars = {b.get("data-system"): b for b in root.findall(".//svg:rect[@class='bar']", NS)}
    # pki q0-q3, web q4-q5, mail q6-q21: bars in time order left to right.
    assert float(bars["pki"].get("x")) < float(bars["web"].get("x")) < float(bars["mail"].get("x"))
    # mail finishes 2031-03-31 > 2030-12-31 (IR 8547 112-bit deprecated after 2030): red.
    assert bars["mail"].get("fill") == COLOURS["misses deadline"]
    assert bars["pki"].get("fill") == COLOURS["on time"]
    assert bars["web"].get("fill") == COLOURS["late start"]  # starts 2028-04-01 > 2027-09-30
    assert bars["web"].find("svg:title", NS).text == "web: 2028-04-01 to 2028-09-30 (late start)"


def test_input_text_is_escaped() -> None:
    text = plan_svg(make_plan())
    assert "<script>" not in text and "\x1b" not in text
    labels = [t.text or "" for t in ET.fromstring(text).iter("{http://www.w3.org/2000/svg}text")]
    assert any(label.startswith("web — Ledger </text><script>") for label in labels)


def _renderer() -> list[str] | None:
    if shutil.which("rsvg-convert"):
        return ["rsvg-convert", "--format=png", "--output"]
    if shutil.which("magick"):
        return ["magick", "svg:-", "png:"]
    return None


@pytest.mark.skipif(
    _renderer() is None,
    reason="no SVG renderer: install rsvg-convert (apt-get install librsvg2-bin) or ImageMagick 7",
)
def test_svg_renders_with_bars_in_their_colours(tmp_path: Path) -> None:
    plan = make_plan()
    text = plan_svg(plan)
    svg_file, png_file = tmp_path / "plan.svg", tmp_path / "plan.png"
    svg_file.write_text(text, encoding="utf-8")
    command = _renderer()
    assert command is not None
    if command[0] == "rsvg-convert":
        subprocess.run([*command, str(png_file), str(svg_file)], check=True, timeout=60)
    else:
        subprocess.run([command[0], str(svg_file), f"png:{png_file}"], check=True, timeout=60)
    image = read_png(png_file.read_bytes())
    root = ET.fromstring(text)
    assert (image[0], image[1]) == (int(root.get("width")), int(root.get("height")))
    for bar in root.findall(".//svg:rect[@class='bar']", NS):
        x = int(float(bar.get("x")) + float(bar.get("width")) / 2)
        y = int(float(bar.get("y")) + float(bar.get("height")) / 2)
        expected = tuple(int(bar.get("fill")[i : i + 2], 16) for i in (1, 3, 5))
        got = pixel(image, x, y)[:3]
        assert max(abs(a - b) for a, b in zip(got, expected, strict=True)) <= 2, bar.get(
            "data-system"
        )
    # The background is white (the chart is readable in a browser without a theme).
    assert pixel(image, 2, image[1] - 2)[:3] == (255, 255, 255)
