"""An independent, plain per-point scalar implementation of the engine_air chain (method.md sections 1-7).

Written from the method, not from ``engine_air``'s vectorised functions: it uses
only ``math``, ``scipy.optimize.brentq`` (inverse mass-flow function, weak
oblique-shock wave angle from the theta-beta-M relation) and the project's
``engine_air.project.model`` dataclasses (inlet, rating table, limits, case).

It is the reference that ``tests/test_scalar_agreement.py`` holds the
vectorised ``engine_air.evaluate_conditions`` against, and the slow
baseline of ``bench/bench_map.py``.

Where the method leaves a detail open, this model makes the same documented
choice as the package (so that the two can be compared point by point):
- below M0 = 0.05 the stream tube is undefined: MFR, spillage and drag are NaN
  and the throat and face use p_t0 = p0;
- a choked face is taken as sonic (M2 = 1) and passes its choked corrected flow;
- supercritical: captured flow is held at MFR_max and recovery scales by MFR_max/MFR;
- throat: MFP_th = W sqrt(T_t0) / (A_th pi_ext p_t0); at or above choking, W and
  recovery scale down by the same factor;
- subsonic flight: the reported MFR_max is the throat's choked flow over the
  capture flow rho0 V0 A_c;
- the first detached ramp (local Mach supersonic) stands behind a bow shock taken straight at the wave angle
  of maximum deflection from its leading edge, turning the flow by the maximum deflection (method section 10);
- external-ramp inlets in supersonic flight: pre-entry drag = the pressure on the dividing stream line behind
  each ramp shock plus the momentum balance of the spillage behind the terminal shock (method section 13);
  mixed compression: its external ramps' as for external-ramp;
- mixed compression (method section 11): the started state of a point at M0 is found by stepping from Mach 1
  to M0 every 0.0025 (then M0 itself): unstarted until a node self-starts (Kantrowitz limit on A_th/A_e, the
  cowl entrance A_e from continuity at the shock-on-lip Mach), started while every node can run started; a
  started point has the supersonic throat Mach (continuity of the captured flow) as its throat Mach and no
  throat choking; the throat area is read from the schedule (linear in M0, ends held).
"""

from __future__ import annotations

import math

from scipy.optimize import brentq

GAMMA = 1.4
R_AIR = 8314.32 / 28.9644  # J/(kg K), U.S. Standard Atmosphere 1976
G0 = 9.80665  # m/s^2
T_REF = 288.15  # K
P_REF = 101325.0  # Pa
LOW_SPEED_MACH = 0.05
CRITICAL_BAND = 0.005

# U.S. Standard Atmosphere 1976, geopotential layers: base altitude (m), lapse (K/m).
_LAYERS = [
    (0.0, -6.5e-3),
    (11000.0, 0.0),
    (20000.0, 1.0e-3),
    (32000.0, 2.8e-3),
    (47000.0, 0.0),
    (51000.0, -2.8e-3),
    (71000.0, -2.0e-3),
]
_H_MIN, _H_MAX = -5000.0, 84852.0
NAN = float("nan")


def _layer_table():
    rows = []
    t, p = 288.15, 101325.0
    for i, (hb, lapse) in enumerate(_LAYERS):
        rows.append((hb, lapse, t, p))
        if i + 1 < len(_LAYERS):
            dh = _LAYERS[i + 1][0] - hb
            t_next = t + lapse * dh
            if lapse == 0.0:
                p = p * math.exp(-G0 * dh / (R_AIR * t))
            else:
                p = p * (t / t_next) ** (G0 / (R_AIR * lapse))
            t = t_next
    return rows


_TABLE = _layer_table()


def atmosphere(h, isa_offset_k=0.0):
    """(T, p, rho, a) at geopotential altitude h (m); None outside -5 .. 84.852 km or where T <= 0."""
    if not (_H_MIN <= h <= _H_MAX):
        return None
    row = _TABLE[0]
    for r in _TABLE:
        if h >= r[0]:
            row = r
    hb, lapse, tb, pb = row
    t_std = tb + lapse * (h - hb)
    if lapse == 0.0:
        p = pb * math.exp(-G0 * (h - hb) / (R_AIR * tb))
    else:
        p = pb * (tb / t_std) ** (G0 / (R_AIR * lapse))
    t = t_std + isa_offset_k
    if not t > 0.0:
        return None
    return t, p, p / (R_AIR * t), math.sqrt(GAMMA * R_AIR * t)


# ---------------------------------------------------------------- gas dynamics

def _base(m):
    return 1.0 + 0.5 * (GAMMA - 1.0) * m * m


def p_over_pt(m):
    return _base(m) ** (-GAMMA / (GAMMA - 1.0))


def mfp(m):
    """W sqrt(Tt)/(A pt), kg K^0.5/(N s)."""
    return math.sqrt(GAMMA / R_AIR) * m * _base(m) ** (-(GAMMA + 1.0) / (2.0 * (GAMMA - 1.0)))


MFP_STAR = mfp(1.0)


def subsonic_mach_from_mfp(value):
    """Subsonic root of MFP(M) = value (brentq); None above choking."""
    if value <= 0.0:
        return 0.0
    if value >= MFP_STAR:
        return None
    return brentq(lambda m: mfp(m) - value, 0.0, 1.0, xtol=1e-15, rtol=8.9e-16, maxiter=200)


def normal_shock(m1):
    """(M2, pt2/pt1, p2/p1) across a normal shock; identity for m1 <= 1."""
    if m1 <= 1.0:
        return m1, 1.0, 1.0
    g = GAMMA
    s = m1 * m1
    m2 = math.sqrt((1.0 + 0.5 * (g - 1.0) * s) / (g * s - 0.5 * (g - 1.0)))
    pt = ((g + 1.0) * s / ((g - 1.0) * s + 2.0)) ** (g / (g - 1.0)) * ((g + 1.0) / (2.0 * g * s - (g - 1.0))) ** (
        1.0 / (g - 1.0)
    )
    p = 1.0 + 2.0 * g / (g + 1.0) * (s - 1.0)
    return m2, pt, p


def deflection(m, beta):
    """theta-beta-M relation: flow deflection (rad) for wave angle beta at Mach m."""
    s = m * m
    return math.atan(2.0 / math.tan(beta) * (s * math.sin(beta) ** 2 - 1.0) / (s * (GAMMA + math.cos(2.0 * beta)) + 2.0))


def beta_at_max_deflection(m):
    s = m * m
    g = GAMMA
    sin2 = ((g + 1.0) / 4.0 * s - 1.0 + math.sqrt((g + 1.0) * ((g + 1.0) / 16.0 * s * s + 0.5 * (g - 1.0) * s + 1.0))) / (g * s)
    return math.asin(math.sqrt(min(max(sin2, 0.0), 1.0)))


def max_deflection(m):
    if m <= 1.0:
        return 0.0
    return deflection(m, beta_at_max_deflection(m))


def oblique_shock(m, delta):
    """Weak oblique shock: (beta, M2, pt2/pt1) or None when detached (m <= 1 or delta > max)."""
    if m <= 1.0 or delta < 0.0:
        return None
    b_max = beta_at_max_deflection(m)
    if delta > deflection(m, b_max):
        return None
    mu = math.asin(1.0 / m)
    if delta <= 1e-12:
        return mu, m, 1.0
    f = lambda b: deflection(m, b) - delta  # noqa: E731
    beta = b_max if f(b_max) <= 0.0 else brentq(f, mu, b_max, xtol=1e-15, rtol=8.9e-16, maxiter=200)
    mn2, pt, _ = normal_shock(m * math.sin(beta))
    return beta, mn2 / math.sin(beta - delta), pt


# ---------------------------------------------------------------- inlet geometry

def _intersect(p, d, q, e):
    """Parameter t with p + t d on the line q + s e."""
    det = d[0] * e[1] - d[1] * e[0]
    return ((q[0] - p[0]) * e[1] - (q[1] - p[1]) * e[0]) / det


_GEOMETRY_CACHE: dict = {}


def ramp_geometry(ramps_deg, design_mach):
    """Shock-on-lip layout at the design Mach (lip height 1): (lip, corners, flow angles)."""
    key = (tuple(ramps_deg), float(design_mach))
    if key in _GEOMETRY_CACHE:
        return _GEOMETRY_CACHE[key]
    deltas = [math.radians(a) for a in ramps_deg]
    flow = [0.0]
    for d in deltas:
        flow.append(flow[-1] + d)
    m = float(design_mach)
    corners = [(0.0, 0.0)]
    lip = None
    for k, d in enumerate(deltas):
        shock = oblique_shock(m, d)
        if shock is None:
            raise ValueError("ramp shock detached at the design Mach number")
        beta, m_next, _ = shock
        phi = flow[k] + beta
        if k == 0:
            lip = (math.cos(phi) / math.sin(phi), 1.0)  # on y = 1
        else:
            c = corners[-1]
            # corner on ramp k-1 (direction flow[k]) whose shock line at phi passes through the lip
            t = _intersect(c, (math.cos(flow[k]), math.sin(flow[k])), lip, (math.cos(phi), math.sin(phi)))
            corners.append((c[0] + t * math.cos(flow[k]), c[1] + t * math.sin(flow[k])))
        m = m_next
    _GEOMETRY_CACHE[key] = (lip, corners, flow)
    return lip, corners, flow


SUPPORTED_TYPES = ("pitot", "external-ramp", "mixed-compression")


def external_compression(inlet, m0):
    """(pi_ext, MFR_max geometric, detached, inside_cowl, oblique ahead, drag terms) at flight Mach m0 > 1.

    drag terms = (pressure integral over the regions behind the ramp shocks, entry Mach, entry p_t ratio,
    entry flow angle): method §13. A detached ramp with supersonic flow ahead stands behind a bow shock
    taken at its maximum-deflection wave angle from the ramp's leading edge (method §10)."""
    if inlet.type == "pitot" or not inlet.ramp_angles_deg:
        return normal_shock(m0)[1], 1.0, False, False, False, (0.0, m0, 1.0, 0.0)
    m = m0
    pi = 1.0
    betas, p_ratios = [], []
    detached = False
    bow = None  # (ramp index, beta_m, delta_max, p ratio)
    lip, corners, flow = ramp_geometry(inlet.ramp_angles_deg, float(inlet.shock_on_lip_mach))
    angle = 0.0
    for k, a in enumerate(inlet.ramp_angles_deg):
        shock = oblique_shock(m, math.radians(a))
        if shock is None:
            detached = True
            if m > 1.0:
                b_m = beta_at_max_deflection(m)
                bow = (k, b_m, deflection(m, b_m), normal_shock(m * math.sin(b_m))[2])
            break
        beta, m_next, pt = shock
        p_ratios.append(normal_shock(m * math.sin(beta))[2])
        m = m_next
        pi *= pt
        betas.append(beta)
        angle = flow[k + 1]
    pi_obl = pi
    pi *= normal_shock(m)[1]
    design = float(inlet.shock_on_lip_mach)
    integral = 0.0
    if m0 >= design:
        mfr_max = 1.0
    else:
        px, py = lip
        regions = [(k, flow[k] + betas[k], flow[k + 1], p_ratios[k]) for k in range(len(betas))]
        if bow is not None:
            k, b_m, d_m, pr = bow
            regions.append((k, flow[k] + b_m, flow[k] + d_m, pr))
        for k, phi, theta, pr in reversed(regions):
            p_region = pr
            for j in range(k):
                p_region *= p_ratios[j]
            cx, cy = corners[k]
            ex, ey = math.cos(phi), math.sin(phi)
            # is the point downstream (below/behind) of shock line k?
            if ex * (py - cy) - ey * (px - cx) < 0.0:
                tx, ty = math.cos(theta), math.sin(theta)
                # walk back against the local flow direction to the shock
                t = _intersect((px, py), (-tx, -ty), (cx, cy), (ex, ey))
                integral += (p_region - 1.0) * t * ty
                px, py = px - t * tx, py - t * ty
        mfr_max = min(max(py, 0.0), 1.0)
    return (pi, mfr_max, detached, m0 > design * (1.0 + 1e-9), bool(betas),
            (max(integral, 0.0), m, pi_obl, angle))


def area_over_astar(m):
    return (1.0 / m) * ((2.0 / (GAMMA + 1.0)) * _base(m)) ** ((GAMMA + 1.0) / (2.0 * (GAMMA - 1.0)))


def spill_drag(m0, mn, pi_n, angle, mfr, mfr_max):
    """Spillage behind the terminal shock over p0 A_c: the momentum balance of §7 from the entry state."""
    if not mfr < mfr_max * (1.0 - 1e-12):
        return 0.0
    r = mfr / mfr_max
    pt_ns = normal_shock(mn)[1]
    a_e = mfr_max * area_over_astar(mn) / (area_over_astar(m0) * pi_n)
    a_n = a_e * r
    target = r / (area_over_astar(mn) * pt_ns)  # A*/A at the entry, behind the terminal shock
    m1 = brentq(lambda x: 1.0 / area_over_astar(x) - target, 1e-9, 1.0, xtol=1e-15, rtol=8.9e-16, maxiter=200)
    pn = pi_n * p_over_pt(mn) / p_over_pt(m0)
    p1 = pi_n * pt_ns * p_over_pt(m1) / p_over_pt(m0)
    d = math.cos(angle) * (p1 * (1.0 + GAMMA * m1 * m1) * a_e - pn * (1.0 + GAMMA * mn * mn) * a_n - (a_e - a_n))
    return max(d, 0.0)


def area_ratio(m):
    """A/A* of isentropic flow at Mach m."""
    return _base(m) ** ((GAMMA + 1.0) / (2.0 * (GAMMA - 1.0))) * (2.0 / (GAMMA + 1.0)) ** (
        (GAMMA + 1.0) / (2.0 * (GAMMA - 1.0))) / m


def throat_area(inlet, m0):
    """Throat area at flight Mach m0: the schedule's (linear, ends held) or the fixed value."""
    sched = inlet.schedule
    if sched is not None and sched.throat_area_m2 is not None:
        return _interp(m0, sched.mach, sched.throat_area_m2)
    return inlet.throat_area_m2


MIXED_STEP = 0.0025
_MIXED_CACHE: dict = {}


def entrance_over_capture(inlet):
    """Cowl entrance over capture area A_e/A_c (method section 11): continuity at the shock-on-lip Mach M_d, every
    ramp shock on the lip, the capture stream tube passing the entrance behind the last ramp shock:
    A_e/A_c = (A/A*)(M_e,d) / ((A/A*)(M_d) pi_ramps(M_d))."""
    m_d = float(inlet.shock_on_lip_mach)
    m, pi = m_d, 1.0
    for a in inlet.ramp_angles_deg:
        _, m, pt = oblique_shock(m, math.radians(a))
        pi *= pt
    return area_ratio(m) / (area_ratio(m_d) * pi)


def mixed_node(inlet, m0):
    """Mixed compression at flight Mach m0: (can_run, starts, M_th, pi_ramps * pi_cowl, Kantrowitz limit).

    Started throat by continuity of the captured flow MFR_max rho0 V0 A_c at the total pressure behind the ramps
    and the cowl shock: (A/A*)(M_th) = (A_th/A_c) pi_ramps pi_cowl (A/A*)(M0) / MFR_max, supersonic root;
    self-starting when A_th/A_e reaches the Kantrowitz limit at the post-ramp Mach (method section 11)."""
    key = (inlet, m0)
    if key in _MIXED_CACHE:
        return _MIXED_CACHE[key]
    result = (False, False, NAN, NAN, 1.0)
    if m0 > 1.0:
        m, pi, attached = m0, 1.0, True
        for a in inlet.ramp_angles_deg:
            shock = oblique_shock(m, math.radians(a))
            if shock is None:
                attached = False
                break
            _, m, pt = shock
            pi *= pt
        limit = 1.0 / area_ratio(m) / normal_shock(m)[1] if m > 1.0 else 1.0
        result = (False, False, NAN, NAN, limit)
        cowl = oblique_shock(m, math.radians(sum(inlet.ramp_angles_deg))) if attached and m > 1.0 else None
        if cowl is not None and cowl[1] > 1.0:
            a_th = throat_area(inlet, m0)
            mfr_max = external_compression(inlet, m0)[1]
            target = a_th / inlet.capture_area_m2 * pi * cowl[2] * area_ratio(m0) / mfr_max
            if target >= 1.0:
                top = 1.0
                while area_ratio(top) < target:
                    top *= 2.0
                m_th = 1.0 if target == 1.0 else brentq(lambda x: area_ratio(x) - target, 1.0, top,
                                                         xtol=1e-15, rtol=8.9e-16, maxiter=200)
                contraction = a_th / (entrance_over_capture(inlet) * inlet.capture_area_m2)
                result = (True, contraction >= limit, m_th, pi * cowl[2], limit)
    _MIXED_CACHE[key] = result
    return result


def mixed_started(inlet, m0):
    """Started at M0 after accelerating from Mach 1 (nodes every MIXED_STEP, then M0)."""
    started = False
    k = 0
    while True:
        node = 1.0 + k * MIXED_STEP
        if node >= m0:
            node = m0
        can_run, starts, *_ = mixed_node(inlet, node)
        started = can_run and (started or starts)
        if node == m0:
            return started
        k += 1


def mil_e_5008b(m0):
    if m0 <= 1.0:
        return 1.0
    if m0 < 5.0:
        return 1.0 - 0.075 * (m0 - 1.0) ** 1.35
    return 800.0 / (m0**4 + 935.0)


def _interp(x, xs, ys):
    if x <= xs[0]:
        return ys[0]
    if x >= xs[-1]:
        return ys[-1]
    for i in range(len(xs) - 1):
        if xs[i] <= x <= xs[i + 1]:
            w = (x - xs[i]) / (xs[i + 1] - xs[i])
            return ys[i] + w * (ys[i + 1] - ys[i])
    return ys[-1]


# ---------------------------------------------------------------- the chain

_KEYS = (
    "static_pressure_pa", "static_temperature_k", "total_pressure_pa", "total_temperature_k", "velocity_m_s",
    "density_kg_m3", "theta2", "corrected_flow_kg_s", "mass_flow_kg_s", "external_recovery", "duct_recovery",
    "recovery", "reference_recovery", "capture_mach", "throat_mach", "face_mach", "mass_flow_ratio",
    "max_mass_flow_ratio", "spillage_fraction", "additive_drag_n", "additive_drag_coefficient",
    "spillage_drag_coefficient", "face_static_to_ambient", "relative_tip_mach",
)


def evaluate_point(project, case, mach, altitude_m) -> dict:
    """Every quantity of the match at one flight condition, as a dict of floats (NaN where undefined),
    plus ``flags`` (a set of names) and ``regime``."""
    inlet = project.inlet
    rating = project.rating(case.rating)
    m0 = max(float(mach), 0.0)
    h = float(altitude_m)
    out = {k: NAN for k in _KEYS}
    flags: set[str] = set()
    out["flags"] = flags
    if rating.fan_tip_speed_m_s is None:
        flags.add("no-tip-speed")
    if rating.net_thrust_n is None:  # the installation ledger (method section 13) is not modelled here
        flags.add("no-thrust-data")
    out["reference_recovery"] = mil_e_5008b(m0)
    low = m0 < LOW_SPEED_MACH
    if low:
        flags.add("low-speed")
    supersonic = m0 > 1.0
    mixed = inlet.type == "mixed-compression"
    started = False
    # the shock system depends on the flight Mach number alone (section 4)
    if supersonic:
        pi_ext, mfr_max_geom, detached, inside_cowl, oblique, drag_terms = external_compression(inlet, m0)
        if detached:
            flags.add("shock-detached")
        if inside_cowl:
            flags.add("shock-inside-cowl")
        if mixed:
            started = mixed_started(inlet, m0)
            if started:
                _, _, m_th_started, pi_ramps_cowl, _ = mixed_node(inlet, m0)
                pi_ext = pi_ramps_cowl * normal_shock(m_th_started)[1] * inlet.internal_recovery_factor
            else:
                flags.add("unstarted")
    else:
        pi_ext, mfr_max_geom, oblique = 1.0, NAN, False
    out["external_recovery"] = pi_ext
    atm = atmosphere(h, case.isa_offset_K)
    if atm is None:
        flags.add("outside-atmosphere")
        out["regime"] = "subcritical" if supersonic else "subsonic"
        return out
    t0, p0, rho0, a0 = atm
    tt0 = t0 * _base(m0)
    pt0 = p0 * _base(m0) ** (GAMMA / (GAMMA - 1.0))
    v0 = m0 * a0
    pt_in = p0 if low else pt0
    out.update(static_pressure_pa=p0, static_temperature_k=t0, total_pressure_pa=pt0, total_temperature_k=tt0,
               velocity_m_s=v0, density_kg_m3=rho0)

    # demand (section 2)
    theta2 = tt0 / T_REF
    wc2 = _interp(theta2, rating.theta, rating.corrected_flow_kg_s)
    if theta2 < rating.theta[0] or theta2 > rating.theta[-1]:
        flags.add("demand-extrapolated")
    out["theta2"], out["corrected_flow_kg_s"] = theta2, wc2

    # face Mach (section 3)
    face_mfp = wc2 * math.sqrt(T_REF) / (P_REF * inlet.face_area_m2)
    if face_mfp >= MFP_STAR:
        flags.add("face-choked")
        m2 = 1.0
        wc2_face = wc2 * MFP_STAR / face_mfp
    else:
        m2 = subsonic_mach_from_mfp(face_mfp)
        wc2_face = wc2

    # recovery (section 4)
    q2_pt2 = 0.5 * GAMMA * m2 * m2 * p_over_pt(m2)
    pi_duct = 1.0 - inlet.duct_loss_coefficient * q2_pt2
    pi = pi_ext * pi_duct

    # flow, capture (section 5)
    sqrt_theta = math.sqrt(theta2)
    w = wc2_face * pi * pt_in / P_REF / sqrt_theta
    capture_flow = rho0 * v0 * inlet.capture_area_m2

    # regime (section 6)
    regime = "subsonic"
    supercritical = critical = False
    if supersonic:
        ratio = (w / capture_flow) / mfr_max_geom
        if ratio > 1.0 + CRITICAL_BAND:
            supercritical = True
            regime = "supercritical"
            flags.add("supercritical")
            pi /= ratio
            w /= ratio
        elif abs(ratio - 1.0) <= CRITICAL_BAND:
            critical = True
            regime = "critical"
            if ratio > 1.0:  # capture never exceeds MFR_max
                pi /= ratio
                w /= ratio
        else:
            regime = "subcritical"
        if started and ratio < 1.0 - CRITICAL_BAND:
            flags.add("unstart-risk")

    # throat
    a_th = throat_area(inlet, m0)
    throat_mfp = w * math.sqrt(tt0) / (a_th * pi_ext * pt_in)
    if started:
        m_th = m_th_started
    elif throat_mfp >= MFP_STAR:
        flags.add("throat-choked")
        k = MFP_STAR / throat_mfp
        pi *= k
        w *= k
        m_th = 1.0
    else:
        m_th = subsonic_mach_from_mfp(throat_mfp)

    if low:
        mfr = mfr_max = spill = NAN
    else:
        mfr = w / capture_flow
        spill = max(0.0, 1.0 - mfr)
        if supersonic:
            mfr_max = mfr_max_geom
        else:
            mfr_max = a_th * pi_ext * pt_in * MFP_STAR / math.sqrt(tt0) / capture_flow
    sff = project.limits.stable_flow_fraction
    if sff is not None and supersonic and oblique and not supercritical and not critical and mfr / mfr_max_geom < sff:
        flags.add("buzz-risk")

    # additive drag (section 7)
    pt1 = pi_ext * pt_in
    cap_mfp = w * math.sqrt(tt0) / (inlet.capture_area_m2 * pt1)
    m1 = 1.0 if cap_mfp >= MFP_STAR else subsonic_mach_from_mfp(cap_mfp)
    ramp_supersonic = supersonic and inlet.type in ("external-ramp", "mixed-compression")
    if low:
        d_add = c_add = c_spill = NAN
    elif ramp_supersonic:  # method §13: ramp regions plus the spillage behind the terminal shock
        integral, mn, pi_n, angle = drag_terms
        d_add = (integral + spill_drag(m0, mn, pi_n, angle, mfr, mfr_max_geom)) * p0 * inlet.capture_area_m2
        c_add = c_spill = d_add / (0.5 * GAMMA * p0 * m0 * m0 * inlet.capture_area_m2)
    else:
        a_tube = w / (rho0 * v0)
        a1 = inlet.capture_area_m2
        p1 = pt1 * p_over_pt(m1)
        d_add = p1 * a1 * (1.0 + GAMMA * m1 * m1) - p0 * a_tube * (1.0 + GAMMA * m0 * m0) - p0 * (a1 - a_tube)
        q0 = 0.5 * GAMMA * p0 * m0 * m0
        c_add = d_add / (q0 * a1)
        suction = 0.0 if supersonic else inlet.lip_suction_factor
        c_spill = (1.0 - suction) * c_add
    if not low and mfr >= 1.0:  # nothing spills at or above full capture: no spillage drag coefficient (§12)
        c_spill = 0.0

    face_static = pi * pt_in * p_over_pt(m2) / p0
    if rating.fan_tip_speed_m_s is not None:
        a2 = math.sqrt(GAMMA * R_AIR * tt0 / _base(m2))
        m_rel = math.sqrt(m2 * m2 + (rating.fan_tip_speed_m_s / a2) ** 2)
    else:
        m_rel = NAN

    out.update(
        mass_flow_kg_s=w, external_recovery=pi_ext, duct_recovery=pi_duct, recovery=pi, capture_mach=m1,
        throat_mach=m_th, face_mach=m2, mass_flow_ratio=mfr, max_mass_flow_ratio=mfr_max, spillage_fraction=spill,
        additive_drag_n=d_add, additive_drag_coefficient=c_add, spillage_drag_coefficient=c_spill,
        face_static_to_ambient=face_static, relative_tip_mach=m_rel, regime=regime,
    )
    return out
