"""The segments of one axis as a table whose cells are edited in place."""

from __future__ import annotations

from rich.text import Text
from textual.cache import LRUCache
from textual.coordinate import Coordinate
from textual.widgets import DataTable

from motionlaws import Axis

from ...editing import segment_ends
from ..format import number

CELL_CACHE_SIZE = 512  # rendered cells kept by content: a few tables' worth (5 columns × ~10 rows each)
COLUMNS = (  # (key, header) — the key says which edit a cell opens
    ("number", "#"),
    ("law", "law"),
    ("span", "span [deg]"),
    ("ends", "from → to"),
    ("time", "time [ms]"),
)


def arrow(start: float, end: float) -> str:
    """↑ rise, ↓ return, · hold."""
    return "↑" if end > start else ("↓" if end < start else "·")


class SegmentTable(DataTable):
    """Rows are segments; columns law, span, from → to, time at machine speed."""

    DEFAULT_CSS = """
    SegmentTable { height: auto; max-height: 9; }
    """

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        """Enter is the view's (edit the cell), not the table's select: left out here, so the view's
        binding is the one shown and run."""
        return action != "select_cursor"

    def __init__(self, **kwargs):
        super().__init__(cursor_type="cell", zebra_stripes=True, **kwargs)
        self.axis: Axis | None = None
        self._cells_by_content: LRUCache[tuple, object] = LRUCache(CELL_CACHE_SIZE)
        """Rendered cells by what decides their look (see `_render_cell`)."""

    def _render_cell(self, row_index: int, column_index: int, base_style, width: int,
                     cursor: bool = False, hover: bool = False):
        """A cell as the data table renders it, rendered again only when its content, place,
        width or style changes.

        (`DataTable` renders every cell again after any cell changes: after an edit that
        was the table's whole repaint, most of the screen update that follows the edit.)"""
        if row_index < 0:
            content = str(self.ordered_columns[column_index].label)
        else:
            value = self.get_cell_at(Coordinate(row_index, column_index))
            content = (value.plain, str(value.style), value.justify, tuple(value.spans)) \
                if isinstance(value, Text) else str(value)
        key = (row_index, column_index, content, base_style, width, cursor, hover,
               self._show_hover_cursor, self._pseudo_class_state, self.show_cursor)
        lines = self._cells_by_content.get(key)
        if lines is None:
            lines = super()._render_cell(row_index, column_index, base_style, width, cursor, hover)
            self._cells_by_content[key] = lines
        return lines

    def notify_style_update(self) -> None:
        self._cells_by_content.clear()  # colours may have changed (theme)
        super().notify_style_update()

    def on_mount(self) -> None:
        for key, label in COLUMNS:
            self.add_column(Text(label), key=key)

    @staticmethod
    def cells(axis: Axis, speed_cpm: float) -> list[tuple]:
        """The rows as shown: number, law, span, from → to, time."""
        cycle_ms = 60_000.0 / speed_cpm
        rows = []
        for i, (seg, (start, end)) in enumerate(zip(axis.segments, segment_ends(axis)), start=1):
            if seg.law == "dwell":
                ends = Text(f"holds {number(start, axis.unit)}", style="dim")
            else:
                ends = Text(f"{arrow(start, end)} {start:g} → {end:g} {axis.unit}")
            rows.append((
                Text(str(i), justify="right"),
                seg.law,
                Text(f"{seg.span:g}", justify="right"),
                ends,
                Text(f"{seg.span / 360.0 * cycle_ms:.1f}", justify="right"),
            ))
        return rows

    def show(self, axis: Axis, speed_cpm: float) -> None:
        """Fill the table, keeping the cursor where it was; same-sized tables change only their changed cells."""
        row, column = self.cursor_coordinate
        same_axis = self.axis is not None and self.axis.name == axis.name
        self.axis = axis
        rows = self.cells(axis, speed_cpm)
        if same_axis and len(rows) == self.row_count:
            for r, cells in enumerate(rows):
                for c, value in enumerate(cells):
                    if str(self.get_cell_at((r, c))) != str(value):
                        self.update_cell_at((r, c), value, update_width=True)
            return
        self.clear()
        for i, cells in enumerate(rows, start=1):
            self.add_row(*cells, key=str(i))
        if self.row_count:
            self.move_cursor(row=min(row, self.row_count - 1), column=column, animate=False)

    @property
    def segment_index(self) -> int:
        """0-based index of the segment under the cursor."""
        return self.cursor_coordinate.row

    @property
    def column_key(self) -> str:
        return COLUMNS[self.cursor_coordinate.column][0]
