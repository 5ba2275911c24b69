#!/usr/bin/python3
"""Independent reference integration of a spoolstep plant network.

Reads a case written by the C++ side (hostsim reference_case(): the network,
its initial state, piecewise-constant inputs and the sample times), integrates
the same network equations with scipy.integrate.solve_ivp, method Radau, and
writes the sampled states plus the wall time to a JSON result file.

The equations are written here a second time, from the model description in
docs/plant-model.md, without sharing code with hostsim/src/network.cpp.

Usage: /usr/bin/python3 tools/ref/plant_ref.py CASE.json RESULT.json
Exit codes: 0 ok, 2 bad usage or case, 3 numpy/scipy missing, 4 integration failed.
Run it with Debian's interpreter: Debian's python3-scipy only imports there.
"""
import json
import math
import sys
import time

PRESSURE_SCALE = 1e5  # state unit: bar
LENGTH_SCALE = 1e-3   # state unit: mm, mm/s
VOLUME_SCALE = 1e-6   # state unit: cm^3
STANDARD_GRAVITY = 9.80665  # 3rd CGPM (1901), from memory


def smoothstep(u):
    if u <= 0.0:
        return 0.0
    if u >= 1.0:
        return 1.0
    return u * u * (3.0 - 2.0 * u)


def soft_positive(d, w):
    if w <= 0.0:
        return d if d > 0.0 else 0.0
    if d >= 0.5 * w:
        return d
    if d <= -0.5 * w:
        return 0.0
    u = d + 0.5 * w
    return u * u / (2.0 * w)


def clamp(v, lo, hi):
    return lo if v < lo else (hi if v > hi else v)


class Model:
    def __init__(self, case):
        self.oil = case["oil"]
        self.nodes = case["nodes"]
        self.elements = case["elements"]
        self.spools = case["spools"]
        self.cyl = case["cylinders"]
        self.pump = case["pump"]
        lay = case["layout"]
        self.node_state = lay["node_state"]
        self.first_cyl = lay["first_cylinder"]
        self.spool_state = lay["spool_state"]
        self.i_pumped = lay["pumped"]
        self.i_returned = lay["returned"]
        self.i_compressed = lay["compressed"]
        self.n = lay["size"]
        self.n_dynamic = self.i_pumped
        self.rho = self.oil["density_kg_m3"]
        self.ptr = self.oil["laminar_transition_pa"]
        self.inputs = None

    def air(self):
        return max(self.oil["air_fraction"], self.oil["min_air_fraction"])

    def floor(self):
        o = self.oil
        return math.sqrt(self.air() * o["atmospheric_pa"] * o["cavitation_bulk_modulus_pa"])

    def beta(self, p):
        # 1/beta_e = 1/beta_oil + a * p_atm / p_abs^2 (isothermal free air)
        o = self.oil
        pabs = max(p + o["atmospheric_pa"], 1e-300)
        return 1.0 / (1.0 / o["bulk_modulus_pa"] + self.air() * o["atmospheric_pa"] / (pabs * pabs))

    def physical(self, s):
        """Physical gauge pressure of a pressure state (cavitation transform)."""
        f = self.floor()
        sa = s + self.oil["atmospheric_pa"]
        if sa >= f:
            return s
        return f * f / (2.0 * f - sa) - self.oil["atmospheric_pa"]

    def state_rate(self, s, vol, qnet):
        o = self.oil
        f = self.floor()
        sa = s + o["atmospheric_pa"]
        if sa >= f:
            return self.beta(s) / vol * qnet
        pabs = f * f / (2.0 * f - sa)
        return qnet / vol * f * f / (pabs * pabs / o["bulk_modulus_pa"] + self.air() * o["atmospheric_pa"])

    def orifice(self, cd, area, dp):
        k = cd * area * math.sqrt(2.0 / self.rho)
        a = abs(dp)
        pt = self.ptr
        if a >= pt:
            return math.copysign(k * math.sqrt(a), dp)
        st = math.sqrt(pt)
        return k * (1.25 * dp / st - 0.25 * dp ** 3 / (pt * pt * st))

    def edge_area(self, e, s):
        s = clamp(s, -1.0, 1.0)
        if e["opening"] == "positive":
            f = clamp((s - e["overlap"]) / (1.0 - e["overlap"]), 0.0, 1.0)
        elif e["opening"] == "negative":
            f = clamp((-s - e["overlap"]) / (1.0 - e["overlap"]), 0.0, 1.0)
        else:
            f = clamp(1.0 - abs(s) / e["centre_width"], 0.0, 1.0)
        return e["area_m2"] * f + e["leak_area_m2"]

    def flow(self, e, p, y):
        pf = p[e["from"]]
        pt = p[e["to"]]
        dp = pf - pt
        k = e["kind"]
        if k == "orifice":
            return self.orifice(e["cd"], e["area_m2"], dp)
        if k == "spool_edge":
            s = y[self.spool_state[e["spool"]]]
            return self.orifice(e["cd"], self.edge_area(e, s), dp)
        if k == "check":
            op = smoothstep((dp - e["cracking_pa"]) / e["full_open_span_pa"])
            if e["pilot"] >= 0:
                pp = p[e["pilot"]]
                op = max(op, smoothstep((e["pilot_ratio"] * pp + dp - e["cracking_pa"]) / e["full_open_span_pa"]))
            return self.orifice(e["cd"], e["area_m2"] * op + e["leak_area_m2"], dp)
        if k == "counterbalance":
            # load pressure across it plus pilot ratio x pilot pressure against the setting
            pp = p[e["pilot"]] if e["pilot"] >= 0 else 0.0
            op = smoothstep((dp + e["pilot_ratio"] * pp - e["cracking_pa"]) / e["full_open_span_pa"])
            return self.orifice(e["cd"], e["area_m2"] * op + e["leak_area_m2"], dp)
        if k == "relief":
            return soft_positive(dp - e["cracking_pa"], e["blend_pa"]) / e["override_pa_s_m3"]
        if k == "laminar":
            return e["conductance_m3_s_pa"] * dp
        raise ValueError("unknown element kind " + k)

    def rhs_dynamic(self, t, y):
        """The dynamic states only (no accumulated volumes)."""
        full = list(y) + [0.0, 0.0, 0.0]
        return self.rhs(t, full)[:self.n_dynamic]

    def rhs(self, t, y):
        inp = self.inputs
        nn = len(self.nodes)
        p = [0.0] * nn
        for i, nd in enumerate(self.nodes):
            k = self.node_state[i]
            p[i] = nd["fixed_pressure_pa"] if k < 0 else self.physical(y[k] * PRESSURE_SCALE)
        q = [0.0] * nn
        dv = [0.0] * nn
        returned = 0.0
        for e in self.elements:
            f = self.flow(e, p, y)
            q[e["from"]] -= f
            q[e["to"]] += f
            if self.nodes[e["to"]]["fixed"]:
                returned += f
            if self.nodes[e["from"]]["fixed"]:
                returned -= f
        pumped = 0.0
        pn = self.pump["node"]
        if pn >= 0 and inp["pump_running"]:
            pumped = self.pump["nominal_m3_s"] * inp["pump_flow_factor"]
            if self.pump["compensated"]:
                pumped *= smoothstep((self.pump["compensator_pa"] - p[pn]) / self.pump["compensator_band_pa"])
            q[pn] += pumped
        dydt = [0.0] * self.n
        for c, cy in enumerate(self.cyl):
            k = self.first_cyl + 2 * c
            x = y[k] * LENGTH_SCALE
            v = y[k + 1] * LENGTH_SCALE
            a, b = cy["node_a"], cy["node_b"]
            leak = cy["leak_m3_s_pa"] + inp["extra_leak_m3_s_pa"][c]
            ql = leak * (p[a] - p[b])
            q[a] -= ql
            q[b] += ql
            dv[a] += cy["area_a_m2"] * v
            dv[b] -= cy["area_b_m2"] * v
            f = p[a] * cy["area_a_m2"] - p[b] * cy["area_b_m2"]
            f -= cy["coulomb_n"] * math.tanh(v / cy["coulomb_velocity_m_s"]) + cy["viscous_n_s_m"] * v
            resisting = cy["resisting_force_n"] + inp["extra_force_n"][c]
            prof = cy["force_profile"]
            if prof:
                ts = [pt[0] for pt in prof]
                fs = [pt[1] for pt in prof]
                if t <= ts[0]:
                    resisting += fs[0]
                elif t >= ts[-1]:
                    resisting += fs[-1]
                else:
                    for j in range(1, len(ts)):
                        if t <= ts[j]:
                            u = (t - ts[j - 1]) / (ts[j] - ts[j - 1])
                            resisting += fs[j - 1] + u * (fs[j] - fs[j - 1])
                            break
            f += -resisting + cy["gravity"] * cy["mass_kg"] * STANDARD_GRAVITY
            if cy["contact_n_m"] > 0.0 and x > cy["contact_m"]:
                f -= max(0.0, cy["contact_n_m"] * (x - cy["contact_m"]) + cy["contact_n_s_m"] * v)
            if x < 0.0:
                f += max(0.0, -cy["end_stop_n_m"] * x - cy["end_stop_n_s_m"] * v)
            if x > cy["stroke_m"]:
                f += min(0.0, -cy["end_stop_n_m"] * (x - cy["stroke_m"]) - cy["end_stop_n_s_m"] * v)
            dydt[k] = y[k + 1]
            dydt[k + 1] = f / cy["mass_kg"] / LENGTH_SCALE
        compressed = 0.0
        for i, nd in enumerate(self.nodes):
            k = self.node_state[i]
            if k < 0:
                continue
            vol = nd["base_volume_m3"]
            if nd["cylinder"] >= 0:
                cy = self.cyl[nd["cylinder"]]
                x = y[self.first_cyl + 2 * nd["cylinder"]] * LENGTH_SCALE
                vol += cy["area_a_m2"] * x if nd["side"] > 0 else cy["area_b_m2"] * (cy["stroke_m"] - x)
            vol = max(vol, 0.1 * nd["base_volume_m3"])
            dydt[k] = self.state_rate(y[k] * PRESSURE_SCALE, vol, q[i] - dv[i]) / PRESSURE_SCALE
            compressed += q[i] - dv[i]
        for s, sp in enumerate(self.spools):
            k = self.spool_state[s]
            stuck = inp["spool_stuck"][s]
            target = inp["spool_target"][s]
            d = sp["dynamics"]
            if d == "rate_limited":
                r = sp["rate_per_s"]
                tau = 0.01 / r
                dydt[k] = 0.0 if stuck else clamp((target - y[k]) / tau, -r, r)
            elif d == "first_order":
                dydt[k] = 0.0 if stuck else (target - y[k]) / sp["time_constant_s"]
            else:
                w = sp["natural_rad_s"]
                dydt[k] = 0.0 if stuck else y[k + 1]
                dydt[k + 1] = 0.0 if stuck else w * w * (target - y[k]) - 2.0 * sp["damping"] * w * y[k + 1]
        dydt[self.i_pumped] = pumped / VOLUME_SCALE
        dydt[self.i_returned] = returned / VOLUME_SCALE
        dydt[self.i_compressed] = compressed / VOLUME_SCALE
        return dydt


def main(argv):
    if len(argv) != 3:
        print("usage: plant_ref.py CASE.json RESULT.json", file=sys.stderr)
        return 2
    try:
        import numpy as np
        from scipy.integrate import solve_ivp
    except ImportError as err:
        print("plant_ref: numpy and scipy are needed under this interpreter (%s): %s. "
              "On Debian: apt-get install python3-scipy, and run /usr/bin/python3." % (sys.executable, err),
              file=sys.stderr)
        return 3
    try:
        with open(argv[1]) as f:
            case = json.load(f)
        model = Model(case)
    except (OSError, ValueError, KeyError) as err:
        print("plant_ref: cannot read case %s: %s" % (argv[1], err), file=sys.stderr)
        return 2
    samples = np.asarray(case["sample_times_s"], dtype=float)
    segments = case["segments"]
    # The accumulated volumes (last three states) feed nothing back; they are
    # left out here, which also keeps the finite-difference Jacobian clean.
    y = np.asarray(case["y0"], dtype=float)[:model.n_dynamic]
    rows = np.zeros((len(samples), model.n))
    filled = np.zeros(len(samples), dtype=bool)
    rtol = case["rtol"]
    atol = case["atol"]
    stats = {"nfev": 0, "njev": 0, "nlu": 0}
    start = time.perf_counter()
    end_time = samples[-1]
    for i, seg in enumerate(segments):
        t0 = seg["start_s"]
        t1 = segments[i + 1]["start_s"] if i + 1 < len(segments) else end_time
        last = i + 1 == len(segments)
        model.inputs = seg
        mask = (samples >= t0 - 1e-12) & ((samples < t1 - 1e-12) | (last & (samples <= t1 + 1e-12)))
        idx = np.nonzero(mask)[0]
        if t1 <= t0:
            if len(idx):
                rows[idx] = y
                filled[idx] = True
            continue
        # Sample times in [t0, t1), plus t1 itself to carry the state on.
        ends_on_sample = len(idx) > 0 and abs(samples[idx[-1]] - t1) < 1e-12
        teval = samples[idx] if ends_on_sample else np.append(samples[idx], t1)
        teval = np.clip(teval, t0, t1)  # sample and segment times are summed differently in floating point
        sol = solve_ivp(model.rhs_dynamic, (t0, t1), y, method="Radau", rtol=rtol, atol=atol, t_eval=teval)
        if sol.status < 0 or sol.y.shape[1] != len(teval):
            print("plant_ref: Radau failed in segment %d (%g .. %g s): %s" % (i, t0, t1, sol.message),
                  file=sys.stderr)
            return 4
        stats["nfev"] += int(sol.nfev)
        stats["njev"] += int(sol.njev)
        stats["nlu"] += int(sol.nlu)
        rows[idx, :model.n_dynamic] = sol.y[:, :len(idx)].T
        filled[idx] = True
        y = sol.y[:, -1]
    wall = time.perf_counter() - start
    # Node columns report the physical pressure, not the pressure state.
    for i, k in enumerate(model.node_state):
        if k >= 0:
            rows[:, k] = [model.physical(v * PRESSURE_SCALE) / PRESSURE_SCALE for v in rows[:, k]]
    if not filled.all():
        print("plant_ref: internal error, %d samples not filled" % int((~filled).sum()), file=sys.stderr)
        return 4
    result = {
        "names": case["layout"]["names"],
        "time_s": samples.tolist(),
        "rows": rows.tolist(),
        "wall_s": wall,
        "stats": stats,
        "method": "scipy.integrate.solve_ivp Radau, rtol %g, atol %g" % (rtol, atol),
    }
    with open(argv[2], "w") as f:
        json.dump(result, f)
    print("plant_ref: %d samples, %.3f s wall, %d rhs calls" % (len(samples), wall, stats["nfev"]))
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
