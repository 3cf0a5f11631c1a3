#!/usr/bin/env python3
"""Outside check of a frequency sweep with a circuit, with numpy, h5py and json.

The driven sample (parasitic-beacon.toml: one voltage source, two loaded parasites)
is swept over three frequencies (`frequencies`, the design one first). Each sweep
row must equal an independent single-frequency `lobecast compute` of the same
geometry in metres at that frequency (the circuit solved afresh there):
  * the peak directivity (the report's refined peak);
  * the realized gain at the peak, which the code defines as 4 pi U / P_available
    (coupling.h). With one source V_s behind Z_s the antenna accepts
    P_available (1 - |Gamma_s|^2), Gamma_s = (Z_in - conj(Z_s)) / (Z_in + Z_s) the
    power-wave reflection against the source (K. Kurokawa, "Power waves and the
    scattering matrix", IEEE Trans. MTT-13, 1965), and radiates e times that
    (e = P_rad / P_accepted, IEEE Std 145-2013), so
        G_realized = e (1 - |Gamma_s|^2) D,
    evaluated here from the single compute's /coupling (Z_in, Z_s, efficiency)
    and its peak directivity;
  * the worst input match: |Gamma| = |(Z_in - Z0) / (Z_in + Z0)| of the one fed
    port against reference_impedance, and VSWR = (1 + |Gamma|) / (1 - |Gamma|)
    (IEEE Std 145-2013 terms).
The sweep's report shows the realized-gain and match columns.
"""
import json
import math
import os
import re
import subprocess
import sys

import h5py
import numpy as np

from check_common import arguments, check, summary

C0 = 299792458.0  # m/s, exact
FREQS_MHZ = [433.92, 433.5, 434.5]  # the design frequency first


def metres_description(text, freq_mhz):
    """The sample at one frequency, its wavelength lengths turned into metres of the
    design wavelength (a sweep keeps the geometry; `wavelength` would rescale it)."""
    lam = C0 / 433.92e6
    out = text.replace('frequency = "433.92 MHz"', f'frequency = "{freq_mhz} MHz"')
    out = out.replace('length_unit = "wavelength"', 'length_unit = "m"')
    def scale_list(m):
        vals = [float(v) * lam for v in m.group(2).split(",")]
        return m.group(1) + "[" + ", ".join(repr(v) for v in vals) + "]"
    out = re.sub(r"^(position = )\[([^\]]*)\]", scale_list, out, flags=re.M)
    out = re.sub(r"^(length|radius)( = )([0-9.eE+-]+)",
                 lambda m: m.group(1) + m.group(2) + repr(float(m.group(3)) * lam), out,
                 flags=re.M)
    return out


def main():
    a = arguments()
    with open(os.path.join(a.samples, "parasitic-beacon.toml")) as f:
        text = f.read()
    check('frequency = "433.92 MHz"' in text and 'length_unit = "wavelength"' in text,
          "the sample still names its frequency and unit as this check expects")
    listed = ", ".join(f'"{f} MHz"' for f in FREQS_MHZ)
    swept_path = os.path.join(a.workdir, "beacon-sweep.toml")
    with open(swept_path, "w") as f:
        f.write(text.replace('frequency = "433.92 MHz"', f"frequencies = [{listed}]"))
    swept = os.path.join(a.workdir, "beacon-sweep.h5")
    subprocess.run([a.lobecast, "compute", swept_path, "-o", swept, "-q"], check=True)
    report = subprocess.run([a.lobecast, "report", swept], check=True, capture_output=True,
                            text=True).stdout
    check("realized" in report and "|Gamma|" in report and "VSWR" in report,
          "the sweep report shows realized gain, |Gamma| and VSWR columns")
    with h5py.File(swept, "r") as f:
        sweep = {k: f["/sweep/" + k][...] for k in
                 ("frequency_hz", "peak_directivity_dbi", "gain_dbi", "worst_reflection",
                  "worst_vswr")}
    check(len(sweep["frequency_hz"]) == len(FREQS_MHZ), "one sweep row per frequency")
    for row, fmhz in enumerate(FREQS_MHZ):
        path = os.path.join(a.workdir, f"beacon-{fmhz}.toml")
        with open(path, "w") as f:
            f.write(metres_description(text, fmhz))
        out = os.path.join(a.workdir, f"beacon-{fmhz}.h5")
        subprocess.run([a.lobecast, "compute", path, "-o", out, "-q"], check=True)
        j = json.loads(subprocess.run([a.lobecast, "report", "--json", out], check=True,
                                      capture_output=True, text=True).stdout)
        d_dbi = j["peak"]["directivity_dbi"]
        with h5py.File(out, "r") as f:
            g = f["/coupling"]
            z0 = g.attrs["reference_impedance_ohm"]
            eff = g.attrs["efficiency"]
            kinds = [k.decode() if isinstance(k, bytes) else str(k) for k in g["port_kind"][...]]
            fed = kinds.index("drive")
            zin = g["input_impedance_ohm"][fed]
            zs = g["port_impedance_ohm"][fed]
        gamma_s = (zin - np.conj(zs)) / (zin + zs)
        realized = d_dbi + 10 * math.log10(eff * (1 - abs(gamma_s) ** 2))
        gamma = abs((zin - z0) / (zin + z0))
        vswr = (1 + gamma) / (1 - gamma)
        name = f"{fmhz} MHz"
        check(abs(sweep["frequency_hz"][row] - fmhz * 1e6) < 1e-3, f"{name}: row frequency")
        check(abs(sweep["peak_directivity_dbi"][row] - d_dbi) < 1e-9,
              f"{name}: peak directivity {sweep['peak_directivity_dbi'][row]!r} dBi vs "
              f"single compute {d_dbi!r}")
        check(abs(sweep["gain_dbi"][row] - realized) < 1e-9,
              f"{name}: realized gain {sweep['gain_dbi'][row]!r} dBi vs e (1 - |Gamma_s|^2) D "
              f"= {realized!r} dBi (e = {eff:.6g}, |Gamma_s| = {abs(gamma_s):.6g})")
        check(abs(sweep["worst_reflection"][row] - gamma) < 1e-12,
              f"{name}: worst |Gamma| {sweep['worst_reflection'][row]!r} vs {gamma!r}")
        check(abs(sweep["worst_vswr"][row] - vswr) < 1e-9 * vswr,
              f"{name}: worst VSWR {sweep['worst_vswr'][row]!r} vs {vswr!r}")
        print(f"{name}: D {d_dbi:.4f} dBi, e {eff:.4f}, |Gamma_s| {abs(gamma_s):.4f}, "
              f"realized {realized:.4f} dBi, |Gamma| vs {z0:g} ohm {gamma:.6f}")
    # The relation can tell: the rows differ in realized gain by more than the check's
    # tolerance (the sharp tuning moves the match).
    check(float(np.ptp(sweep["gain_dbi"])) > 0.1, "the realized gain changes over the sweep")
    return summary("coupled_sweep_check")


if __name__ == "__main__":
    sys.exit(main())
