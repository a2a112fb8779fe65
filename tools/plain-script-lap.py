#!/usr/bin/env python3
"""One lap of lapwing's point-mass method, written as a plain script (standard library only).

The yardstick of issue 15 ("the ratio to a plain script of the same method"): the same steps
as lapwing's point mass (README, "Physics and assumptions"), written straightforwardly, so that
lapwing's solve can be timed against it. Not a second implementation to maintain: it covers a
car with constant aero coefficients per config, a gearbox or constant power, on a level track in
still air without trim zones (the trace does not say whether the track is level: give it a
level track; the lap time printed beside lapwing's shows any mismatch), and refuses other aero
forms.

Inputs are what lapwing itself writes:
  lapwing run --car CAR --track TRACK --model point-mass --out DIR   (trace CSV, summary.json)
  lapwing check --car CAR --track TRACK --json CHECK.json            (engine_power_ratio)
and the car file, read by a tiny parser of the subset of YAML the bundled cars use.

  tools/plain-script-lap.py CAR DIR [--check-json CHECK.json] [--config NAME] [--repeats N]
                            [--integrator exponential|rk4]

prints the lap time, lapwing's lap time from DIR/summary.json, their relative difference, and
the solve's time per mesh point per lap (best of N repeats of the solve alone: the tables and
the file reading are not timed, as lapwing_bench does not time the envelope build).

The method, step for step as lapwing's (src/solve/solver.cpp, envelope.cpp):
  tables in u = v^2, 8001 rows up to the rev limit in top gear: drive in the best gear;
  loads (flat, still air): N = m g + 0.5 rho ClA u, F_y = m u |k|, R = 0.5 rho CdA u + Crr N;
  tyres: mu(Fz) = mu0 max(0.1, 1 - s (Fz - Fn) / Fn), Fz = N / 4; ellipse
    (Fx/Fx_max)^n + (Fy/Fy_max)^n <= 1;
  steady speed per point: the highest v with usage(R, F_y) <= 1 and drive >= R (bisection to
    2^-36 relative, first in +-2 % of the last point's answer);
  sweeps in u: du/ds = 2 a with curvature linear over the step, by lapwing's default step (the
    exponential step: du/ds linearised in u at the step's midpoint, J by a secant of reach
    2/3 h |f| the way the sweep moves, u1 = u0 + h phi1(h J) (f_m + J (u0 - u_m)),
    phi1(z) = (e^z - 1) / z; a step that starts on its limit and would rise is clipped) or, with
    --integrator rk4, classical RK4 with stage states held under the steady limit and stiff
    steps (|z| > 1) taken again in substeps;
    drive a = min((drive - R) / m_eff, (grip left - R) / m), braking a = (grip left + R) / m;
    upshifts cut the drive for shift_time;
  closed lap: both sweeps start at the slowest steady point; lap time = sum 2 ds / (v_i + v_i+1).
"""

import argparse
import csv
import json
import math
import os
import re
import sys
import time

G0 = 9.80665  # standard gravity, m/s^2 (ISO 80000-3)

# --- a tiny reader of the car files' YAML subset: block maps, flow maps and lists, numbers with
# units. Anything else is refused rather than guessed.
UNITS = {"": 1.0, "kg": 1.0, "m": 1.0, "N": 1.0, "W": 1.0, "kW": 1e3, "s": 1.0, "m2": 1.0,
         "rpm": 2.0 * math.pi / 60.0, "%": 0.01, "km/h": 1.0 / 3.6, "deg": math.pi / 180.0}


def scalar(text):
    text = text.strip()
    if text.startswith('"') and text.endswith('"'):
        return text[1:-1]
    m = re.fullmatch(r"([-+0-9.eE]+)\s*(\S*)", text)
    if m and m.group(2) in UNITS:
        try:
            return float(m.group(1)) * UNITS[m.group(2)]
        except ValueError:
            pass
    return text


def split_top(text):
    parts, depth, cur = [], 0, ""
    for ch in text:
        if ch in "[{":
            depth += 1
        elif ch in "]}":
            depth -= 1
        if ch == "," and depth == 0:
            parts.append(cur)
            cur = ""
        else:
            cur += ch
    if cur.strip():
        parts.append(cur)
    return parts


def value(text):
    text = text.strip()
    if text.startswith("["):
        return [value(p) for p in split_top(text[1:-1])]
    if text.startswith("{"):
        out = {}
        for p in split_top(text[1:-1]):
            k, v = p.split(":", 1)
            out[k.strip()] = value(v)
        return out
    return scalar(text)


def read_yaml(path):
    root = {}
    stack = [(-1, root)]
    with open(path, encoding="utf-8") as f:
        for line in f:
            body = re.sub(r"\s+#.*$", "", line.rstrip("\n"))
            if body.lstrip().startswith("#") or not body.strip():
                continue
            indent = len(body) - len(body.lstrip())
            if body.lstrip().startswith("- "):
                continue  # block lists: only in the forms of aero data this script refuses
            key, rest = body.strip().split(":", 1)
            while stack[-1][0] >= indent:
                stack.pop()
            if rest.strip():
                stack[-1][1][key] = value(rest)
            else:
                stack[-1][1][key] = {}
                stack.append((indent, stack[-1][1][key]))
    return root


# --- the car, as lapwing's point mass sees it.
class Car:
    def __init__(self, doc, config, rho, power_ratio):
        if doc.get("model", "axle") not in ("axle", "point-mass"):
            sys.exit("unknown model")
        configs = doc["aero"]["configs"]
        name = config or next(iter(configs))
        c = configs[name]
        if set(c) - {"cda", "cla", "balance"}:
            sys.exit(f"config {name}: only constant cda, cla, balance are read by this script")
        t, p = doc["tyres"], doc["powertrain"]
        self.m = doc["mass"]
        self.m_eff = self.m * (1.0 + doc.get("inertia_factor", 0.0))
        self.weight = self.m * G0
        self.mu_long, self.mu_lat = t["mu_long"], t["mu_lat"]
        self.fn = t["nominal_load"]
        self.sens = t.get("load_sensitivity", 0.0) / self.fn
        self.n = t.get("ellipse_exponent", 2.0)
        self.crr = t.get("rolling_resistance", 0.0)
        self.radius = t["rolling_radius"]
        self.drag_coef = 0.5 * rho * c["cda"]
        self.lift_coef = 0.5 * rho * c["cla"]
        eff = p.get("efficiency", 1.0)
        # Drive in the best gear (lapwing: powertrain.cpp best_drive), tabulated over u = v^2.
        if "constant_power" in p:
            self.gears, self.shift_time = None, 0.0
            power = p["constant_power"] * power_ratio

            def drive(v):
                return eff * power / max(v, 1e-3), 0

            # A gearless car's table top: its level top speed (on a 0.5 m/s grid) x 1.25.
            v = 0.5
            while v < 250.0 and drive(v)[0] >= self.drag_coef * v * v + self.crr * (
                    self.weight + self.lift_coef * v * v):
                v += 0.5
            self.v_max = min(250.0, 1.25 * v)
        else:
            if "torque_curve" in p:
                rpm, torque = p["torque_curve"]["rpm"], p["torque_curve"]["torque"]
            else:
                rpm, power = p["power_curve"]["rpm"], p["power_curve"]["power"]
                rpm = [r * UNITS["rpm"] for r in rpm]
                torque = [pw / w for pw, w in zip(power, rpm)]
            if "torque_curve" in p:
                rpm = [r * UNITS["rpm"] for r in rpm]
            rev, gears, fd = p["rev_limit"], p["gears"], p["final_drive"]
            self.gears, self.shift_time = gears, p.get("shift_time", 0.0)

            def torque_at(w):
                if w <= rpm[0]:
                    return torque[0]
                if w >= rpm[-1]:
                    return torque[-1]
                for a in range(len(rpm) - 1):
                    if w <= rpm[a + 1]:
                        x = (w - rpm[a]) / (rpm[a + 1] - rpm[a])
                        return torque[a] + x * (torque[a + 1] - torque[a])

            def drive(v):
                best, best_gear = 0.0, len(gears)
                for g, ratio in enumerate(gears):
                    w = v / self.radius * ratio * fd
                    if w > rev * (1.0 + 1e-12):
                        continue
                    f = torque_at(min(w, rev)) * ratio * fd * eff / self.radius
                    if f > best:
                        best, best_gear = f, g + 1
                return best * power_ratio, best_gear

            self.v_max = rev * self.radius / (gears[-1] * fd)
        rows = 8001
        self.du = self.v_max ** 2 / (rows - 1)
        self.drive_rows, self.gear_rows = [], []
        for k in range(rows):
            v = self.v_max if k == rows - 1 else math.sqrt(k * self.du)
            f, g = drive(v)
            self.drive_rows.append(f)
            self.gear_rows.append(g)

    def drive(self, u):  # linear in u between rows, held at the ends (envelope.hpp Rows::at)
        f = u / self.du
        last = len(self.drive_rows) - 1
        if not f > 0.0:
            return self.drive_rows[0]
        if f >= last:
            return self.drive_rows[last]
        i = int(f)
        w = f - i
        return self.drive_rows[i] + w * (self.drive_rows[i + 1] - self.drive_rows[i])

    def gear(self, v):
        return self.gear_rows[int(min(max(v * v / self.du, 0.0), len(self.gear_rows) - 1))]

    def forces(self, u, k):
        """Grip left for Fx after the lateral demand, and the resistance, at u = v^2, |k|."""
        normal = self.weight + self.lift_coef * u
        resistance = self.drag_coef * u + self.crr * normal
        cap = max(0.1, 1.0 - self.sens * (0.25 * normal - self.fn)) * normal
        fx_max, fy_max = self.mu_long * cap, self.mu_lat * cap
        r = self.m * u * k / fy_max
        if r >= 1.0:
            return 0.0, resistance
        if self.n == 2.0:
            return fx_max * math.sqrt(1.0 - r * r), resistance
        return fx_max * (1.0 - r ** self.n) ** (1.0 / self.n), resistance

    def drive_accel(self, u, k, share):
        grip, res = self.forces(u, k)
        return min((share * self.drive(u) - res) / self.m_eff, (grip - res) / self.m)

    def brake_accel(self, u, k):
        grip, res = self.forces(u, k)
        return (grip + res) / self.m


def highest(f, v_max, hint):
    """Highest v in [0, v_max] with f(v) <= 0 (bisection to 2^-36 relative)."""
    if f(v_max) <= 0.0:
        return v_max
    lo, hi = 0.0, v_max
    if 0.0 < hint < v_max and f(0.98 * hint) <= 0.0 and f(min(1.02 * hint, v_max)) > 0.0:
        lo, hi = 0.98 * hint, min(1.02 * hint, v_max)
    elif f(0.0) > 0.0:
        return 0.0
    while hi - lo > hi * 2.0 ** -36:
        mid = 0.5 * (lo + hi)
        if f(mid) <= 0.0:
            lo = mid
        else:
            hi = mid
    return lo


def steady_profile(car, curv):
    def usage(v, k):
        u = v * v
        normal = car.weight + car.lift_coef * u
        res = car.drag_coef * u + car.crr * normal
        cap = max(0.1, 1.0 - car.sens * (0.25 * normal - car.fn)) * normal
        return ((res / (car.mu_long * cap)) ** car.n + (car.m * u * k / (car.mu_lat * cap)) ** car.n
                - 1.0)

    def engine(v):
        u = v * v
        return car.drag_coef * u + car.crr * (car.weight + car.lift_coef * u) - car.drive(u)

    v_engine = highest(engine, car.v_max, 0.0)  # level, still air: one top speed
    out, last_k, v_grip = [], None, 0.0
    for k in curv:
        k = abs(k)
        if k != last_k:
            v_grip = highest(lambda v: usage(v, k), car.v_max, v_grip)
            last_k = k
        out.append(min(v_grip, v_engine))
    return out


CLIP = 1e-9  # a speed within 1e-9 of the limit is on it (solver.cpp clip_tolerance)


SLOPE_SPREAD = 1e-5  # solver.cpp slope_spread: the secant's least reach, relative to u
SECANT_REACH = 2.0 / 3.0  # solver.cpp secant_reach


def phi1(z):
    return 1.0 if z == 0.0 else math.expm1(z) / z


def sweep(car, curv, limit, ds, start, v_start, forward, integrator="exponential"):
    """One sweep round a closed mesh (point n-1 is point 0) from `start`; speeds per point."""
    n = len(curv)
    period = n - 1
    speed = [0.0] * n
    speed[start] = v = v_start
    gear = car.gear(v) if car.gears else 0
    cut_left = 0.0
    i = start

    for _ in range(period):
        j = (0 if i + 1 == period else i + 1) if forward else (period - 1 if i == 0 else i - 1)
        k0 = abs(curv[i])
        dk = (abs(curv[j]) - k0) / ds
        ulim0 = limit[i] * limit[i]
        dulim = (limit[j] * limit[j] - ulim0) / ds
        share = 1.0
        if forward and cut_left > 0.0:
            share = 1.0 - min(1.0, cut_left / (ds / max(v, 1e-3)))

        def rhs(u, x):
            u = max(u, 0.0)
            k = k0 + dk * x
            return 2.0 * (car.drive_accel(u, k, share) if forward else car.brake_accel(u, k))

        def rk4(u0, x0, h):
            """One RK4 step with stage states held under the limit; returns (u1, z, flagged)."""
            top = ulim0 + dulim * x0
            held = u0 > top
            y1 = top if held else u0
            k1 = rhs(y1, x0)
            same = u0 >= top and k1 > 0.0 and dk == 0.0 and dulim == 0.0
            xm, x1 = x0 + 0.5 * h, x0 + h
            topm = ulim0 + dulim * xm
            y = y1 + 0.5 * h * k1
            held |= y > topm
            y2 = min(y, topm)
            k2 = k1 if same else rhs(y2, xm)
            y = y1 + 0.5 * h * k2
            held |= y > topm
            y3 = min(y, topm)
            k3 = k1 if same else rhs(y3, xm)
            y = y1 + h * k3
            top1 = ulim0 + dulim * x1
            held |= y > top1
            k4 = k1 if same else rhs(min(y, top1), x1)
            u1 = y1 + h / 6.0 * (k1 + 2.0 * (k2 + k3) + k4)
            dy, dkh = y3 - y2, h * (k3 - k2)
            stiff = abs(dkh) > abs(dy) and abs(dy) > 1e-6 * max(y2, 1.0)
            z = dkh / dy if stiff else 0.0
            stays = False
            if held or stiff:
                stays = u0 >= top * (1.0 - 2.0 * CLIP) and u1 >= top1 * (1.0 - 2.0 * CLIP)
            return u1, z, (not stays) and (held or abs(z) > 1.0)

        def split(u0, x0, h, z, depth):
            m = min(max(math.ceil(abs(z)), 2), 16)
            sub = h / m
            u = u0
            for s in range(m):
                u1, z1, flagged = rk4(u, x0 + s * sub, sub)
                u = split(u, x0 + s * sub, sub, z1, depth + 1) if flagged and depth < 2 else u1
            return u

        def exponential(u0, h):
            """One exponential step (solver.cpp exponential_step)."""
            xm = 0.5 * h
            capm = ulim0 + dulim * xm
            um = min(u0, capm)
            fm = rhs(um, xm)
            if fm > 0.0 and u0 >= ulim0 + dulim * h:
                return u0 + h * fm  # starts on its limit and rises: clipped at the end
            d = max(SECANT_REACH * h * abs(fm), SLOPE_SPREAD * max(um, 1.0))
            ahead = um + d if fm >= 0.0 else um - d
            ud = ahead if 0.0 <= ahead <= capm else (um - d if fm >= 0.0 else um + d)
            j = (fm - rhs(ud, xm)) / (um - ud)
            return u0 + h * phi1(h * j) * (fm + j * (u0 - um))

        u0 = v * v
        if integrator == "exponential":
            u1 = exponential(u0, ds)
        else:
            u1, z, flagged = rk4(u0, 0.0, ds)
            if flagged:
                u1 = split(u0, 0.0, ds, z, 1)
        if not u1 > 0.0:
            raise RuntimeError(f"the car stops at point {j}")
        v_next = math.sqrt(u1)
        clipped = v_next >= limit[j] * (1.0 - CLIP)
        if clipped:
            v_next = limit[j]
        if forward:
            dt = 2.0 * ds / (v + v_next)
            if cut_left > 0.0:
                cut_left = max(0.0, cut_left - dt)
            if car.gears:
                best = car.gear(v_next)
                if best > gear and car.shift_time > 0.0:
                    cut_left = car.shift_time
                if best > gear or clipped:
                    gear = best
        speed[j] = v = v_next
        i = j
    speed[n - 1] = speed[0]
    return speed


def solve(car, curv, ds, integrator="exponential"):
    """Lap time (s) of a closed mesh: steady profile, both sweeps, the least of the three."""
    steady = steady_profile(car, curv)
    period = len(curv) - 1
    i0 = min(range(period), key=lambda i: steady[i])
    fwd = sweep(car, curv, steady, ds, i0, steady[i0], True, integrator)
    bwd = sweep(car, curv, steady, ds, i0, steady[i0], False, integrator)
    # A sweep that comes round slower than it started runs once more (a periodic lap).
    if fwd[i0] < steady[i0]:
        fwd = sweep(car, curv, steady, ds, i0, fwd[i0], True, integrator)
    if bwd[i0] < steady[i0]:
        bwd = sweep(car, curv, steady, ds, i0, bwd[i0], False, integrator)
    v = [min(a, b) for a, b in zip(fwd, bwd)]
    return sum(2.0 * ds / (v[i] + v[i + 1]) for i in range(len(v) - 1))


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("car")
    ap.add_argument("out_dir", help="the --out DIR of `lapwing run --model point-mass`")
    ap.add_argument("--check-json", help="`lapwing check --json` of the same car and track")
    ap.add_argument("--config", help="the config (default: the car's first, as lapwing's)")
    ap.add_argument("--repeats", type=int, default=3)
    ap.add_argument("--integrator", choices=["exponential", "rk4"], default="exponential",
                    help="the sweeps' step (lapwing's default: exponential; rk4 for a lapwing "
                    "built with the other step)")
    a = ap.parse_args()

    with open(os.path.join(a.out_dir, "summary.json"), encoding="utf-8") as f:
        result = json.load(f)["results"][0]
    power_ratio = 1.0
    if a.check_json:
        with open(a.check_json, encoding="utf-8") as f:
            power_ratio = json.load(f)["tracks"][0]["engine_power_ratio"]
    car = Car(read_yaml(a.car), a.config or result["config"], result["air_density_kg_m3"],
              power_ratio)
    trace = [t for t in os.listdir(a.out_dir) if t.startswith("trace-") and t.endswith(".csv")]
    with open(os.path.join(a.out_dir, trace[0]), encoding="utf-8") as f:
        rows = list(csv.DictReader(f))
    curv = [float(r["curvature_1pm"]) for r in rows]
    ds = result["length_m"] / (len(curv) - 1)

    best = math.inf
    for _ in range(max(1, a.repeats)):
        t0 = time.perf_counter()
        lap = solve(car, curv, ds, a.integrator)
        best = min(best, time.perf_counter() - t0)
    ref = result["lap_time_s"]
    print(f"points {len(curv)}, step {ds:.6f} m, config {result['config']}")
    print(f"lap time: script {lap:.6f} s, lapwing {ref:.6f} s, relative difference "
          f"{(lap - ref) / ref:+.2e}")
    print(f"solve: {best * 1e3:.1f} ms, {best * 1e9 / len(curv):.0f} ns per mesh point per lap "
          f"(best of {max(1, a.repeats)})")


if __name__ == "__main__":
    main()
