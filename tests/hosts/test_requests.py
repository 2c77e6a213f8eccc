#!/usr/bin/python3
"""test_requests.py: the request files under examples/requests run through
`bandmass call` and give what their README says they show."""
import json
import os
import subprocess
import sys

CLI = os.environ["BANDMASS_CLI"]
HERE = sys.argv[1]          # examples/requests


def call(op, path):
    p = subprocess.run([CLI, "call", op, "--input", path, "--compact"], cwd=HERE,
                       capture_output=True, text=True)
    assert p.returncode == 0, (op, path, p.stderr)
    r = json.loads(p.stdout)
    assert "warnings" in r and "warning_codes" in r, (op, path)
    aligned(r, op + " " + path)
    return r


def aligned(o, where):
    """Every object with warnings has a "warning_codes" array of the same length."""
    if isinstance(o, dict):
        if "warnings" in o or "warning_codes" in o:
            w, c = o.get("warnings"), o.get("warning_codes")
            assert isinstance(w, list) and isinstance(c, list) and len(w) == len(c), where
            assert all(isinstance(x, str) and x for x in c), where
        for v in o.values():
            aligned(v, where)
    elif isinstance(o, list):
        for v in o:
            aligned(v, where)


failures = []


def check(what, ok):
    print(("ok     " if ok else "FAILED ") + what)
    if not ok:
        failures.append(what)


# Synthetic round trip: the cut was made from m = -0.23 m_e with 2 meV noise.
r = call("mass-tensor", "orte-arpes-mass.json")
m = r["extrema"][0]["principal_masses_me"]
check("line cut gives one mass, -0.23 m_e within 3 %",
      r["extrema"][0]["dims"] == 1 and abs(m[0] / -0.23 - 1) < 0.03 and m[1] is None)
se = r["extrema"][0]["principal_masses_stderr_me"][0]
check("its standard error is stated and -0.23 lies within two of it",
      se is not None and 0 < se and abs(m[0] + 0.23) <= 2 * se)

# Compensated n-Si: n -> N_D - N_A once ionised (charge neutrality, identity).
r = call("carrier-statistics", "si-carriers.json")
n300 = [p for p in r["points"] if p["temperature_k"] == 300][0]["n_cm3"]
check("n-Si at 300 K carries N_D - N_A = 8e15 within 2 %", abs(n300 / 8e15 - 1) < 0.02)

# Strained Si: lowered pair along z; the in-plane conductivity mass moves from
# the unstrained 0.2598 toward m_t = 0.19 (limit of the population average).
r = call("valley-average", "strained-si-valleys.json")
t = r["conductivity_mass_tensor_me"]
check("strained Si: in-plane mass between m_t and the unstrained value",
      0.19 < t[0][0] < 0.2598 and abs(t[0][0] - t[1][1]) < 1e-12 and t[2][2] > 0.2598)
# The scalar 3 / tr(M^-1) cannot move: every valley's inverse tensor has the
# trace 1/m_l + 2/m_t (identity), so the population-weighted mean keeps it.
ml, mt = 0.98, 0.19   # the masses the example request gives
check("strained Si: the scalar stays 3 / (1/m_l + 2/m_t) and the response says why",
      abs(r["conductivity_mass_me"] - 3 / (1 / ml + 2 / mt)) < 1e-9
      and "no shift of the valley populations" in r["conductivity_mass_meaning"])
keys = list(r)
check("strained Si: the directional masses come before the scalar",
      keys.index("conductivity_principal_masses_me") < keys.index("conductivity_mass_me"))

r = call("hole-mass", "gaas-holes.json")
g1, g2 = 6.98, 2.06   # GaAs Luttinger parameters of the built-in table (Vurgaftman et al. 2001)
check("GaAs [100] heavy hole is 1/(g1 - 2 g2)",
      abs(r["luttinger"]["heavy_hole_mass_me"]["100"] - 1 / (g1 - 2 * g2)) < 1e-9)

r = call("carrier-statistics", "orte-carriers.json")
check("material file with its own donor species solves at 3 temperatures",
      len(r["points"]) == 3 and all(p["n_cm3"] > 0 for p in r["points"]))

# A saved and edited materials output is a material file; its hole DOS mass
# 1.04 gives Nv(300 K) = 2.65e19 cm^-3 (Sze & Ng 2007 App. G, from memory; 1 %).
r = call("carrier-statistics", "si-sze-carriers.json")
check("Si with Sze & Ng's hole DOS mass: Nv(300 K) = 2.65e19 within 1 %",
      abs(r["points"][0]["nv_cm3"] / 2.65e19 - 1) < 0.01
      and r["points"][0]["statistics_hole_dos_mass_me"] == 1.04)

print("%d passed, %d failed" % (6 - len(failures), len(failures)))
sys.exit(1 if failures else 0)
