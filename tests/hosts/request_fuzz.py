#!/usr/bin/python3
"""request_fuzz.py: every operation, fed deterministic but malformed requests
through `bandmass call`, must answer with exit 0 (a response) or 2 (a message
starting "bandmass: error:"), never a signal, a hang or an internal failure.
Each request is a valid example with one key replaced by a hostile value."""
import json
import random
import subprocess
import sys


def examples(grid):
    """A valid request for every operation; grid: a small band grid document."""
    return {
        "constants": {},
        "mass-tensor": {"grid": grid, "band": 0, "extremum": "all"},
        "valley-average": {"valley": {"longitudinal_mass_me": 0.98, "transverse_mass_me": 0.19,
                                      "axis": [1, 0, 0]}, "point_group": "Oh", "position": "interior"},
        "hole-mass": {"heavy_hole_mass_me": 0.49, "light_hole_mass_me": 0.16,
                      "luttinger_parameters": [6.98, 2.06, 2.93]},
        "carrier-statistics": {"material": "Si", "temperatures_k": [100, 300],
                               "donors": [{"density_cm3": 1e16, "ionization_ev": 0.045}],
                               "acceptors": [{"species": "B", "density_cm3": 1e15}]},
        "band-gap": {"material": "GaAs", "temperature_k": 300},
        "cyclotron-orbit": {"grid": grid, "band": 0, "energy_ev": 1.0,
                            "field_direction": [0, 0, 1]},
        "kane-fit": {"grid": grid, "band": 0, "temperatures_k": [300]},
        "thermal-mass": {"grid": grid, "bands": [0], "temperatures_k": [100, 300],
                         "density_cm3": 1e20},
        "fermi-integral": {"order": 0.5, "eta": [-3, 0, 3]},
        "cyclotron-ellipsoid": {"valley": {"longitudinal_mass_me": 0.98, "transverse_mass_me": 0.19,
                                           "axis": [1, 0, 0]}, "point_group": "Oh",
                                "field_directions": {"from": [0, 0, 1], "to": [1, 1, 0], "steps": 3}},
        "cyclotron-holes": {"luttinger_parameters": [6.98, 2.06, 2.93], "field_direction": [1, 0, 0],
                            "hole_energy_ev": 0.01},
        "resonance": {"frequency_ghz": [14, 28, 43], "field_t": [0.5, 1, 1.5],
                      "frequency_stderr_ghz": 0.2},
        "oscillation-damping": {"field_t": 6, "temperatures_k": [1, 2, 3, 4],
                                "amplitudes": [1, 0.8, 0.55, 0.35],
                                "dingle": {"fields_t": [3, 4, 6], "amplitudes": [0.2, 0.5, 1],
                                           "temperature_k": 1, "field_power": 0.5}},
        "specific-heat-mass": {"temperatures_k": [1, 2, 3, 4],
                               "heat_capacity_mj_per_mol_k": [0.7431, 1.7748, 3.3837, 5.8584],
                               "fermi_energy_ev": 7, "electrons_per_atom": 1},
        "sheet-density": {"subbands": [{"energy_ev": 0.0, "mass_me": 0.067}], "temperature_k": 4,
                          "fermi_level_ev": 0.01},
        "drude": {"mass_me": 0.26, "scattering_time_s": 1e-13, "density_cm3": 1e16,
                  "temperature_k": 300},
        "materials": {"name": "Si"},
    }


HOSTILE = [None, True, -1, 0, 1e308, -1e308, 1e-320, "", "x" * 5000, "../../etc/passwd",
           [], [[]], [None], [1e308] * 3, {}, {"a": {"b": {"c": []}}}, [0] * 2000,
           "NaN", "Infinity", -0.0, 2 ** 62, [[1, 2, 3], [4, 5]], "Oh", "face"]


def mutate(req, rng):
    req = json.loads(json.dumps(req))
    if not req or rng.random() < 0.2:
        req["unexpected_key_" + str(rng.randrange(9))] = rng.choice(HOSTILE)
        return req
    key = rng.choice(sorted(req))
    value = req[key]
    if isinstance(value, dict) and value and rng.random() < 0.6:
        sub = rng.choice(sorted(value))
        value[sub] = rng.choice(HOSTILE)
    elif isinstance(value, list) and value and isinstance(value[0], dict) and rng.random() < 0.6:
        sub = rng.choice(sorted(value[0]))
        value[0][sub] = rng.choice(HOSTILE)
    else:
        req[key] = rng.choice(HOSTILE)
    return req


def main():
    cli, grid = sys.argv[1], sys.argv[2]
    rounds = int(sys.argv[3]) if len(sys.argv) > 3 else 12
    EXAMPLES = examples(grid)
    rng = random.Random(int(sys.argv[4]) if len(sys.argv) > 4 else 20261202)
    ops = json.loads(subprocess.run([cli, "ops", "--json"], capture_output=True,
                                    check=True).stdout)
    names = sorted(o["name"] for o in ops)
    missing = [n for n in names if n not in EXAMPLES]
    if missing:
        print("no example request for", missing)
        return 1
    failures = 0
    total = 0
    for name in names:
        for _ in range(rounds):
            req = mutate(EXAMPLES[name], rng)
            text = json.dumps(req)
            p = subprocess.run([cli, "call", name, "--compact"], input=text.encode(),
                               capture_output=True, timeout=60)
            total += 1
            err = p.stderr.decode(errors="replace")
            ok = (p.returncode == 0 and json.loads(p.stdout) is not None) or \
                 (p.returncode == 2 and err.startswith("bandmass: error: "))
            if not ok:
                failures += 1
                print("FAIL", name, "exit", p.returncode, text[:300], err[:300])
    print("%d passed, %d failed" % (total - failures, failures))
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
