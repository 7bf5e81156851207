"""The segment table as painted: changed cells show their new values, the cursor is drawn
where it is, and cells rendered earlier are reused only when nothing about them changed.

A segment's time at machine speed N is (span/360)·(60/N) s (one cycle takes
60/N s; the master turns evenly).
"""

from __future__ import annotations

from textual.geometry import Region

from workbench import editing
from workbench.app import Workbench
from workbench.presets import preset_path
from workbench.projectfile import load_project
from workbench.tui.messages import ProjectEdited
from workbench.tui.widgets.segment_table import SegmentTable

from tests.tui_pilot import settle

LID = "lid-lift"


def segment_ms(span_deg: float, speed_cpm: float) -> float:
    return span_deg / 360.0 * 60.0 / speed_cpm * 1e3


def painted(table: SegmentTable) -> list:
    """The table's lines as the screen gets them (header first)."""
    table._styles_cache.clear()
    return table.render_lines(Region(0, 0, table.size.width, table.size.height))


async def test_an_edit_repaints_the_changed_cells():
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        table = app.query_one(SegmentTable)
        before = painted(table)
        assert before[1].text.split()[:4] == ["1", "cycloidal", "90", "↑"]
        app.post_message(ProjectEdited(editing.set_span(app.project, LID, 0, 100.0), "span"))
        await settle(pilot)
        after = painted(table)
        first, second, third = (line.text.split() for line in after[1:4])
        assert first[2] == "100" and first[-1] == f"{segment_ms(100.0, 120.0):.1f}"  # 138.9
        assert second[2] == "140" and second[-1] == f"{segment_ms(140.0, 120.0):.1f}"  # the dwell gave 10°
        assert after[3].text == before[3].text  # the return did not change


async def test_the_cursor_is_painted_where_it_is():
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        table = app.query_one(SegmentTable)
        table.focus()
        table.move_cursor(row=0, column=0)
        await settle(pilot)
        at_start = painted(table)
        table.move_cursor(row=1, column=2)  # the dwell's span
        await settle(pilot)
        moved = painted(table)
        assert moved[2].text == at_start[2].text
        assert list(moved[2]) != list(at_start[2])  # same text, the cursor's colours on it
        span = next(seg for seg in moved[2] if seg.text.strip() == "150")
        cursor = table.get_component_rich_style("datatable--cursor")
        assert span.style.bgcolor == cursor.bgcolor
        table.move_cursor(row=0, column=0)
        await settle(pilot)
        assert [list(line) for line in painted(table)] == [list(line) for line in at_start]
