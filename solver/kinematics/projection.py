"""Projection of the offset between two points onto a vector fixed in body i.

    g = w · d,   w = A_i w',   d = (r_j + a_j) − (r_i + a_i)

with a_i = A_i s'_i, a_j = A_j s'_j.  A slider's stroke is g with w' along
its axis; the prismatic joint holds g = 0 with w' normal to the axis.
Writing ω = φ', α = φ'' and using frames.py's rules for rotating vectors:

    ∂g/∂r_i = −w    ∂g/∂φ_i = perp(w)·d − w·perp(a_i)
    ∂g/∂r_j =  w    ∂g/∂φ_j = w·perp(a_j)

    g''  = w''·d + 2 w'·d' + w·d''
    γ    = ω_i² w·d − 2 ω_i perp(w)·d' + w·(a_j ω_j² − a_i ω_i²)
    g''' = w'''·d + 3 w''·d' + 3 w'·d'' + w·d'''
    η    = −[ w'''_free·d + 3 w''·d' + 3 w'·d'' + w·d'''_free ]

where the "free" parts leave out q''' (frames.third_free) and w'', d'' are
complete (they hold q'', known when η is formed).
"""

from __future__ import annotations

from .frames import dot, perp, second_full, third_free


def _offset(pi, pj, si, sj):
    aix, aiy = pi.rotate(si)
    ajx, ajy = pj.rotate(sj)
    return (aix, aiy), (ajx, ajy), (pj.x + ajx - pi.x - aix, pj.y + ajy - pi.y - aiy)


def _offset_rate(vi, vj, ai, aj):
    """d' = r_j' + perp(a_j) ω_j − r_i' − perp(a_i) ω_i."""
    pix, piy = perp(*ai)
    pjx, pjy = perp(*aj)
    return (
        vj.x + pjx * vj.phi - vi.x - pix * vi.phi,
        vj.y + pjy * vj.phi - vi.y - piy * vi.phi,
    )


def value(pi, pj, si, sj, wl):
    """g for local vector w' (k, 2) on body i."""
    w = pi.rotate(wl)
    _, _, d = _offset(pi, pj, si, sj)
    return dot(*w, *d)


def jacobian(pi, pj, si, sj, wl):
    """[∂g/∂x_i, ∂g/∂y_i, ∂g/∂φ_i, ∂g/∂x_j, ∂g/∂y_j, ∂g/∂φ_j]."""
    wx, wy = pi.rotate(wl)
    ai, aj, d = _offset(pi, pj, si, sj)
    pw = perp(wx, wy)
    dphi_i = dot(*pw, *d) - dot(wx, wy, *perp(*ai))
    dphi_j = dot(wx, wy, *perp(*aj))
    return [-wx, -wy, dphi_i, wx, wy, dphi_j]


def value_jacobian(pi, pj, si, sj, wl):
    """(g, its six partials as `jacobian`), the shared rotations worked out once."""
    wx, wy = pi.rotate(wl)
    ai, aj, d = _offset(pi, pj, si, sj)
    pw = perp(wx, wy)
    dphi_i = dot(*pw, *d) - dot(wx, wy, *perp(*ai))
    dphi_j = dot(wx, wy, *perp(*aj))
    return dot(wx, wy, *d), [-wx, -wy, dphi_i, wx, wy, dphi_j]


def gamma(poses, rates, si, sj, wl):
    pi, pj = poses
    vi, vj = rates
    w = pi.rotate(wl)
    ai, aj, d = _offset(pi, pj, si, sj)
    dd = _offset_rate(vi, vj, ai, aj)
    wi, wj = vi.phi, vj.phi
    wi2, wj2 = wi * wi, wj * wj
    pw = perp(*w)
    rel = (aj[0] * wj2 - ai[0] * wi2, aj[1] * wj2 - ai[1] * wi2)
    return wi2 * dot(*w, *d) - 2.0 * wi * dot(*pw, *dd) + dot(*w, *rel)


def eta(poses, rates, accels, si, sj, wl):
    pi, pj = poses
    vi, vj = rates
    ci, cj = accels
    w = pi.rotate(wl)
    ai, aj, d = _offset(pi, pj, si, sj)
    dd = _offset_rate(vi, vj, ai, aj)
    wi, al = vi.phi, ci.phi
    pw = perp(*w)
    # w' = perp(w) ω_i;  w'' complete;  w''' without φ_i'''
    w1 = (pw[0] * wi, pw[1] * wi)
    w2 = second_full(*w, wi, al)
    w3 = third_free(*w, wi, al)
    # d'' complete, d''' without q'''
    ai2 = second_full(*ai, wi, al)
    aj2 = second_full(*aj, vj.phi, cj.phi)
    d2 = (cj.x + aj2[0] - ci.x - ai2[0], cj.y + aj2[1] - ci.y - ai2[1])
    ai3 = third_free(*ai, wi, al)
    aj3 = third_free(*aj, vj.phi, cj.phi)
    d3 = (aj3[0] - ai3[0], aj3[1] - ai3[1])
    total = dot(*w3, *d) + 3.0 * dot(*w2, *dd) + 3.0 * dot(*w1, *d2) + dot(*w, *d3)
    return -total
