"""Cam profiles as files: CSV points, a DXF outline for CAM/CNC, an SVG drawing for review.

All three are built from a `CamStudy` (workbench.camfile) and returned as
text, in mm and deg; the caller writes them atomically.  Frame: the cam
frame, which at cam angle 0 is the machine frame with the cam centre at the
origin and the follower on +y.

* CSV — one row per cam angle from 0 up to 360 inclusive: the last row
  repeats the first at 360°, so the point list closes on itself.
* DXF — the profile as one closed LWPOLYLINE (counter-clockwise, starting at
  cam angle 0) on layer CAM-PROFILE; the pitch curve (roller followers) on
  CAM-PITCH; the base circle on CAM-BASE-CIRCLE; a centre mark and the 0°
  line (toward where the follower touches at cam angle 0) on CAM-CENTRE;
  a note on CAM-NOTES.
* SVG — base circle, pitch curve and profile drawn 1:1 in mm, the follower at
  cam angle 0, the turning direction, the points of largest pressure angle
  and smallest radius, a title with the verdicts and the caution.
"""

from __future__ import annotations

import io
import math
import textwrap
from xml.sax.saxutils import escape

import numpy as np

from solver.cam import RollerFollower, closed_outline

from .camfile import COMMON_PRACTICE, CamStudy

MM_PER_M = 1e3
FORMATS = ("csv", "dxf", "svg")
LAYERS = {  # name: (ACI colour, linetype)
    "CAM-PROFILE": (7, "Continuous"),
    "CAM-PITCH": (5, "DASHED"),
    "CAM-BASE-CIRCLE": (8, "DASHDOT"),
    "CAM-CENTRE": (1, "CENTER"),
    "CAM-NOTES": (8, "Continuous"),
}
CENTRE_MARK = 0.08  # half-length of the centre cross, as a share of the base circle radius


def _mm(points: np.ndarray) -> np.ndarray:
    return np.asarray(points) * MM_PER_M


def uncuttable(study: CamStudy) -> list[str]:
    """Why the outline cannot be cut as it stands (undercut, cusp, corner), in words; [] if it can."""
    a = study.analysis
    why = []
    for name, regions in (("undercut", a.undercut), ("cusp", a.cusp)):
        for r in regions:
            why.append(f"{name} from {math.degrees(r.start) % 360:.2f}° to {math.degrees(r.end) % 360:.2f}°")
    for c in a.corners:
        why.append(f"corner (a velocity jump in the axis) at {math.degrees(c) % 360:.2f}°")
    return why


# --- CSV ---------------------------------------------------------------------


def profile_csv(study: CamStudy, axis_unit: str) -> str:
    """Profile points at full precision (shortest round-trip repr), closed by a repeated 360° row.

    Columns: cam angle [deg], follower position from the base circle [axis
    unit], profile x, y [mm], pitch curve x, y [mm] (roller followers),
    pressure angle [deg], profile radius of curvature [mm] (+ convex,
    − concave, inf at an inflection).
    """
    a = study.analysis
    n = len(a.theta)
    lift_scale = MM_PER_M if axis_unit == "mm" else 180.0 / math.pi
    columns = [a.lift * lift_scale, _mm(a.profile[:, 0]), _mm(a.profile[:, 1])]
    header = ["cam angle [deg]", f"follower [{axis_unit}]", "profile x [mm]", "profile y [mm]"]
    if a.pitch is not None:
        columns += [_mm(a.pitch[:, 0]), _mm(a.pitch[:, 1])]
        header += ["pitch x [mm]", "pitch y [mm]"]
    columns += [np.degrees(a.pressure_angle), _mm(a.profile_radius)]
    header += ["pressure angle [deg]", "profile radius [mm]"]
    rows = np.column_stack(columns).tolist()
    buf = io.StringIO()
    buf.write(",".join(header) + "\n")
    for k in range(n + 1):
        angle = 360.0 * k / n
        row = rows[k % n]
        buf.write(",".join(repr(x + 0.0) for x in [angle, *row]) + "\n")
    return buf.getvalue()


# --- DXF ---------------------------------------------------------------------


def _polyline(msp, points: np.ndarray, layer: str) -> None:
    """A closed LWPOLYLINE through `points` (mm), its vertices set in one go.

    ezdxf appends vertices one array copy at a time; setting the whole
    (x, y, start width, end width, bulge) array at once keeps 36,000 points fast.
    """
    line = msp.add_lwpolyline([], close=True, dxfattribs={"layer": layer})
    line.lwpoints.set(np.column_stack((points, np.zeros((len(points), 3)))))


def profile_dxf(study: CamStudy, title: str, caution: str) -> str:
    """A DXF (R2010, mm) with the closed profile and its references on named layers."""
    import ezdxf  # noqa: PLC0415 - only the DXF export needs it
    from ezdxf import units  # noqa: PLC0415

    doc = ezdxf.new("R2010", setup=True)
    doc.units = units.MM
    doc.header["$MEASUREMENT"] = 1  # metric
    for name, (colour, linetype) in LAYERS.items():
        doc.layers.add(name, color=colour, linetype=linetype)
    msp = doc.modelspace()
    a = study.analysis
    outline = _mm(closed_outline(a, "profile"))[:-1]
    _polyline(msp, outline, "CAM-PROFILE")
    if a.pitch is not None:
        pitch = _mm(closed_outline(a, "pitch"))[:-1]
        _polyline(msp, pitch, "CAM-PITCH")
    base = study.cam.follower.base_radius * MM_PER_M
    msp.add_circle((0.0, 0.0), base, dxfattribs={"layer": "CAM-BASE-CIRCLE"})
    h = CENTRE_MARK * base
    msp.add_line((-h, 0.0), (h, 0.0), dxfattribs={"layer": "CAM-CENTRE"})
    msp.add_line((0.0, -h), (0.0, h), dxfattribs={"layer": "CAM-CENTRE"})
    touch = _mm(a.profile[0])  # where the follower touches at cam angle 0: the timing reference
    toward = touch / np.hypot(*touch)
    msp.add_line(tuple(h * toward), tuple(base * toward), dxfattribs={"layer": "CAM-CENTRE"})
    lowest = float(outline[:, 1].min() if a.pitch is None else min(outline[:, 1].min(), pitch[:, 1].min()))
    note = (f"{title}\\P0° line: from the centre toward the point the follower touches at cam angle 0."
            f"\\P{caution}")
    msp.add_mtext(note, dxfattribs={"layer": "CAM-NOTES", "char_height": base / 20.0, "width": 2.5 * base}
                  ).set_location((float(outline[:, 0].min()), lowest - 0.1 * base))
    doc.header["$LTSCALE"] = base / 20.0  # dashes in proportion to the cam
    buf = io.StringIO()
    doc.write(buf)
    return buf.getvalue()


# --- SVG ---------------------------------------------------------------------

INK = {"profile": "#111", "pitch": "#1f5fbf", "base": "#888", "follower": "#c07000", "centre": "#b00",
       "marker": "#7a1fa2", "pass": "#1a7a1a", "fail": "#b00000", "note": "#555"}
PROFILE_FILL = "#eeeeee"  # the cam body, so the outline reads as a part
CHAR_WIDTH = 0.56  # average glyph width of a sans-serif font, as a share of the font size
BOLD_WIDTH = 1.12  # bold glyphs are this much wider
LINE = 1.35  # line spacing, as a share of the font size
FLAT_ANGLE = 1e-6  # rad: a largest pressure angle below this (a translating flat face) gets no marker


def _path(points: np.ndarray) -> str:
    """A closed SVG path through points in mm (y flipped for SVG's downward axis)."""
    coords = " ".join(f"{x:.4f},{-y:.4f}" for x, y in points)
    return f"M {coords} Z"


def _follower_lines(study: CamStudy, size: float) -> tuple[list[str], list[tuple[float, float]]]:
    """SVG elements of the follower at cam angle 0, and the points that must fit on the sheet."""
    a, f = study.analysis, study.cam.follower
    items, extent = [], []
    stem = 0.45 * size
    if isinstance(f, RollerFollower):
        cx, cy = _mm(a.pitch[0])
        r = f.roller_radius * MM_PER_M
        if r > 0:
            items.append(f'<circle cx="{cx:.4f}" cy="{-cy:.4f}" r="{r:.4f}"/>')
        extent += [(cx - r, cy - r), (cx + r, cy + r)]
        if hasattr(f, "pivot_distance"):  # the arm back to its pivot
            px = f.pivot_distance * MM_PER_M
            items.append(f'<line x1="{cx:.4f}" y1="{-cy:.4f}" x2="{px:.4f}" y2="0"/>')
            items.append(f'<circle cx="{px:.4f}" cy="0" r="{0.04 * size:.4f}"/>')
            extent.append((px + 0.05 * size, 0.0))
        else:  # the stem along the line of travel
            items.append(f'<line x1="{cx:.4f}" y1="{-(cy + r):.4f}" x2="{cx:.4f}" y2="{-(cy + r + stem):.4f}"/>')
            extent.append((cx, cy + r + stem))
    else:
        x, y = _mm(a.contact[0])
        if hasattr(f, "pivot_distance"):  # the face along the arm, from the pivot past the contact
            px = f.pivot_distance * MM_PER_M
            ex, ey = x - 0.2 * (px - x), y + 0.2 * y
            items.append(f'<line x1="{px:.4f}" y1="0" x2="{ex:.4f}" y2="{-ey:.4f}"/>')
            items.append(f'<circle cx="{px:.4f}" cy="0" r="{0.04 * size:.4f}"/>')
            extent += [(px + 0.05 * size, 0.0), (ex, ey)]
        else:  # the face square to the travel, and the stem
            axis_x = f.axis_x(study.cam.sigma) * MM_PER_M
            half = (f.face_width * MM_PER_M / 2) if f.face_width else 0.6 * size
            items.append(f'<line x1="{axis_x - half:.4f}" y1="{-y:.4f}" x2="{axis_x + half:.4f}" y2="{-y:.4f}"/>')
            items.append(f'<line x1="{axis_x:.4f}" y1="{-y:.4f}" x2="{axis_x:.4f}" y2="{-(y + stem):.4f}"/>')
            extent += [(axis_x - half, y), (axis_x + half, y + stem)]
    return items, extent


def _turning_arrow(sigma: int, radius: float, width: float) -> str:
    """An arc with an arrowhead around the centre showing the turning direction."""
    a0, a1 = math.radians(200.0), math.radians(200.0 + sigma * 70.0)
    p0 = (radius * math.cos(a0), radius * math.sin(a0))
    p1 = (radius * math.cos(a1), radius * math.sin(a1))
    sweep = 0 if sigma > 0 else 1  # with y flipped, flag 1 sweeps clockwise as seen
    tangent = a1 + sigma * math.pi / 2
    head = 0.18 * radius
    left = (p1[0] - head * math.cos(tangent - 0.4), p1[1] - head * math.sin(tangent - 0.4))
    right = (p1[0] - head * math.cos(tangent + 0.4), p1[1] - head * math.sin(tangent + 0.4))
    stroke = f'fill="none" stroke="{INK["centre"]}" stroke-width="{width:.4f}"'
    return (f'<g id="turning"><path d="M {p0[0]:.4f},{-p0[1]:.4f} A {radius:.4f},{radius:.4f} 0 0 {sweep} '
            f'{p1[0]:.4f},{-p1[1]:.4f}" {stroke}/>'
            f'<path d="M {left[0]:.4f},{-left[1]:.4f} L {p1[0]:.4f},{-p1[1]:.4f} L {right[0]:.4f},{-right[1]:.4f}" '
            f'{stroke}/></g>')


def _nearest(a, at: float) -> int:
    n = len(a.theta)
    return int(round(at / (2 * math.pi) * n)) % n


def verdict_lines(study: CamStudy) -> list[str]:
    """The checks in words, one short phrase per check, in the verdict's order."""
    out = []
    for c in study.verdict.checks:
        q = c.quantity
        mark = ", common practice" if study.limit_source.get(q) == COMMON_PRACTICE else ""
        state = "within" if c.ok else "OVER"
        at = f"{math.degrees(c.at) % 360:.1f}°"
        if q == "pressure_angle":
            out.append(f"pressure angle {math.degrees(c.value):.1f}° at {at} (≤ {math.degrees(c.limit):g}°{mark}): "
                       f"{state}")
        elif q == "undercut":
            out.append("no undercut" if c.ok else f"UNDERCUT near {at}")
        elif q == "curvature_ratio":
            out.append(f"curvature ratio {c.value:.2f} at {at} (≥ {c.limit:g}{mark}): {state}")
        elif q == "cusp":
            out.append("no cusp" if c.ok else f"CUSP near {at}")
        elif q == "face_width":
            out.append(f"face width needed {c.value * MM_PER_M:.1f} mm of {c.limit * MM_PER_M:g} mm: {state}")
        elif q == "pivot_clearance":
            out.append(f"pivot clear of the cam by {c.value * MM_PER_M:.1f} mm" if c.ok else
                       f"PIVOT NOT CLEAR OF THE CAM: clearance {c.value * MM_PER_M:.1f} mm (largest radius at {at})")
        elif q == "min_radius":
            out.append(f"smallest convex profile radius {c.value * MM_PER_M:.1f} mm "
                       f"(≥ {c.limit * MM_PER_M:g} mm): {state}")
        else:
            out.append(f"CORNER at {at}")
    return out


class _Text:
    """Lines of text placed top-down on the sheet; wraps to the sheet's width."""

    def __init__(self, x: float, width: float):
        self.x, self.width, self.items = x, width, []

    def wrap(self, text: str, size: float, bold: bool = False) -> list[str]:
        share = CHAR_WIDTH * (BOLD_WIDTH if bold else 1.0)
        return textwrap.wrap(text, max(20, int(self.width / (share * size))))

    def put(self, lines, y: float, size: float, bold=False, colour="#111") -> float:
        for line in lines:
            y += size * LINE
            self.items.append(f'<text x="{self.x:.3f}" y="{y:.3f}" font-size="{size:.3f}" '
                              f'font-weight="{"bold" if bold else "normal"}" fill="{colour}">{escape(line)}</text>')
        return y


def profile_svg(study: CamStudy, title: str, subtitle: str, caution: str) -> str:
    """An SVG drawing (1:1, mm) of the cam for a design review."""
    a, f = study.analysis, study.cam.follower
    profile = _mm(closed_outline(a, "profile"))
    pitch = None if a.pitch is None else _mm(closed_outline(a, "pitch"))
    base = f.base_radius * MM_PER_M
    size = float(np.max(np.hypot(profile[:, 0], profile[:, 1])))
    follower_items, extent = _follower_lines(study, size)
    allpts = np.vstack([profile] + ([pitch] if pitch is not None else []) + [np.array(extent).reshape(-1, 2)])
    lo, hi = np.minimum(allpts.min(axis=0), -base), np.maximum(allpts.max(axis=0), base)
    margin = 0.08 * float(np.max(hi - lo))
    width = float(hi[0] - lo[0]) + 2 * margin
    font = min(max(width / 50.0, 2.2), 6.0)
    small = 0.7 * font
    text = _Text(float(lo[0]), width - 2 * margin)
    state = "ALL CHECKS PASS" if study.ok else "CHECK FAILED"
    title_lines = text.wrap(title, 1.15 * font, bold=True)
    sub_lines = text.wrap(subtitle, font)
    verdicts = text.wrap(f"{state} — " + "; ".join(verdict_lines(study)), font, bold=True)
    foot = text.wrap(f"Drawn 1:1 in mm, the cam and its follower at cam angle 0°. {caution}", small)
    head_h = (1.15 * len(title_lines) + len(sub_lines) + len(verdicts)) * font * LINE + font
    legend_h = 3.3 * font * LINE  # up to three rows of 0.8 × font
    foot_h = len(foot) * small * LINE + small
    x0, top = float(lo[0]) - margin, -float(hi[1]) - margin - head_h
    height = float(hi[1] - lo[1]) + 2 * margin + head_h + legend_h + foot_h
    w1, w2 = 0.0025 * width, 0.006 * width
    dash, dashdot = f"{4 * w2:.3f} {2 * w2:.3f}", f"{4 * w2:.3f} {2 * w2:.3f} {w2:.3f} {2 * w2:.3f}"
    parts = [
        '<?xml version="1.0" encoding="UTF-8"?>',
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{width:.3f}mm" height="{height:.3f}mm" '
        f'viewBox="{x0:.3f} {top:.3f} {width:.3f} {height:.3f}" font-family="sans-serif">',
        f"<title>{escape(title)}</title>",
        f'<rect x="{x0:.3f}" y="{top:.3f}" width="{width:.3f}" height="{height:.3f}" fill="white"/>',
        f'<path id="cam-body" d="{_path(profile[:-1])}" fill="{PROFILE_FILL}" stroke="none"/>',
        f'<circle id="base-circle" cx="0" cy="0" r="{base:.4f}" fill="none" stroke="{INK["base"]}" '
        f'stroke-width="{w1:.4f}" stroke-dasharray="{dashdot}"/>',
    ]
    if pitch is not None:
        parts.append(f'<path id="pitch-curve" d="{_path(pitch[:-1])}" fill="none" stroke="{INK["pitch"]}" '
                     f'stroke-width="{w1:.4f}" stroke-dasharray="{dash}"/>')
    parts.append(f'<path id="profile" d="{_path(profile[:-1])}" fill="none" stroke="{INK["profile"]}" '
                 f'stroke-width="{w2:.4f}" stroke-linejoin="round"/>')
    parts.append(f'<g id="follower" fill="none" stroke="{INK["follower"]}" stroke-width="{w1 * 1.5:.4f}">'
                 f'{"".join(follower_items)}</g>')
    h = CENTRE_MARK * base
    parts.append(f'<g id="centre" stroke="{INK["centre"]}" stroke-width="{w1:.4f}">'
                 f'<line x1="{-h:.4f}" y1="0" x2="{h:.4f}" y2="0"/><line x1="0" y1="{h:.4f}" x2="0" y2="{-h:.4f}"/>'
                 f'</g>')
    parts.append(_turning_arrow(study.cam.sigma, max(0.3 * base, 2.0 * font), w1 * 1.5))
    parts.append(_trouble(study, w2, font))
    parts.append(_markers(study, font, w1))
    y = text.put(title_lines, top, 1.15 * font, bold=True)
    y = text.put(sub_lines, y, font)
    text.put(verdicts, y, font, bold=True, colour=INK["pass"] if study.ok else INK["fail"])
    legend_top = -float(lo[1]) + margin
    parts.append(_legend(text.x, text.width, legend_top, 0.8 * font, w1, w2, dash, dashdot, pitch is not None,
                         a.max_pressure_angle.value > FLAT_ANGLE))
    text.put(foot, legend_top + legend_h, small, colour=INK["note"])
    parts += text.items
    parts.append("</svg>")
    return "\n".join(parts) + "\n"


def _trouble(study: CamStudy, width: float, font: float) -> str:
    """The stretches of profile that cannot be cut (undercut, cusp), drawn over it in red and named."""
    a = study.analysis
    n = len(a.theta)
    out = [f'<g id="trouble" fill="none" stroke="{INK["fail"]}" stroke-width="{1.6 * width:.4f}">']
    for name, regions in (("undercut", a.undercut), ("cusp", a.cusp)):
        for r in regions:
            k0, k1 = _nearest(a, r.start), _nearest(a, r.end)
            idx = np.arange(k0, k1 + 1 if k1 >= k0 else k1 + n + 1) % n
            pts = _mm(a.profile[idx])
            coords = " ".join(f"{x:.4f},{-y:.4f}" for x, y in pts)
            out.append(f'<polyline points="{coords}"/>')
            x, y = pts[len(pts) // 2]
            away = 2.0 * font / max(math.hypot(x, y), 1e-9)  # label outward, clear of the centre-side markers
            label = f"{name} {math.degrees(r.start) % 360:.1f}°–{math.degrees(r.end) % 360:.1f}°"
            out.append(f'<text x="{x * (1 + away):.4f}" y="{-y * (1 + away):.4f}" font-size="{0.75 * font:.3f}" '
                       f'stroke="none" fill="{INK["fail"]}" text-anchor="middle">{escape(label)}</text>')
    out.append("</g>")
    return "".join(out)


def _markers(study: CamStudy, font: float, w: float) -> str:
    """Circles at the largest pressure angle φ (on the profile) and the smallest convex radius ρ
    (on the pitch curve, or the profile of a flat face), labelled toward the cam centre."""
    a = study.analysis
    size = 0.75 * font
    out = [f'<g id="markers" font-size="{size:.3f}" fill="{INK["marker"]}">']
    radii, curve = (a.pitch_radii, a.pitch) if a.pitch is not None else (a.profile_radii, a.profile)
    spots = [(f"ρ {radii.convex.value * MM_PER_M:.1f} mm", radii.convex.at, curve)]
    if a.max_pressure_angle.value > FLAT_ANGLE:
        spots.insert(0, (f"φ {math.degrees(a.max_pressure_angle.value):.1f}°", a.max_pressure_angle.at, a.profile))
    for label, at, points in spots:
        x, y = _mm(points[_nearest(a, at)])
        ux, uy = -x / math.hypot(x, y), -y / math.hypot(x, y)  # toward the centre
        tx, ty = x + 1.6 * font * ux, y + 1.6 * font * uy
        anchor = "middle" if abs(ux) < 0.5 else ("start" if ux > 0 else "end")
        out.append(f'<circle cx="{x:.4f}" cy="{-y:.4f}" r="{0.6 * font:.4f}" fill="none" stroke="{INK["marker"]}" '
                   f'stroke-width="{w:.4f}"/>')
        out.append(f'<text x="{tx:.4f}" y="{-ty + 0.35 * size:.4f}" text-anchor="{anchor}">'
                   f'{escape(f"{label} at {math.degrees(at) % 360:.1f}°")}</text>')
    out.append("</g>")
    return "".join(out)


def _legend(x: float, room: float, top: float, font: float, w1: float, w2: float, dash: str, dashdot: str,
            has_pitch: bool, has_angle: bool) -> str:
    """Rows under the drawing, `room` mm wide: the curves, then what the markers mean."""
    items = [("profile", INK["profile"], w2, "")]
    if has_pitch:
        items.append(("pitch curve", INK["pitch"], w1, dash))
    items += [("base circle", INK["base"], w1, dashdot), ("follower at 0°", INK["follower"], 1.5 * w1, ""),
              ("centre, turning", INK["centre"], w1, "")]
    out = [f'<g id="legend" font-size="{font:.3f}" fill="#333">']
    y = top + font
    cursor = x
    for name, colour, width, pattern in items:
        step = (4.5 + CHAR_WIDTH * len(name)) * font
        if cursor > x and cursor + step > x + room:
            cursor, y = x, y + LINE * font
        extra = f' stroke-dasharray="{pattern}"' if pattern else ""
        out.append(f'<line x1="{cursor:.3f}" y1="{y - 0.35 * font:.3f}" x2="{cursor + 3 * font:.3f}" '
                   f'y2="{y - 0.35 * font:.3f}" stroke="{colour}" stroke-width="{width:.4f}"{extra}/>')
        out.append(f'<text x="{cursor + 3.5 * font:.3f}" y="{y:.3f}">{escape(name)}</text>')
        cursor += step
    what = "pitch curve" if has_pitch else "profile"
    marks = ("○ φ: largest pressure angle   " if has_angle else "") + f"○ ρ: smallest convex radius of the {what}"
    out.append(f'<text x="{x:.3f}" y="{y + LINE * font:.3f}" fill="{INK["marker"]}">{escape(marks)}</text>')
    out.append("</g>")
    return "".join(out)
