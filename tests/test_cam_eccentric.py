"""The eccentric-disk check: a round cam fed back through every follower must come out round.

A disk of radius R with its centre ε from the shaft, turning with the cam
(DESIGN §5).  Derivation (ours, by hand): at cam angle θ the disk centre is
c = ε·e^{i(σθ − π/2)} in the machine frame (σ = +1 counter-clockwise), i.e.
c = (0, −ε) in the cam frame, where θ = 0 puts it straight below the shaft.

* Radial or offset flat-faced follower, face square to +y: the face rests on
  the disk's support height h = R + Im c = R − ε·cos θ, so the lift from the
  lowest position is s = ε(1 − cos θ) (harmonic) and the base circle
  Rb = R − ε.  Fed back, this motion must give the circle of radius
  Rb + ε centred at (0, −ε) in the cam frame, with ρ = Rb + s + s'' = Rb + ε.
* Roller followers: the roller centre stays R + r from c, so the pitch
  curve is the circle of radius R + r and the profile the circle of radius R
  about (0, −ε).  Their motion is NOT harmonic (for a radial roller
  s = ε(1 − cos θ) + √((R + r)² − ε² sin² θ) − (R + r)); it is built here
  from the two-circle intersection and differentiated with sympy.  A roller
  fed the harmonic motion instead traces the limaçon r = Rp + ε(1 − cos θ),
  not a circle.
* Oscillating flat face (face line n·X = d·sin ψ − f, n = (sin ψ, cos ψ)):
  tangency to the disk gives A·sin ψ − B·cos ψ = R + f with
  A = d − ε cos γ, B = ε sin γ, γ = σθ − π/2, so
  ψ = atan2(B, A) + asin((R + f)/√(A² + B²)).
"""

import math

import numpy as np
import pytest
import sympy as sp

from solver.cam import (
    Cam,
    OscillatingFlat,
    OscillatingRoller,
    TranslatingFlat,
    TranslatingRoller,
    Turning,
    analyse,
    motion_from_function,
)

MM = 1e-3
ECC = 8 * MM  # ε
DISK = 40 * MM  # R
ROLLER = 10 * MM
CENTRE = -1j * ECC  # disk centre in the cam frame
TOL = 1e-9  # of the size, as the product promises


def sympy_motion(expr, theta):
    """s(θ) and its first two derivatives from a sympy expression (sympy differentiates)."""
    funcs = [sp.lambdify(theta, sp.diff(expr, theta, k), "numpy") for k in range(3)]
    return motion_from_function(lambda th: tuple(np.broadcast_to(f(th), th.shape) + 0.0 for f in funcs))


def complex_points(xy):
    return xy[:, 0] + 1j * xy[:, 1]


def assert_circle(points_xy, radius, size):
    dist = np.abs(complex_points(points_xy) - CENTRE)
    assert np.max(np.abs(dist - radius)) < TOL * size


@pytest.mark.parametrize("turning", list(Turning))
@pytest.mark.parametrize("offset_mm", [0.0, 5.0, -5.0])
def test_harmonic_motion_with_flat_face_gives_the_disk(turning, offset_mm):
    base = DISK - ECC
    harmonic = motion_from_function(
        lambda th: (ECC * (1 - np.cos(th)), ECC * np.sin(th), ECC * np.cos(th))
    )
    a = analyse(Cam(harmonic, TranslatingFlat(base, offset=offset_mm * MM), turning))
    assert_circle(a.profile, base + ECC, base + ECC)
    assert np.max(np.abs(a.profile_radius - (base + ECC))) < TOL * DISK
    assert not a.cusp
    # The contact sweeps the face by max s' − min s' = 2ε (DESIGN §5).
    assert a.face.width == pytest.approx(2 * ECC, rel=1e-12)


def test_harmonic_motion_with_roller_is_a_limacon_not_a_circle():
    prime = 50 * MM
    harmonic = motion_from_function(
        lambda th: (ECC * (1 - np.cos(th)), ECC * np.sin(th), ECC * np.cos(th))
    )
    a = analyse(Cam(harmonic, TranslatingRoller(prime, ROLLER)))
    polar = np.abs(complex_points(a.pitch))
    assert np.max(np.abs(polar - (prime + ECC * (1 - np.cos(a.theta))))) < TOL * prime
    # Out of round against the best circle about the disk centre: by about
    # ε² sin²θ / (2(Rp + ε)) — far above the tolerance of the round cases.
    dist = np.abs(complex_points(a.pitch) - CENTRE)
    assert np.ptp(dist) > 0.5 * ECC**2 / (2 * (prime + ECC))


@pytest.mark.parametrize("turning", list(Turning))
@pytest.mark.parametrize("offset_mm", [0.0, 6.0])
def test_disk_with_translating_roller(turning, offset_mm):
    sigma, e = int(turning), offset_mm * MM
    th = sp.symbols("theta", real=True)
    gamma = sigma * th - sp.pi / 2
    reach = DISK + ROLLER
    y = ECC * sp.sin(gamma) + sp.sqrt(reach**2 - (sigma * e - ECC * sp.cos(gamma)) ** 2)
    y0 = float(y.subs(th, 0))
    follower = TranslatingRoller(math.hypot(y0, e), ROLLER, e)
    a = analyse(Cam(sympy_motion(y - y0, th), follower, turning))
    assert_circle(a.pitch, reach, reach)
    assert_circle(a.profile, DISK, reach)
    assert not a.undercut
    # The contact normal is the line of centres (two circles in contact).
    c = ECC * np.exp(1j * (sigma * a.theta - math.pi / 2))
    P = complex_points(a.pitch) * np.exp(1j * sigma * a.theta)
    n = (P - c) / np.abs(P - c)
    want = np.arctan2(-sigma * n.real, n.imag)  # φ = atan2(σ·(w × n), w·n) with w = +y
    assert np.max(np.abs(a.pressure_angle - want)) < 1e-9


@pytest.mark.parametrize("turning", list(Turning))
def test_disk_with_oscillating_roller(turning):
    sigma = int(turning)
    d, arm = 120 * MM, 90 * MM
    th = sp.symbols("theta", real=True)
    gamma = sigma * th - sp.pi / 2
    qx, qy = d - ECC * sp.cos(gamma), -ECC * sp.sin(gamma)  # pivot seen from the disk centre
    q2 = qx**2 + qy**2
    reach = DISK + ROLLER
    psi = sp.acos((q2 + arm**2 - reach**2) / (2 * arm * sp.sqrt(q2))) - sp.atan2(qy, qx)
    psi0 = float(psi.subs(th, 0))
    prime = abs(d - arm * np.exp(-1j * psi0))
    follower = OscillatingRoller(d, arm, prime, ROLLER)
    assert follower.initial_arm_angle == pytest.approx(psi0, abs=1e-12)
    a = analyse(Cam(sympy_motion(psi - psi0, th), follower, turning))
    assert_circle(a.pitch, reach, reach)
    assert_circle(a.profile, DISK, reach)
    c = ECC * np.exp(1j * (sigma * a.theta - math.pi / 2))
    P = complex_points(a.pitch) * np.exp(1j * sigma * a.theta)
    n = (P - c) / np.abs(P - c)
    w = 1j * np.exp(-1j * (psi0 + a.lift))  # the roller centre travels square to the arm
    want = np.arctan2(sigma * np.imag(np.conj(w) * n), np.real(np.conj(w) * n))
    assert np.max(np.abs(a.pressure_angle - want)) < 1e-9


@pytest.mark.parametrize("turning", list(Turning))
def test_disk_with_oscillating_flat_face(turning):
    sigma = int(turning)
    d, offset = 120 * MM, 5 * MM
    th = sp.symbols("theta", real=True)
    gamma = sigma * th - sp.pi / 2
    A, B = d - ECC * sp.cos(gamma), ECC * sp.sin(gamma)
    psi = sp.atan2(B, A) + sp.asin((DISK + offset) / sp.sqrt(A**2 + B**2))
    psi0 = float(psi.subs(th, 0))
    follower = OscillatingFlat(d, d * math.sin(psi0) - offset, offset)
    a = analyse(Cam(sympy_motion(psi - psi0, th), follower, turning))
    assert_circle(a.profile, DISK, DISK)
    assert np.max(np.abs(a.profile_radius - DISK)) < TOL * DISK
    assert not a.cusp
