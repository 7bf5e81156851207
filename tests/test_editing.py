"""Pure edit operations on a project (workbench.editing): new project or a refusal.

Expected values come from the definitions in DESIGN §3 (segment duration
T = (β/360)·(60/N); v = h·y'/T) and the handbook cycloidal coefficient
Cv = 2 (from memory of Norton, *Cam Design and Manufacturing Handbook*).
"""

from __future__ import annotations

import math

import pytest

from motionlaws import Limits, analyse
from workbench import editing
from workbench.editing import EditError
from workbench.tui.history import History
from workbench.presets import preset_path
from workbench.projectfile import dumps, load_project, loads_project

LID = "lid-lift"


@pytest.fixture
def project():
    return load_project(preset_path("tray-lidder"))


def spans(project, name=LID):
    return [s.span for s in project.axis(name).segments]


def test_parse_number_accepts_units_and_separators():
    assert editing.parse_number("25,000", "limit") == 25000.0
    assert editing.parse_number(" 30 deg", "span", units=("deg", "°")) == 30.0
    assert editing.parse_number("45°", "span", units=("deg", "°")) == 45.0
    assert editing.parse_number("", "limit", allow_blank=True) is None


@pytest.mark.parametrize("text, reason", [
    ("abc", "is not a number"),
    ("-5", "must be above 0"),
    ("0", "must be above 0"),
    ("", "type a number"),
    ("inf", "must be finite"),
])
def test_parse_number_refuses_with_reason(text, reason):
    with pytest.raises(EditError, match=reason):
        editing.parse_number(text, "span", positive=True)


def test_edit_returns_new_project_and_leaves_old_unchanged(project):
    before = dumps(project)
    edited = editing.set_span(project, LID, 0, 120.0)
    assert dumps(project) == before
    assert edited is not project
    assert spans(edited) == [120.0, 120.0, 120.0]  # the 30° came from the dwell after it
    assert math.isclose(sum(spans(edited)), 360.0)


def test_span_change_changes_peak_as_the_handbook_says(project):
    # Cycloidal rise: v_max = h·Cv/T with Cv = 2 (handbook, from memory), T = (β/360)(60/N).
    edited = editing.set_span(project, LID, 0, 120.0)
    report = analyse(edited.programs[LID], edited.speed)
    h, beta, n = 40.0, 120.0, 120.0
    t = beta / 360.0 * 60.0 / n
    assert report.segments[0].peaks["velocity"].value == pytest.approx(h * 2.0 / t, rel=1e-9)
    # The compiled program is the new one, not the old.
    old = analyse(project.programs[LID], project.speed)
    assert old.segments[0].peaks["velocity"].value == pytest.approx(h * 2.0 / (90 / 360 * 0.5), rel=1e-9)


def test_span_difference_goes_to_the_chosen_donor(project):
    edited = editing.set_span(project, LID, 0, 80.0, donor=2)
    assert spans(edited) == [80.0, 150.0, 130.0]


def test_default_donor_is_nearest_dwell_after_else_next(project):
    lid = project.axis(LID)
    assert editing.default_donor(lid, 0) == 1
    assert editing.default_donor(lid, 2) == 1  # wraps round to the dwell
    pusher = project.axis("tray-pusher")
    assert editing.default_donor(pusher, 1) == 2


def test_a_span_grows_from_the_nearest_dwell_that_can_give_it(project):
    pusher = project.axis("tray-pusher")  # dwell 30, modified-trapezoid 120, dwell 60, poly345 150
    assert editing.default_donor(pusher, 1, 50.0) == 2  # the dwell after it has 60°
    assert editing.default_donor(pusher, 1, 70.0) == 2  # no dwell can: the nearest, which refuses
    grown = editing.set_span(project, "tray-pusher", 3, 170.0)  # +20°: the next dwell (30°) gives
    assert [s.span for s in grown.axis("tray-pusher").segments] == [10.0, 120.0, 60.0, 170.0]
    grown = editing.set_span(project, "tray-pusher", 3, 190.0)  # +40°: 30° cannot, the 60° can
    assert [s.span for s in grown.axis("tray-pusher").segments] == [30.0, 120.0, 20.0, 190.0]
    with pytest.raises(EditError, match="cannot give 70"):  # no dwell has 70° to give
        editing.set_span(project, "tray-pusher", 3, 220.0)


def test_a_segment_added_takes_its_span_from_a_dwell(project):
    lid = project.axis(LID)  # cycloidal, dwell, modified-sine
    assert editing.add_donor(lid, 1) == 1  # after the dwell: the dwell itself gives
    assert editing.add_donor(lid, 0) == 1  # after the rise: the dwell after it
    assert editing.add_donor(lid, 2) == 1  # after the return: round to the dwell
    moving = editing.delete_segment(project, LID, 1)  # no dwell left: the segment it follows
    assert [s.law for s in moving.axis(LID).segments] == ["cycloidal", "modified-sine"]
    assert editing.add_donor(moving.axis(LID), 1) == 1


def test_span_refused_when_donor_would_run_out(project):
    with pytest.raises(EditError, match="cannot give"):
        editing.set_span(project, LID, 0, 250.0)  # the dwell has only 150°


@pytest.mark.parametrize("span", [-10.0, 0.0, math.nan])
def test_span_refused_when_not_positive(project, span):
    with pytest.raises(EditError, match="span"):
        editing.set_span(project, LID, 0, span)


def test_span_without_donor_is_refused(project):
    with pytest.raises(EditError, match="choose another segment"):
        editing.set_span(project, LID, 0, 100.0, donor=0)


def test_duration_sets_span_at_machine_speed(project):
    # T = (β/360)(60/N): at 120 cycles/min one cycle is 500 ms, so 100 ms is 72°.
    edited = editing.set_duration(project, LID, 0, 0.100)
    assert spans(edited)[0] == pytest.approx(72.0)
    with pytest.raises(EditError, match="one cycle lasts 500 ms"):
        editing.set_duration(project, LID, 0, 0.6)


def test_law_change_keeps_positions(project):
    edited = editing.set_law(project, LID, 0, "modified-sine")
    seg = edited.axis(LID).segments[0]
    assert (seg.law, seg.to) == ("modified-sine", 40.0)


def test_unknown_law_refused(project):
    with pytest.raises(EditError, match="unknown law 'wobble'"):
        editing.set_law(project, LID, 0, "wobble")


def test_dwell_turned_into_motion_ends_where_it_started(project):
    edited = editing.set_law(project, LID, 1, "cycloidal")
    assert edited.axis(LID).segments[1].to == 40.0


def test_last_motion_to_dwell_refused_because_axis_would_not_return(project):
    with pytest.raises(EditError, match="not at its start"):
        editing.set_law(project, LID, 2, "dwell")


def test_to_edit_and_return_rule(project):
    edited = editing.set_to(project, LID, 0, 55.0)
    assert editing.segment_ends(edited.axis(LID)) == [(0.0, 55.0), (55.0, 55.0), (55.0, 0.0)]
    with pytest.raises(EditError, match="not at its start"):
        editing.set_to(project, LID, 2, 5.0)
    with pytest.raises(EditError, match="dwell holds its position"):
        editing.set_to(project, LID, 1, 5.0)


def test_insert_takes_span_from_donor(project):
    edited = editing.insert_segment(project, LID, 1, "dwell", 30.0)
    assert spans(edited) == [90.0, 120.0, 30.0, 120.0]
    edited = editing.insert_segment(project, LID, 0, "cycloidal", 30.0, to=50.0, donor=1)
    assert [s.law for s in edited.axis(LID).segments] == ["cycloidal", "cycloidal", "dwell", "modified-sine"]
    assert editing.segment_ends(edited.axis(LID))[1] == (40.0, 50.0)
    with pytest.raises(EditError, match="cannot give"):
        editing.insert_segment(project, LID, 0, "dwell", 90.0)


def test_delete_gives_span_to_heir(project):
    edited = editing.delete_segment(project, LID, 1)
    assert spans(edited) == [240.0, 120.0]
    edited = editing.delete_segment(project, LID, 0, heir=1)
    # Without the rise, the return now goes from 0 to 0: still a valid axis.
    assert spans(edited) == [240.0, 120.0]
    assert editing.segment_ends(edited.axis(LID))[1] == (0.0, 0.0)
    one = loads_project(
        'version = 1\n[machine]\nspeed = 60\n[[axis]]\nname = "a"\n'
        '[[axis.segment]]\nlaw = "dwell"\nspan = 360.0\n')
    with pytest.raises(EditError, match="at least one segment"):
        editing.delete_segment(one, "a", 0)


def test_split_halves_span_and_meets_halfway(project):
    edited = editing.split_segment(project, LID, 0)
    segs = edited.axis(LID).segments
    assert [(s.law, s.span, s.to) for s in segs[:2]] == [("cycloidal", 45.0, 20.0), ("cycloidal", 45.0, 40.0)]
    assert sum(spans(edited)) == pytest.approx(360.0)
    dwell = editing.split_segment(project, LID, 1)
    assert spans(dwell) == [90.0, 75.0, 75.0, 120.0]


def test_move_segment_and_refusals(project):
    edited = editing.move_segment(project, "tray-pusher", 0, +1)
    assert [s.law for s in edited.axis("tray-pusher").segments][:2] == ["modified-trapezoid", "dwell"]
    with pytest.raises(EditError, match="already the first"):
        editing.move_segment(project, LID, 0, -1)
    # The dwell can go first: rise and return keep their end positions.
    first = editing.move_segment(project, LID, 0, +1)
    assert [s.law for s in first.axis(LID).segments] == ["dwell", "cycloidal", "modified-sine"]
    # Putting the return before the rise leaves the axis at 40 mm at the end of the cycle.
    with pytest.raises(EditError, match="ends at 40, not at its start 0"):
        editing.move_segment(first, LID, 1, +1)


def test_speed_keeps_the_form_of_the_file():
    carton = load_project(preset_path("carton-indexer"))  # given by cycle_time = 0.8 s
    edited = editing.set_speed(carton, 100.0)
    assert edited.machine.speed is None and edited.machine.cycle_time == pytest.approx(0.6)
    assert edited.speed == pytest.approx(100.0)
    # 90 cycles/min has no short cycle time: it is kept as typed, a speed
    edited = editing.set_speed(carton, 90.0)
    assert edited.machine.speed == 90.0 and edited.machine.cycle_time is None
    with pytest.raises(EditError, match="above 0"):
        editing.set_speed(carton, -1.0)


def test_limits(project):
    edited = editing.set_limit(project, LID, "jerk", 9.0e5)
    assert edited.axis(LID).limits.jerk == 9.0e5
    assert analyse(edited.programs[LID], edited.speed).checks[2].limit == 9.0e5
    cleared = editing.set_limits(project, LID, Limits())
    assert not cleared.axis(LID).limits.any
    with pytest.raises(EditError, match="above 0"):
        editing.set_limit(project, LID, "velocity", -3.0)


def test_edits_survive_a_save_and_load(project, tmp_path):
    edited = editing.split_segment(editing.set_span(project, LID, 0, 100.0), LID, 2)
    text = dumps(edited)
    again = loads_project(text, tmp_path / "x.toml")
    assert dumps(again) == text


def test_law_table_lists_every_law_with_coefficients():
    table = dict(editing.law_table())
    # Handbook coefficients (from memory, Norton): cycloidal Cv 2, Ca 2π.
    cv, ca, _ = table["cycloidal"]
    assert cv == pytest.approx(2.0, rel=1e-6) and ca == pytest.approx(2 * math.pi, rel=1e-6)
    assert table["dwell"] is None and table["blend"] is None


def test_history_undo_redo_and_saved_mark(project):
    h = History(project)
    assert not h.modified and not h.can_undo
    one = editing.set_span(project, LID, 0, 100.0)
    h.push(one, "span")
    assert h.modified and h.current is one
    assert h.undo() == "span"
    assert h.current is project and not h.modified
    assert h.redo() == "span"
    assert h.current is one
    h.mark_saved()
    assert not h.modified
    h.undo()
    assert h.modified
    h.push(editing.set_speed(project, 90.0), "speed")
    assert not h.can_redo
    with pytest.raises(EditError):
        History(project).undo()


def test_large_numbers_and_shares_read_the_same_way_beside_their_limits():
    from workbench.axisreport import fmt, percent

    assert fmt(1_228_518.4) == "1,228,518" and fmt(700_000.0) == "700,000"  # a jerk beside its limit
    assert fmt(2.5e9) == "2.500e+09" and fmt(1.368e-12) == "1.368e-12"
    assert fmt(5261.3) == "5,261" and fmt(9999.9) == "10,000"  # not 1e+04
    from workbench.axisreport import angle_column

    assert [angle_column(a) for a in (136.9087, 160.0, 86.587, -0.0001)] == ["136.91", "160.00", "86.59", "0.00"]
    assert percent(1.16) == "116 %" and percent(0.4567, 1) == "45.7 %" and percent(123.4) == "12,340 %"
    assert percent(6.68e20) == "> 99,999 %"  # a speed typed far too high


def test_a_typed_minus_zero_is_zero():
    value = editing.parse_number("-0", "to")
    assert value == 0.0 and math.copysign(1.0, value) == 1.0 and f"{value:g}" == "0"
