#!/usr/bin/env python3
"""Independent reference bound levels for model diatomic potential curves.

Written for the rungs project as an outside check of its solver.  It does not
use, call or follow the rungs solver; it needs only numpy and scipy
(``pip install numpy scipy``).  Run it from anywhere:

    python3 tools/reference_levels.py            # writes tests/data/reference_levels.csv
    python3 tools/reference_levels.py --out F.csv --quick   # (--quick: skip the shooting check)

Units: Hartree atomic units (hbar = m_e = 1): energies in hartree, lengths in
bohr, masses (reduced masses mu) in electron masses.

Problem
-------
Radial equation, rotational quantum number J (Omega = 0):

    -1/(2 mu) u''(r) + [V(r) + J(J+1)/(2 mu r^2)] u = E u,   u(0) = 0, u bounded,

bound levels are the eigenvalues below the limit V(infinity) (0 for every curve
here).

Method 1 (the tabulated values): sinc-DVR in x = ln r
------------------------------------------------------
With r = e^x and u(r) = r^(1/2) phi(x) the equation becomes exactly

    -1/(2 mu) phi'' + [(J+1/2)^2/(2 mu) + r^2 V(r)] phi = E r^2 phi,

and with psi = r phi (so that int |u|^2 dr = int |psi|^2 dx) the symmetric form

    r^-1 [-1/(2 mu) d^2/dx^2] r^-1 psi + [V(r) + (J+1/2)^2/(2 mu r^2)] psi = E psi.

On a uniform grid x_i = x_min + i h the operator -d^2/dx^2 is represented by
the sinc (Whittaker cardinal) basis: T_ii = pi^2/(3 h^2),
T_ij = 2 (-1)^(i-j) / (h^2 (i-j)^2).  The matrix
A_ij = T_ij/(2 mu r_i r_j) + delta_ij [V(r_i) + (J+1/2)^2/(2 mu r_i^2)]
is real symmetric and is diagonalised densely (scipy.linalg.eigh).  The
logarithmic grid puts points where the local de Broglie wavelength is short
(the well) and reaches r ~ 10^4..10^6 bohr with a few hundred extra points, so
levels bound by 1e-8 of the well depth keep a box many decay lengths long.

Grid choice (automatic, per curve and J):
  * r_min: the WKB action int kappa dr from r_min to the inner turning point
    at the limit energy is S_in (25 in run 1, 40 in run 2), i.e. the
    wavefunction there is below e^-25 of its size in the well.
  * r_max: the WKB action int kappa dr from the outer turning point of the
    least-bound level to r_max is S_out = 25 (run 1); iterated with the level's
    energy until stable.  Run 2 doubles r_max.
  * step: h = min(pi/(4 K), 0.02) in run 1, with K = max_r r k(r) the largest
    local wavenumber in x at the limit energy (for the Kratzer curve: at the
    first level not asked for); run 2 halves it.

Rounding: a dense diagonalisation of A itself carries an absolute error of
about 2.2e-16 ||A||, and ||A|| is set by the grid points deep in the inner
wall (entries ~ 1/(mu h^2 r_min^2)), far above the well depth.  So the
equivalent generalized form H' phi = E M phi, H' = T/(2 mu) +
diag(r^2 V + (J+1/2)^2/(2 mu)), M = diag(r^2), is shifted below the
spectrum and inverted: K = H' - s M = L L^T (Cholesky; positive definite
for s < min V_eff), C = W W^T with W = L^-1 diag(r), C z = z/(E - s), and
the eigenvalues of C come from scipy.linalg.eigh.  The rounding floor of
level v is estimated as
    4 eps [(E_v - s)^2/(E_0 - s) + |s|] + eps (2 pi^2/(3 h^2)) <r^-2>_v/(2 mu)
(eps = 2.2e-16; the last term, the rounding of the kinetic entries, grows
as h shrinks, which is why h is not made smaller than it needs to be).
Uncertainty of a level = max(|E_run2 - E_run1|, floor of run 2); the value
tabulated is run 2's.  For the Kratzer curve the tabulated levels agree
with the analytic ones to ~1e-16 of the well depth.

Method 2 (checks, independent of the matrix): ODE integration in x
--------------------------------------------------------------------
phi'' = Q(x) phi, Q = (J+1/2)^2 + 2 mu r^2 (V(r) - E), integrated with
scipy's DOP853 (rtol 1e-13) from phi(x_min) = 0.
  * Level count (Sturm oscillation theorem): the number of levels below the
    limit equals the number of zeros on (0, inf) of the regular solution at
    the limit energy.  The solution is integrated to a radius R where the
    curve is its pure tail; beyond R the zero-energy solution is known in
    closed form: for a tail -C_m/r^m, phi = A J_nu(z) + B Y_nu(z) with
    z = (2 sqrt(2 mu C_m)/(m-2)) r^-((m-2)/2), nu = (2J+1)/(m-2); for a
    short-range (exponential) tail, phi = a e^((J+1/2)x) + b e^(-(J+1/2)x).
    Matching phi, phi' at R gives the coefficients and shows whether one more
    zero lies beyond R (for z_R < 0.3 there is at most one).  No box limits
    this count.  For J = 0 and m > 3 it also gives the scattering length.
  * Level index: the number of zeros of the solution at E_v +/- a small shift
    (integrated deep into the outer forbidden region) must be v+1 / v.
  * Shooting: the least-bound level of each curve and J is recomputed as the
    root in E of phi(R_far) (brentq), with R_far deep in the forbidden region.

Curves (exact parameters; see CURVES below and the CSV header).
"""

import argparse
import math
import os
import time

os.environ.setdefault('OPENBLAS_NUM_THREADS', '1')   # small matrices: one thread is enough

import numpy as np
import scipy
import scipy.linalg as sl
from scipy import special
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

EPS_MACH = np.finfo(float).eps

# ----------------------------------------------------------------------------
# Curves
# ----------------------------------------------------------------------------


class Curve:
    """A potential curve with its reduced mass and what is known of its tail.

    tail: ('power', m, C)  V ~ -C/r^m at large r (m > 2)
          ('short',)       V vanishes faster than any power (exponential)
          ('coulomb',)     V ~ -Z/r: infinitely many levels
    """

    def __init__(self, case, label, mu, V, dV, r_ref, tail, js, n=None, m=None,
                 nwanted=None, exact=None, depth=None):
        self.case, self.label, self.mu = case, label, mu
        self.V, self.dV, self.r_ref, self.tail = V, dV, r_ref, tail
        self.js, self.n, self.m = js, n, m
        self.nwanted = nwanted      # only the lowest nwanted levels (Coulomb tail)
        self.exact = exact          # exact(J, v) -> energy, when known
        self.depth = depth          # well depth, for relative statements


def lennard_jones(case, label, n, m, eps, sigma, mu, js):
    re = sigma * (n / m) ** (1.0 / (n - m))
    c = eps / (n - m)

    def V(r):
        return c * (m * (re / r) ** n - n * (re / r) ** m)

    def dV(r):
        return c * n * m * (-(re / r) ** n + (re / r) ** m) / r

    Cm = eps * n / (n - m) * re ** m          # V -> -Cm / r^m
    return Curve(case, label, mu, V, dV, re, ('power', m, Cm), js, n=n, m=m,
                 depth=eps)


def double_well():
    D, a, re, H, rb, w = 0.02, 0.7, 4.0, 0.012, 4.6, 0.35

    def V(r):
        return D * ((1.0 - np.exp(-a * (r - re))) ** 2 - 1.0) + H * np.exp(-((r - rb) / w) ** 2)

    def dV(r):
        e = np.exp(-a * (r - re))
        return 2.0 * D * a * (1.0 - e) * e - 2.0 * H * (r - rb) / w ** 2 * np.exp(-((r - rb) / w) ** 2)

    return Curve('B', 'double-well', 5000.0, V, dV, re, ('short',), [0], depth=D)


def kratzer():
    eps, re, mu = 1e-3, 3.0, 2000.0

    def V(r):
        return eps * ((re / r) ** 2 - 2.0 * re / r)

    def dV(r):
        return eps * (-2.0 * re ** 2 / r ** 3 + 2.0 * re / r ** 2)

    def exact(J, v):
        # eps re^2/r^2 joins the centrifugal term: l'(l'+1) = J(J+1) + 2 mu eps re^2,
        # leaving a hydrogen-like problem with Z = 2 eps re and mass mu:
        # E_v = -mu Z^2 / (2 (v + l' + 1)^2),  l' + 1/2 = sqrt((J+1/2)^2 + 2 mu eps re^2)
        lp_half = math.sqrt((J + 0.5) ** 2 + 2.0 * mu * eps * re ** 2)
        return -2.0 * mu * eps ** 2 * re ** 2 / (v + 0.5 + lp_half) ** 2

    return Curve('C', 'Kratzer', mu, V, dV, re, ('coulomb',), [0, 3], nwanted=6,
                 exact=exact, depth=eps)


def build_curves():
    curves = [
        lennard_jones('A1', 'Ne2-like', 12, 6, 1.33956256435610935e-4, 5.19674684272086829,
                      1.82219945033396580e4, [0, 2]),
        lennard_jones('A2', 'Ar2-like', 12, 6, 4.53355357664737737e-4, 6.33058251749632994,
                      3.64234840373136467e4, [0, 2]),
    ]
    eps, sigma = 1e-4, 6.0
    for n in (8, 10, 12, 14):
        for B in (30, 100, 380, 460, 1000, 3000):
            mu = B / (2.0 * eps * sigma ** 2)
            curves.append(lennard_jones('A3', str(B), n, 6, eps, sigma, mu, [0]))
    curves.append(lennard_jones('A4', 'C3-tail', 12, 3, 1e-3, 5.0, 5000.0, [0]))
    curves.append(lennard_jones('A4', 'C4-tail', 12, 4, 1e-3, 5.0, 5000.0, [0]))
    curves.append(double_well())
    curves.append(kratzer())
    return curves


# ----------------------------------------------------------------------------
# Grid choice by WKB actions
# ----------------------------------------------------------------------------

def q_u(cv, J, E, r):
    """2 mu (V_eff - E) for u(r): positive where classically forbidden."""
    return 2.0 * cv.mu * (cv.V(r) - E) + J * (J + 1) / r ** 2


def r_min_for(cv, J, S, E=0.0):
    x = np.linspace(math.log(cv.r_ref) - 12.0, math.log(cv.r_ref) + 1.0, 1300001)
    r = np.exp(x)
    q = q_u(cv, J, E, r)
    it = int(np.argmax(q < 0))          # first classically allowed point
    kap = np.sqrt(np.maximum(q[:it + 1], 0.0)) * r[:it + 1]
    seg = 0.5 * (kap[1:] + kap[:-1]) * np.diff(x[:it + 1])
    cum = np.concatenate([np.cumsum(seg[::-1])[::-1], [0.0]])   # action r_i -> turning point
    ok = np.where(cum >= S)[0]
    if len(ok) == 0:
        raise RuntimeError('r_min search range too short')
    return float(r[ok[-1]])


def r_max_for(cv, J, E, S):
    """Smallest r whose action from the outer turning point of E reaches S."""
    x = np.linspace(math.log(cv.r_ref), 46.0, 2000001)
    r = np.exp(x)
    q = q_u(cv, J, E, r)
    allowed = np.where(q < 0)[0]
    io = int(allowed[-1]) + 1 if len(allowed) else 0
    kap = np.sqrt(np.maximum(q[io:], 0.0)) * r[io:]
    cum = np.concatenate([[0.0], np.cumsum(0.5 * (kap[1:] + kap[:-1]) * np.diff(x[io:]))])
    j = int(np.argmax(cum >= S))
    if cum[j] < S:
        return float(r[-1])
    return float(r[io + j])


def k_max_x(cv, J, rmin, rmax, E=0.0):
    r = np.exp(np.linspace(math.log(rmin), math.log(rmax), 400001))
    q = -q_u(cv, J, E, r) * r * r
    return math.sqrt(max(float(q.max()), 0.0))


# ----------------------------------------------------------------------------
# Method 1: sinc DVR in x = ln r
# ----------------------------------------------------------------------------

def dvr(cv, J, rmin, rmax, h, nlevels=None, vectors=False):
    """Levels below the limit (or the lowest nlevels) on the x = ln r sinc grid.

    Solved in the generalized form H' phi = E M phi, H' = T/(2 mu) +
    diag(r^2 V + (J+1/2)^2/(2 mu)), M = diag(r^2), which is the symmetric
    form above with psi = r phi.  To keep the rounding error on the scale
    of the well rather than of the largest matrix entry (grid points deep
    in the inner wall, where r is small, carry entries up to ~1/(mu h^2
    r_min^2)), it is shifted below the spectrum and inverted:
    K = H' - s M = L L^T (Cholesky; K is positive definite for
    s < min V_eff), C = W W^T with W = L^-1 diag(r), and
    C z = z / (E - s).  The absolute rounding error of E_v is then about
    eps (E_v - s)^2 / (E_0 - s).
    Returns (energies, N, rounding floors per level[, x, psi vectors])."""
    x0, x1 = math.log(rmin), math.log(rmax)
    N = int(math.ceil((x1 - x0) / h)) + 1
    x = x0 + h * np.arange(N)
    r = np.exp(x)
    k = np.arange(N, dtype=float)
    tk = np.empty(N)
    tk[0] = math.pi ** 2 / 3.0
    tk[1:] = 2.0 * np.where(np.arange(1, N) % 2 == 0, 1.0, -1.0) / k[1:] ** 2
    tk /= 2.0 * cv.mu * h * h
    veff = cv.V(r) + (J + 0.5) ** 2 / (2.0 * cv.mu * r * r)
    vmin = float(veff.min())
    shift = min(vmin, 0.0) - 0.1 * abs(vmin)
    Kmat = sl.toeplitz(tk)
    Kmat[np.diag_indices(N)] += r * r * (veff - shift)
    L = sl.cholesky(Kmat, lower=True, overwrite_a=True)
    W = sl.solve_triangular(L, np.diag(r), lower=True, overwrite_b=True)
    C = W @ W.T
    if nlevels is None:
        kw = dict(subset_by_value=(1.0 / (0.0 - shift), np.inf))
    else:
        kw = dict(subset_by_index=(N - nlevels, N - 1))
    if vectors:
        lam, z = sl.eigh(C, driver='evr', **kw)
    else:
        lam = sl.eigh(C, eigvals_only=True, driver='evr', **kw)
    order = np.argsort(-lam)              # largest 1/(E - s) first = lowest E
    lam = lam[order]
    E = shift + 1.0 / lam
    lam_top = lam[0] if len(lam) else 0.0   # = 1/(E_0 - s), the norm of C
    floor = 4.0 * EPS_MACH * ((E - shift) ** 2 * lam_top + abs(shift))
    if vectors:
        phi = sl.solve_triangular(L, z[:, order], lower=True, trans='T')
        psi = r[:, None] * phi
        psi /= np.sqrt(np.sum(psi * psi, axis=0))
        # rounding of the kinetic entries (row sums of |T| = 2 pi^2/(3 h^2)/(2 mu)),
        # felt by a level through <r^-2>
        inv_r2 = np.sum(psi * psi / (r * r)[:, None], axis=0)
        floor += EPS_MACH * 2.0 * math.pi ** 2 / (3.0 * h * h * 2.0 * cv.mu) * inv_r2
        return E, N, floor, x, psi
    return E, N, floor


# ----------------------------------------------------------------------------
# Method 2: ODE integration in x (node counts, shooting)
# ----------------------------------------------------------------------------

def integrate(cv, J, E, x0, x1, max_step):
    mu, L2 = cv.mu, (J + 0.5) ** 2

    def rhs(x, y):
        r = math.exp(x)
        return [y[1], (L2 + 2.0 * mu * r * r * (float(cv.V(r)) - E)) * y[0]]

    def zero(x, y):
        return y[0]

    sol = solve_ivp(rhs, (x0, x1), [0.0, 1e-30], method='DOP853', rtol=1e-13,
                    atol=1e-300, events=zero, max_step=max_step,
                    first_step=1e-6)
    ev = sol.t_events[0]
    nz = int(np.sum(ev > x0 + 1e-9))       # drop the start point phi(x0) = 0
    return nz, sol.y[0, -1], sol.y[1, -1]


def count_at_limit(cv, J, rmin, max_step):
    """Number of levels below the limit from the zeros of the regular
    zero-energy solution (Sturm), with the tail beyond R in closed form.
    Returns (count, info) with info a short text (scattering length etc.)."""
    kind = cv.tail[0]
    if kind == 'power':
        _, m, C = cv.tail
        p = (m - 2) / 2.0
        nu = (2 * J + 1) / (m - 2.0)
        z0 = 2.0 * math.sqrt(2.0 * cv.mu * C) / (m - 2.0)
        xR = max(math.log(z0 / 0.3) / p, math.log(1e3 * cv.r_ref))
    else:
        xR = math.log(200.0 * cv.r_ref)
    nz, ph, dph = integrate(cv, J, 0.0, math.log(rmin), xR, max_step)
    if kind == 'power':
        z = z0 * math.exp(-p * xR)
        Jn, Yn = special.jv(nu, z), special.yv(nu, z)
        Jd, Yd = special.jvp(nu, z), special.yvp(nu, z)
        # ph = A Jn + B Yn ; dph = -p z (A Jd + B Yd)
        M = np.array([[Jn, Yn], [-p * z * Jd, -p * z * Yd]])
        A, B = np.linalg.solve(M, [ph, dph])
        far_sign = -np.sign(B)          # Y_nu -> -inf as z -> 0
        extra = int(np.sign(ph) != far_sign)
        info = 'R=%.3g bohr, zeros inside %d, beyond %d' % (math.exp(xR), nz, extra)
        if J == 0 and m > 3:
            a = (A / B) * math.pi * (z0 / 2.0) ** (2 * nu) / (special.gamma(nu) * special.gamma(nu + 1))
            info += ', scattering length %.8g bohr' % a
    else:
        s = J + 0.5
        alpha = 0.5 * (ph + dph / s) * math.exp(-s * xR)
        extra = int(np.sign(ph) != np.sign(alpha))
        info = 'R=%.3g bohr, zeros inside %d, beyond %d' % (math.exp(xR), nz, extra)
        if J == 0:
            beta = 0.5 * (ph - dph / s) * math.exp(s * xR)
            info += ', scattering length %.8g bohr' % (-beta / alpha)
    return nz + extra, info


def zeros_below(cv, J, E, rmin, max_step, S=35.0):
    """Zeros of the regular solution at E < limit, integrated S actions into
    the outer forbidden region: the number of levels below E."""
    R = r_max_for(cv, J, E, S)
    nz, ph, _ = integrate(cv, J, E, math.log(rmin), math.log(R), max_step)
    return nz, ph


def shoot(cv, J, E_guess, rmin, max_step, width):
    """Root in E of phi(R_far) near E_guess (R_far fixed, deep in the
    forbidden region of E_guess)."""
    R = r_max_for(cv, J, E_guess, 35.0)
    x0, x1 = math.log(rmin), math.log(R)

    def f(E):
        return integrate(cv, J, E, x0, x1, max_step)[1]

    lo, hi = E_guess - width, E_guess + width
    flo, fhi = f(lo), f(hi)
    if np.sign(flo) == np.sign(fhi):
        return float('nan')
    return brentq(f, lo, hi, xtol=1e-30, rtol=4 * EPS_MACH, maxiter=200)


# ----------------------------------------------------------------------------
# Double-well stationary points
# ----------------------------------------------------------------------------

def stationary_points(cv, a=1.0, b=30.0):
    r = np.linspace(a, b, 200001)
    d = cv.dV(r)
    pts = []
    for i in np.where(np.sign(d[1:]) != np.sign(d[:-1]))[0]:
        r0 = brentq(cv.dV, r[i], r[i + 1], xtol=1e-15)
        kind = 'minimum' if d[i] < 0 else 'maximum'
        pts.append((kind, r0, float(cv.V(r0))))
    return pts


# ----------------------------------------------------------------------------
# One curve and J
# ----------------------------------------------------------------------------

def solve_case(cv, J, do_shoot=True, log=print):
    t0 = time.time()
    S_in1, S_in2, S_out = 25.0, 40.0, 25.0
    rmin1, rmin2 = r_min_for(cv, J, S_in1), r_min_for(cv, J, S_in2)
    nw = cv.nwanted

    # start from a box for a level bound by 1e-6 of the depth, then follow
    # the least-bound level found
    E_last = -1e-6 * cv.depth
    rmax1 = r_max_for(cv, J, E_last, S_out)
    E_top = 0.0
    if nw is not None:
        # only the lowest nw levels: the step need only resolve the next one
        E_top = dvr(cv, J, rmin1, 100.0 * cv.r_ref, 0.01, nlevels=nw + 1)[0][-1]
        rmax1 = r_max_for(cv, J, E_top, S_out)
    K = k_max_x(cv, J, rmin2, min(rmax1, 1e3 * cv.r_ref), E_top)
    h1 = min(math.pi / (4.0 * K), 0.02)
    # zero-energy node count: the target number of levels
    max_step = min(0.05, math.pi / (3.0 * K))
    if cv.tail[0] == 'coulomb':
        n_node, node_info = None, 'infinitely many levels (Coulomb tail)'
    else:
        n_node, node_info = count_at_limit(cv, J, rmin2, max_step)
    for it in range(20):
        w1, N1, _ = dvr(cv, J, rmin1, rmax1, h1, nlevels=nw)
        if nw is None and n_node is not None and len(w1) < n_node:
            rmax1 *= 8.0                 # a level pushed above the limit by the box
            continue
        new = r_max_for(cv, J, w1[-1], S_out)
        if abs(new / rmax1 - 1.0) < 0.02:
            break
        rmax1 = new
    else:
        raise RuntimeError('r_max did not settle')
    rmax2 = 2.0 * rmax1
    h2 = h1 / 2.0
    w2, N2, floor, _, _ = dvr(cv, J, rmin2, rmax2, h2, nlevels=nw, vectors=True)
    n = min(len(w1), len(w2))
    unc = np.full(len(w2), np.inf)
    unc[:n] = np.maximum(np.abs(w2[:n] - w1[:n]), floor[:n])

    notes = []
    if nw is None:
        count = len(w2)
        if n_node is not None and n_node != count:
            notes.append('COUNT MISMATCH: DVR %d, zero-energy zeros %d' % (count, n_node))
        if len(w1) != len(w2):
            notes.append('run 1 found %d levels, run 2 %d' % (len(w1), len(w2)))
    else:
        count = None

    # level index check by zeros at E_v -/+ a small shift
    idx_ok = True
    for v, E in enumerate(w2):
        gap_lo = E - w2[v - 1] if v > 0 else abs(E)
        gap_hi = (w2[v + 1] - E) if v + 1 < len(w2) else abs(E)
        d = 0.25 * min(gap_lo, gap_hi)
        if v == len(w2) - 1 and nw is None:
            d = 0.25 * min(gap_lo, abs(E))
        nlo, _ = zeros_below(cv, J, E - d, rmin2, max_step)
        nhi, _ = zeros_below(cv, J, E + d, rmin2, max_step)
        if (nlo, nhi) != (v, v + 1):
            idx_ok = False
            notes.append('index check failed at v=%d: zeros %d/%d' % (v, nlo, nhi))
    if nw is not None:     # nothing else lies between the wanted levels and the next one
        w7 = dvr(cv, J, rmin2, rmax2, h2, nlevels=nw + 1)[0]
        nmid, _ = zeros_below(cv, J, 0.5 * (w7[-2] + w7[-1]), rmin2, max_step)
        if nmid != nw:
            idx_ok = False
            notes.append('zeros below the gap after v=%d: %d' % (nw - 1, nmid))

    shot = None
    if do_shoot and len(w2):
        E = w2[-1]
        width = max(1e3 * unc[-1], 1e-10 * abs(E))
        gap = (E - w2[-2]) if len(w2) > 1 else abs(E)
        if nw is None:
            gap = min(gap, abs(E))
        width = min(width, 0.25 * gap)
        shot = shoot(cv, J, E, rmin2, max_step, width)

    res = dict(cv=cv, J=J, E=w2, unc=unc, count=count, dmax=float(np.max(np.abs(w2[:n] - w1[:n]))), n_node=n_node,
               node_info=node_info, idx_ok=idx_ok, notes=notes, shot=shot,
               grid=(rmin1, rmax1, h1, N1, rmin2, rmax2, h2, N2), floor=float(np.max(floor)),
               time=time.time() - t0)
    return res


# ----------------------------------------------------------------------------
# Output
# ----------------------------------------------------------------------------

def fmt_mu(mu):
    return repr(float(mu))


HEADER = """\
# Reference bound vibrational levels for model diatomic potential curves:
# computed for the rungs project by an independent Python program (tools/reference_levels.py;
# method: sinc-DVR in x = ln r with the Liouville transform, dense scipy.linalg.eigh; grids and
# convergence check (step halved, outer box doubled) described below; date 2026-12-05);
# not from the rungs solver.
#
# Units: hartree atomic units (hbar = m_e = 1): energies hartree, lengths bohr, mu in electron masses.
# Equation: -1/(2 mu) u'' + [V(r) + J(J+1)/(2 mu r^2)] u = E u, u(0) = 0, u bounded; Omega = 0.
# Bound level: E below the limit V(inf) = 0 for every curve here.
#
# Curves:
#  A  Lennard-Jones (n, m): V = eps/(n-m) [m (re/r)^n - n (re/r)^m], re = sigma (n/m)^(1/(n-m)).
#     A1 Ne2-like (12,6): mu = 1.82219945033396580e4, eps = 1.33956256435610935e-4, sigma = 5.19674684272086829; J = 0, 2
#     A2 Ar2-like (12,6): mu = 3.64234840373136467e4, eps = 4.53355357664737737e-4, sigma = 6.33058251749632994; J = 0, 2
#     A3 (n,6), n = 8,10,12,14: eps = 1e-4, sigma = 6.0, mu = B/(2 eps sigma^2) for
#        B = 2 mu eps sigma^2 = 30,100,380,460,1000,3000 (column B_or_label); J = 0
#     A4 (12,3) label C3-tail and (12,4) label C4-tail: eps = 1e-3, sigma = 5.0, mu = 5000; J = 0
#  B  double well: V = D((1 - exp(-a (r - re)))^2 - 1) + H exp(-((r - rb)/w)^2),
#     D = 0.02, a = 0.7, re = 4.0, H = 0.012, rb = 4.6, w = 0.35, mu = 5000; J = 0.
#     v numbers all levels of both wells together in order of energy.
#  C  Kratzer: V = eps ((re/r)^2 - 2 re/r), eps = 1e-3, re = 3.0, mu = 2000; J = 0, 3.
#     Infinitely many levels: only the lowest 6 are listed (count column: inf).
#
# Method: r = e^x, u = r^(1/2) phi; psi = r phi obeys
#   r^-1 [-1/(2mu) d2/dx2] r^-1 psi + [V + (J+1/2)^2/(2 mu r^2)] psi = E psi  (exact, symmetric);
#   sinc-DVR on a uniform x grid, T_ii = pi^2/(3h^2), T_ij = 2(-1)^(i-j)/(h^2 (i-j)^2); solved as the
#   generalized problem shifted below the spectrum and inverted (Cholesky), so that rounding stays on
#   the scale of the well depth, dense scipy.linalg.eigh.
# Grids: run 1: r_min where the WKB action to the inner turning point is 25, r_max where the action
#   beyond the outer turning point of the least-bound level is 25, h = min(pi/(4 K), 0.02) with K the
#   largest local wavenumber in x; run 2: h halved, r_max doubled, r_min at action 40.
# Value: run 2.  Uncertainty: max(|E_run2 - E_run1|, rounding floor estimated per level; see the script).
# Checks (by direct ODE integration in x, DOP853 rtol 1e-13, independent of the matrix):
#   count = zeros of the regular solution at the limit energy (Sturm), the tail beyond R in closed form
#   (Bessel functions for -C_m/r^m, exponentials for the short-range curve): agrees with the DVR count
#   for every case below; every level's index v checked by the zeros at E_v -/+ a quarter gap;
#   the least-bound level of every case recomputed by shooting (brentq on phi(R) with R deep in the
#   forbidden region): differences listed below.
"""


def write_csv(path, results, extra_lines):
    with open(path, 'w') as f:
        f.write(HEADER)
        for line in extra_lines:
            f.write('# ' + line + '\n')
        f.write('#\n')
        f.write('case,n,m,B_or_label,mu,J,v,energy_hartree,uncertainty_hartree,count_for_this_case_and_J\n')
        for res in results:
            cv = res['cv']
            cnt = 'inf' if res['count'] is None else str(res['count'])
            for v, (E, u) in enumerate(zip(res['E'], res['unc'])):
                f.write('%s,%s,%s,%s,%s,%d,%d,%.16e,%.1e,%s\n' % (
                    cv.case, '' if cv.n is None else cv.n, '' if cv.m is None else cv.m,
                    cv.label, fmt_mu(cv.mu), res['J'], v, E, u, cnt))


def main():
    ap = argparse.ArgumentParser(description=__doc__.split('\n')[0])
    here = os.path.dirname(os.path.abspath(__file__))
    ap.add_argument('--out', default=os.path.join(here, '..', 'tests', 'data', 'reference_levels.csv'))
    ap.add_argument('--quick', action='store_true', help='skip the shooting check')
    ap.add_argument('--only', default=None, help='only cases whose case/label contains this')
    args = ap.parse_args()

    T0 = time.time()
    results, extra = [], []
    for cv in build_curves():
        if args.only and args.only not in cv.case + '/' + cv.label + '/%s' % cv.n:
            continue
        for J in cv.js:
            res = solve_case(cv, J, do_shoot=not args.quick)
            results.append(res)
            E, unc = res['E'], res['unc']
            rmin1, rmax1, h1, N1, rmin2, rmax2, h2, N2 = res['grid']
            name = '%s %s%s J=%d' % (cv.case, cv.label,
                                     '' if cv.n is None else ' n=%d m=%d' % (cv.n, cv.m), J)
            cnt = 'inf' if res['count'] is None else res['count']
            which = 'least-bound' if cv.nwanted is None else 'highest listed'
            line = (('%s: count %s; ' + which + ' v=%d binding %.6e hartree (%.3e of depth); '
                     'max unc %.1e (max |run2-run1| %.1e, rounding floor %.1e); run1 r=[%.4g,%.4g] h=%.4g N=%d; run2 r=[%.4g,%.4g] h=%.4g N=%d; %.1f s')
                    % (name, cnt, len(E) - 1, -E[-1], -E[-1] / cv.depth, unc.max(), res['dmax'], res['floor'],
                       rmin1, rmax1, h1, N1, rmin2, rmax2, h2, N2, res['time']))
            print(line, flush=True)
            extra.append(line)
            sub = '    zero-energy check: %s' % res['node_info']
            if res['shot'] is not None:
                sub += '; shooting - DVR for v=%d: %.2e hartree' % (len(E) - 1, res['shot'] - E[-1])
            if res['idx_ok']:
                sub += '; indices ok'
            print(sub, flush=True)
            extra.append(sub)
            for nline in res['notes']:
                print('    NOTE ' + nline)
                extra.append('    NOTE ' + nline)
            if cv.exact is not None:
                for v, e in enumerate(E):
                    ex = cv.exact(J, v)
                    s = '    analytic J=%d v=%d: %.16e  (DVR - analytic = %.1e)' % (J, v, ex, e - ex)
                    print(s)
                    extra.append(s)
            if cv.case == 'B':
                pts = stationary_points(cv)
                for kind, r0, V0 in pts:
                    s = '    %s of V at r = %.12f bohr, V = %.15e hartree' % (kind, r0, V0)
                    print(s)
                    extra.append(s)
                # where each level lives
                w, N, _, x, vec = dvr(cv, J, rmin2, rmax2, h2, vectors=True)
                rmax_pt = [r0 for kind, r0, V0 in pts if kind == 'maximum'][0]
                Vtop = [V0 for kind, r0, V0 in pts if kind == 'maximum'][0]
                r = np.exp(x)
                for v in range(len(w)):
                    p_in = float(np.sum(vec[r < rmax_pt, v] ** 2))
                    where = ('above the barrier top' if w[v] > Vtop else
                             'inner well' if p_in > 0.5 else 'outer well')
                    s = '    v=%d E=%.10e: %s (probability inside r < %.4f: %.4f)' % (
                        v, w[v], where, rmax_pt, p_in)
                    print(s)
                    extra.append(s)
    total = time.time() - T0
    extra.append('total run time %.0f s (one thread, numpy %s, scipy %s)' % (total, np.__version__, scipy.__version__))
    write_csv(args.out, results, extra)
    print('wrote', os.path.abspath(args.out), 'in %.0f s' % total)


if __name__ == '__main__':
    main()
