#!/usr/bin/env python3
"""Outside check of `lobecast link` and `lobecast exposure` with Debian's numpy and h5py.

Runs `lobecast compute` on samples and checks, independently of the C++ code:
  * Friis: P_r = P_t G_t G_r PLF (lambda / (4 pi R))^2, EIRP = P_t G_t, path loss
    (4 pi R / lambda)^2 (Balanis, Antenna Theory, 4th ed., sec. 2.17, the Friis
    transmission equation; section from memory), with the Hertzian dipole's
    broadside directivity 1.5 (Balanis sec. 4.2, from memory);
  * polarization loss factor (IEEE Std 145-2013 polarization efficiency; Balanis
    sec. 2.12.2, from memory): 1 matched, 0 orthogonal linear, 1/2 linear against
    circular, 0 RHCP against LHCP, for named receivers and for two real results facing
    each other (two z dipoles: 1; one turned 90 deg: 0; 45 deg: 1/2; a turnstile
    against its untouched copy on the beam axis: 0, the copy radiating the other hand
    backward; turned 180 deg about x to face it: 1), the two-result PLF recomputed with
    numpy from the stored grid fields (|e_t . h_r|^2 / (|e_t|^2 |h_r|^2), plain dot);
  * the transmit directivity toward the receiver equals the report's refined peak (dBi)
    there; with loss data the gain is D P_rad / P_accepted, with drive data the realized
    gain D P_rad / P_available (both from /coupling);
  * the far-field warning inside 2 D^2 / lambda (Balanis sec. 2.2.4, from memory) or
    a few wavelengths (common practice);
  * exposure: r = sqrt(EIRP / (4 pi S)) and S = EIRP / (4 pi r^2) (Balanis sec. 2.4,
    from memory), the cautions in every output, CSV readable by Python's csv module,
    the map written as a PNG;
  * misuse exits 2 and writes nothing.
Limits in these checks are arbitrary test numbers, not exposure limits.
"""
import csv
import io
import json
import math
import os
import subprocess
import sys

import h5py
import numpy as np

from check_common import arguments, check, summary

C0 = 299792458.0


def run(args, *extra):
    return subprocess.run([args.lobecast, *extra], capture_output=True, text=True)


def compute(args, sample):
    out = os.path.join(args.workdir, os.path.splitext(sample)[0] + ".h5")
    r = run(args, "compute", os.path.join(args.samples, sample), "-o", out, "-q")
    if not check(r.returncode == 0, f"compute {sample}: {r.stderr}"):
        sys.exit(summary("link_check"))
    return out


def link_json(args, *extra):
    r = run(args, "link", *extra, "--json")
    if not check(r.returncode == 0, f"link {' '.join(extra)}: exit {r.returncode}: {r.stderr}"):
        return None, r
    return json.loads(r.stdout), r


def near(a, b, rel, what):
    ok = abs(a - b) <= rel * max(abs(a), abs(b), 1e-300)
    return check(ok, f"{what}: {a!r} vs {b!r}")


def field_vector(f, i, j):
    """rE as a Cartesian complex vector at grid point (i, j) (theta-major)."""
    t = math.radians(f["/grid/theta_deg"][i])
    p = math.radians(f["/grid/phi_deg"][j])
    th = np.array([math.cos(t) * math.cos(p), math.cos(t) * math.sin(p), -math.sin(t)])
    ph = np.array([-math.sin(p), math.cos(p), 0.0])
    return f["/field/rE_theta"][i, j] * th + f["/field/rE_phi"][i, j] * ph


def plf(e, h):
    return abs(np.sum(e * h)) ** 2 / (np.vdot(e, e).real * np.vdot(h, h).real)


def main():
    args = arguments()
    dipole = compute(args, "single-dipole.toml")
    turnstile = compute(args, "turnstile.toml")
    line8 = compute(args, "broadside-line-8.toml")
    panel = compute(args, "planar-4x4-ground.toml")
    beacon = compute(args, "parasitic-beacon.toml")

    # Friis on the z dipole toward broadside: G_t = 1.5 (Hertzian), G_r given 2.15 dBi.
    lam = C0 / 433.92e6
    j, _ = link_json(args, dipole, "--toward", "90,0", "--distance", "1000", "--power", "2",
                     "--rx-gain-dbi", "2.15", "--sensitivity", "-100")
    if j:
        near(j["transmitter"]["gain_dbi"], 10 * math.log10(1.5), 1e-9, "Hertzian gain 1.5")
        check(j["transmitter"]["gain_definition"] == "directivity", "lossless: directivity")
        gr = 10 ** 0.215
        pr = 2 * 1.5 * gr * (lam / (4 * math.pi * 1000)) ** 2
        near(j["received_w"], pr, 1e-9, "Friis received power")
        near(j["eirp_w"], 3.0, 1e-9, "EIRP = P G")
        near(j["path_loss_db"], 20 * math.log10(4 * math.pi * 1000 / lam), 1e-12, "path loss")
        near(j["received_dbm"], 10 * math.log10(pr / 1e-3), 1e-9, "dBm")
        near(j["margin_db"], 10 * math.log10(pr / 1e-3) + 100, 1e-9, "margin")
        check(j["polarization_loss_factor"] == 1, "no --rx-polarization: matched")
        check(j["cautions"] == [], f"1000 m is far field: {j['cautions']}")
        check("not an RF-exposure" in j["safety_note"], "the safety note in the JSON")

    # Named receivers at broadside of a z dipole: E is along theta_hat (= -z there).
    for pol, want in [("theta", 1.0), ("phi", 0.0), ("rhcp", 0.5), ("lhcp", 0.5),
                      ("x", 1.0), ("y", 0.0)]:
        j, _ = link_json(args, dipole, "--toward", "90,0", "--distance", "100", "--power", "1",
                         "--rx-polarization", pol)
        if j:
            check(abs(j["polarization_loss_factor"] - want) < 1e-12,
                  f"PLF z dipole vs {pol}: {j['polarization_loss_factor']} (want {want})")
    # The turnstile's beam (+z) is right-hand: RHCP 1, LHCP 0.
    for pol, want in [("rhcp", 1.0), ("lhcp", 0.0), ("x", 0.5)]:
        j, _ = link_json(args, turnstile, "--toward", "0,0", "--distance", "100", "--power", "1",
                         "--rx-polarization", pol)
        if j:
            check(abs(j["polarization_loss_factor"] - want) < 1e-12,
                  f"PLF turnstile vs {pol}: {j['polarization_loss_factor']} (want {want})")

    # Two results facing each other.
    for extra, want in [([], 1.0), (["--rx-rotate", "1,0,0,90"], 0.0),
                        (["--rx-rotate", "1,0,0,45"], 0.5), (["--rx-rotate", "0,0,1,180"], 1.0)]:
        j, _ = link_json(args, dipole, "--toward", "90,0", "--distance", "100", "--power", "1",
                         "--rx", dipole, *extra)
        if j:
            check(abs(j["polarization_loss_factor"] - want) < 1e-12,
                  f"two z dipoles {extra}: PLF {j['polarization_loss_factor']} (want {want})")
            near(j["receiver"]["gain_dbi"], 10 * math.log10(1.5), 1e-9, f"rx gain {extra}")
    j, _ = link_json(args, dipole, "--tx-position", "0,0,0", "--rx-position", "0,50,0",
                     "--power", "1", "--rx", dipole)
    if j:
        check(abs(j["distance_m"] - 50) < 1e-12, "distance from positions")
        check(abs(j["toward"]["theta_deg"] - 90) < 1e-9 and abs(j["toward"]["phi_deg"] - 90)
              < 1e-9, f"direction from positions: {j['toward']}")
        rd = j["receiver"]["direction_own_coordinates"]
        check(abs(rd["theta_deg"] - 90) < 1e-9 and abs(rd["phi_deg"] - 270) < 1e-9,
              f"receiver looks back along -r_hat: {rd}")
    with h5py.File(turnstile) as f:
        e_up = field_vector(f, 0, 0)                       # theta 0: toward +z
        nt = f["/grid/theta_deg"].shape[0]
        h_down = field_vector(f, nt - 1, 0)                # theta 180: toward -z
        R = np.diag([1.0, -1.0, -1.0])                     # 180 deg about x
        h_turned = R @ field_vector(f, 0, 0)               # its +z beam, turned to face -z
    for extra, want, ref in [([], 0.0, plf(e_up, h_down)),
                             (["--rx-rotate", "1,0,0,180"], 1.0, plf(e_up, h_turned))]:
        j, _ = link_json(args, turnstile, "--toward", "0,0", "--distance", "100", "--power", "1",
                         "--rx", turnstile, *extra)
        if j:
            got = j["polarization_loss_factor"]
            check(abs(got - want) < 1e-12 and abs(ref - want) < 1e-12,
                  f"turnstile facing its copy {extra}: PLF {got}, numpy {ref}, want {want}")

    # The gain toward the receiver equals the refined peak of the report (on the grid
    # for the broadside line, off it for the steered line).
    steered = compute(args, "steered-line-scan.toml")
    for result in (line8, steered):
        r = run(args, "report", result, "--json")
        peak = json.loads(r.stdout)["peak"]
        toward = f"{peak['direction']['theta_deg']!r},{peak['direction']['phi_deg']!r}"
        j, _ = link_json(args, result, "--toward", toward, "--distance", "1e4", "--power", "1")
        if j:
            near(j["transmitter"]["directivity_dbi"], peak["directivity_dbi"], 1e-12,
                 f"{result}: directivity toward the refined peak {toward} = report's peak dBi")
    # The steered line's copper wires: gain = efficiency x directivity (P_rad / P_accepted).
    with h5py.File(steered) as f:
        c = f["/coupling"].attrs
        efficiency = c["radiated_w"] / c["accepted_w"]
    if j:
        t = j["transmitter"]
        check(t["gain_definition"] == "gain", f"steered line: {t['gain_definition']}")
        near(10 ** (t["gain_dbi"] / 10), 10 ** (t["directivity_dbi"] / 10) * efficiency, 1e-12,
             "gain = efficiency x directivity")

    # Drive data: realized gain = D P_rad / P_available.
    with h5py.File(beacon) as f:
        c = f["/coupling"].attrs
        factor = c["radiated_w"] / c["available_w"]
    j, _ = link_json(args, beacon, "--toward", "90,0", "--distance", "500", "--power", "0.1")
    if j:
        t = j["transmitter"]
        check(t["gain_definition"] == "realized gain", f"beacon: {t['gain_definition']}")
        near(10 ** (t["gain_dbi"] / 10), 10 ** (t["directivity_dbi"] / 10) * factor, 1e-12,
             "realized gain = D P_rad / P_available")
        check("available" in j["power_meaning"], f"power meaning: {j['power_meaning']}")

    # Far-field validity: the 4x4 panel over ground.
    with h5py.File(panel) as f:
        pos = f["/array/position"][...]
        lam_p = float(f["/array"].attrs["wavelength_m"])
    j, rr = link_json(args, panel, "--toward", "0,0", "--distance", str(lam_p), "--power", "1")
    if j:
        check(any("inside the far field" in c for c in j["cautions"]),
              f"one wavelength: far-field caution {j['cautions']}")
        check("inside the far field" in rr.stderr, "far-field caution on stderr")
        d_min = max(np.linalg.norm(a - b) for a in pos for b in pos)
        ff = j["transmitter"]["fraunhofer_distance_m"]
        check(ff >= 2 * d_min ** 2 / lam_p, f"2 D^2 / lambda {ff} >= positions' {d_min}")
    r = run(args, "link", panel, "--toward", "120,0", "--distance", "100", "--power", "1")
    check(r.returncode == 2 and "below the transmitter's PEC ground" in r.stderr,
          f"below ground refused: {r.returncode} {r.stderr}")

    # Misuse: exit 2, nothing written.
    out = os.path.join(args.workdir, "refused.json")
    for extra in [["--distance", "10"],
                  ["--toward", "90,0", "--distance", "10", "--rx", dipole, "--rx-gain-dbi", "3"],
                  ["--toward", "90,0", "--distance", "-1"],
                  ["--toward", "90,0", "--distance", "10", "--tx-position", "0,0,0"],
                  ["--toward", "90,0", "--distance", "10", "--rx-rotate", "1,0,0,90"],
                  ["--toward", "90,0", "--distance", "10", "--rx-polarization", "diagonal"]]:
        if os.path.exists(out):
            os.remove(out)
        r = run(args, "link", dipole, "--power", "1", *extra, "-o", out)
        check(r.returncode == 2 and r.stderr.startswith("lobecast: ") and not os.path.exists(out),
              f"link {extra}: exit {r.returncode}, {r.stderr.strip()}")
    r = run(args, "link", dipole, "--toward", "90,0", "--distance", "10", "--power", "1", "--rx",
            turnstile)
    check(r.returncode == 2 and "transmitter's frequency" in r.stderr,
          f"frequencies differ: {r.stderr}")

    # Text and CSV.
    r = run(args, "link", dipole, "--toward", "90,0", "--distance", "1000", "--power", "1")
    check(r.returncode == 0 and "path loss" in r.stdout and "not an RF-exposure" in r.stdout,
          "link table with the safety note")
    r = run(args, "link", dipole, "--toward", "90,0", "--distance", "1000", "--power", "1", "--csv")
    rows = list(csv.reader(io.StringIO(r.stdout)))
    check(len(rows) == 2 and len(rows[0]) == len(rows[1]) and rows[0][-1] == "notes",
          f"link CSV shape: {rows[:1]}")
    if len(rows) == 2:
        row = dict(zip(rows[0], rows[1]))
        near(float(row["tx_gain_dBi"]), 10 * math.log10(1.5), 1e-9, "CSV gain")

    # Exposure: the inverse pair, the worst direction and the cautions.
    p, s_lim, dist = 10.0, 2.0, 5.0
    r = run(args, "exposure", dipole, "--power", str(p), "--limit", str(s_lim), "--distance",
            str(dist), "--json")
    if check(r.returncode == 0, f"exposure: {r.stderr}"):
        e = json.loads(r.stdout)
        w = e["rows"][0]
        check(w["kind"] == "worst", "worst row first")
        eirp = p * 1.5
        near(w["eirp_w"], eirp, 1e-9, "worst EIRP")
        near(w["distance_to_limit_m"], math.sqrt(eirp / (4 * math.pi * s_lim)), 1e-9,
             "r = sqrt(EIRP / (4 pi S))")
        near(w["density_w_m2"], eirp / (4 * math.pi * dist ** 2), 1e-9, "S = EIRP / (4 pi r^2)")
        for row in e["rows"]:
            g = 10 ** (row["gain_dbi"] / 10) if row["gain_dbi"] != "-inf" else 0.0
            check(abs(row["distance_to_limit_m"] - math.sqrt(p * g / (4 * math.pi * s_lim)))
                  <= 1e-9 * max(1, row["distance_to_limit_m"]), f"row {row}")
            check(row["distance_to_limit_m"] <= w["distance_to_limit_m"] * (1 + 1e-12),
                  f"no row beyond the worst: {row}")
        note = e["exposure_note"]
        check("far-field estimate" in note and "reflections" in note and
              "qualified persons" in note and "no exposure limits" in note, "exposure note")
        check(any("free space" in c for c in e["cautions"]), "free-space caution")
    png = os.path.join(args.workdir, "exposure.png")
    r = run(args, "exposure", panel, "--power", "100", "--limit", "10", "--map", png, "--csv")
    if check(r.returncode == 0, f"exposure map: {r.stderr}"):
        with open(png, "rb") as f:
            check(f.read(8) == b"\x89PNG\r\n\x1a\n", "map is a PNG")
        rows = list(csv.reader(io.StringIO(r.stdout)))
        check(all(len(x) == len(rows[0]) for x in rows), "exposure CSV is rectangular")
        check(rows[0][:3] == ["kind", "theta_deg", "phi_deg"] and rows[0][-1] == "notes",
              f"exposure CSV header {rows[0]}")
        notes = " ".join(x[-1] for x in rows)
        check("PEC" in notes and "qualified persons" in notes, "ground and compliance notes")
        check("qualified persons" in r.stderr, "the exposure line on stderr")
    r = run(args, "exposure", dipole, "--power", "1", "--limit", "0")
    check(r.returncode == 2, f"limit 0 refused: {r.returncode}")
    r = run(args, "exposure", dipole, "--power", "1", "--limit", "1", "--projection", "uv")
    check(r.returncode == 2, f"--projection without --map refused: {r.returncode}")
    return summary("link_check")


if __name__ == "__main__":
    sys.exit(main())
