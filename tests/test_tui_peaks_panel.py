"""The peaks panel: one line per quantity at any width, the verdict always in view.

Values come from the axis report; the lid lift's velocity peak is the
cycloidal rise's 2h/T (Cv = 2, handbook value from memory, Norton, *Cam
Design and Manufacturing Handbook*; h = 40 mm, T = (90/360)(60/120) s).
"""

from __future__ import annotations

import pytest

from workbench.app import Workbench
from workbench.presets import preset_path
from workbench.projectfile import load_project
from workbench.tui.compute import compute_results
from workbench.tui.widgets.peaks_panel import PeaksPanel, peak_rows, table_lines

from tests.tui_pilot import workers_done


@pytest.fixture(scope="module")
def results():
    return compute_results(load_project(preset_path("tray-lidder")))


@pytest.mark.parametrize("axis", ["lid-lift", "tray-pusher", "seal-head"])
@pytest.mark.parametrize("width", [120, 100, 78])  # 78: an 80-column terminal (DESIGN: 80×24)
def test_each_quantity_keeps_one_line_with_its_verdict(results, axis, width):
    rows, cells = peak_rows(results[axis])
    lines = table_lines(cells, width)
    assert len(lines) == 1 + len(rows)
    assert all(line.cell_len <= width for line in lines)
    for line, (quantity, row) in zip(lines[1:], rows.items()):
        text = line.plain
        assert text.split()[0] == quantity
        for shown in (row["value"], row["at"], row["limit"], f"{row['used'] * 100:.0f} %", row["verdict"]):
            assert shown in text


def test_the_full_table_when_it_fits_and_narrower_forms_when_not(results):
    rows, cells = peak_rows(results["seal-head"])
    wide = table_lines(cells, 120)
    assert wide[0].plain.startswith(" peaks") and "share of limit" in wide[0].plain and "█" in wide[1].plain
    narrow = table_lines(cells, 78)
    assert narrow[0].plain.startswith("peaks") and "share of limit" not in narrow[0].plain
    assert "█" not in narrow[1].plain and "░" not in narrow[1].plain


async def test_the_panel_shows_the_lid_lift_peaks():
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await workers_done(app)
        await pilot.pause()
        panel = app.query_one(PeaksPanel)
        v = 2 * 40.0 / (90.0 / 360.0 * 60.0 / 120.0)  # 640 mm/s
        assert panel.rows["velocity"]["value"] == f"{v:.0f} mm/s"
        shown = [panel.render_line(y).text for y in range(panel.size.height)]
        assert panel.size.height == 6  # header, three quantities, max speed, joins
        assert shown[1].split()[:3] == ["velocity", "640", "mm/s"] and shown[1].rstrip().endswith("✓ within")
        assert shown[3].rstrip().endswith("✗ OVER")
        assert shown[4].startswith("max speed within limits: ✗ 114.4 cycles/min")
