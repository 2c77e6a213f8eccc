#!/usr/bin/python3
"""study.py BANDMASS OUT_DIR: the Lakemoor Institute screening study.

The thin-film group screens three fictional compounds (orvane telluride,
kestrel antimonide, vessium nitride: grids from make_compounds.py) for a fast
transistor channel and for a thermoelectric, with silicon, germanium and
gallium arsenide beside them (the built-in handbook parameter sets, and the
project's own first-principles silicon bands). Every number comes from
bandmass operations run through `bandmass batch`, in two rounds: the first
finds the band extrema, full-band thermal masses, Seebeck coefficients, Kane
fits and carrier statistics; the second feeds the first round's extrema and
masses into valley averages, carrier statistics, cyclotron sweeps and
thermal velocities. This script only writes the manifests, ranks and prints.

Writes into OUT_DIR: the grids, manifest-1.jsonl and manifest-2.jsonl,
results-1.jsonl and results-2.jsonl (batch output), report.json and
report.csv (the ranked table), and the plots (PNG)."""
import json
import os
import subprocess
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
SI_DFT = HERE.parent / "tests" / "data" / "first-principles" / "si-24.json"
COMPOUNDS = {   # name: (long name, point group of the crystal)
    "OrTe": ("orvane telluride", "Oh"),
    "KeSb": ("kestrel antimonide", "D4h"),
    "VsN": ("vessium nitride", "Oh"),
}
REAL = {"Si": "P", "Ge": "Sb", "GaAs": "Si"}   # material: donor species
TEMPS = [100.0 + 50.0 * i for i in range(11)]          # 100 to 600 K
SWEEP = {"from": [0, 0, 1], "to": [1, 1, 0], "steps": 19}
DOPING_SEEBECK = 1e19      # cm^-3: the thermoelectric's working doping


def batch(bm, manifest, items, results):
    with open(manifest, "w") as f:
        for item_id, op, request in items:
            f.write(json.dumps({"id": item_id, "op": op, "request": request}) + "\n")
    subprocess.run([bm, "batch", str(manifest), "--output", str(results), "--quiet"],
                   check=True)
    out = {}
    for line in open(results):
        r = json.loads(line)
        if "id" in r and "status" in r:
            out[r["id"]] = r
    return out


def ok(results, item_id):
    r = results.get(item_id)
    return r["response"] if r and r["status"] == "ok" else None


def first_round(out):
    items = []
    for name in COMPOUNDS:
        grid = str(out / f"{name}-grid.json")
        items += [
            (f"{name}/conduction-minimum", "mass-tensor",
             {"grid": grid, "band": "conduction", "extremum": "minimum", "cuts": True}),
            (f"{name}/valence-maximum", "mass-tensor",
             {"grid": grid, "band": "valence", "extremum": "maximum"}),
            (f"{name}/thermal", "thermal-mass",
             {"grid": grid, "bands": "conduction", "temperatures_k": TEMPS, "density_cm3": 1e18}),
            (f"{name}/thermal-holes", "thermal-mass",
             {"grid": grid, "bands": "valence", "temperature_k": 300, "density_cm3": 1e15}),
            (f"{name}/seebeck", "thermal-mass",
             {"grid": grid, "bands": "conduction", "temperature_k": 300,
              "density_cm3": DOPING_SEEBECK}),
            (f"{name}/kane", "kane-fit",
             {"grid": grid, "band": "conduction", "temperatures_k": [100, 300, 600],
              "cuts": True}),
        ]
    for name, donor in REAL.items():
        items += [
            (f"{name}/valleys", "valley-average", {"material": name}),
            (f"{name}/carriers-temperature", "carrier-statistics",
             {"material": name, "temperatures_k": [50.0 + 25.0 * i for i in range(31)],
              "donors": [{"species": donor, "density_cm3": 1e16}]}),
            (f"{name}/carriers-doping", "carrier-statistics",
             {"material": name, "temperature_k": 300, "donors": [{"species": donor}],
              "donor_densities_cm3": [10.0 ** e for e in range(14, 21)]}),
        ]
    items += [
        ("Si/cyclotron", "cyclotron-ellipsoid", {"material": "Si", "field_directions": SWEEP}),
        ("Si/seebeck-dft", "thermal-mass",
         {"grid": str(SI_DFT), "bands": "conduction", "temperature_k": 300,
          "density_cm3": DOPING_SEEBECK}),
    ]
    return items


def second_round(out, r1):
    items = []
    for name, (long_name, group) in COMPOUNDS.items():
        cb = ok(r1, f"{name}/conduction-minimum")
        th, thh = ok(r1, f"{name}/thermal"), ok(r1, f"{name}/thermal-holes")
        if not cb or not th or not thh:
            continue
        extremum = cb["extrema"][0]
        items.append((f"{name}/valleys", "valley-average",
                      {"valley": extremum, "point_group": group}))
        at300 = next(p for p in th["points"] if p["temperature_k"] == 300)
        material = {"name": name, "long_name": long_name, "band_gap_ev": extremum["energy_ev"],
                    "electron_dos_mass_me": at300["dos_mass_me"],
                    "statistics_hole_dos_mass_me": thh["points"][0]["dos_mass_me"]}
        items.append((f"{name}/carriers-temperature", "carrier-statistics",
                      {"material": material, "temperatures_k": [50.0 + 25.0 * i for i in range(31)],
                       "donors": [{"density_cm3": 1e16, "ionization_ev": 0.03}]}))
        items.append((f"{name}/orbits", "cyclotron-orbit",
                      {"grid": str(out / f"{name}-grid.json"), "band": "conduction",
                       "energy_ev": extremum["energy_ev"] + 0.02, "field_directions": SWEEP}))
    return items


def third_round(r2, real):
    """Thermal velocities at 300 K of every candidate's conductivity mass."""
    items = []
    for name in list(COMPOUNDS) + list(REAL):
        v = ok(r2 if name in COMPOUNDS else real, f"{name}/valleys")
        if v and v.get("conductivity_mass_me"):
            items.append((f"{name}/velocity", "drude",
                          {"mass_me": v["conductivity_mass_me"], "temperature_k": 300,
                           "mobility_cm2_per_vs": 1000}))
    return items


def main(bm, out):
    out = Path(out)
    out.mkdir(parents=True, exist_ok=True)
    subprocess.run(["/usr/bin/python3", str(HERE / "make_compounds.py"), str(out)], check=True)
    for f in out.glob("results-*.jsonl"):
        f.unlink()   # a fresh study each time (batch would resume an old one)
    r1 = batch(bm, out / "manifest-1.jsonl", first_round(out), out / "results-1.jsonl")
    r2 = batch(bm, out / "manifest-2.jsonl", second_round(out, r1), out / "results-2.jsonl")
    r3 = batch(bm, out / "manifest-3.jsonl", third_round(r2, r1), out / "results-3.jsonl")

    rows = []
    for name in list(COMPOUNDS) + list(REAL):
        fictional = name in COMPOUNDS
        valleys = ok(r2 if fictional else r1, f"{name}/valleys")
        seebeck = ok(r1, f"{name}/seebeck" if fictional else f"{name}/seebeck-dft")
        velocity = ok(r3, f"{name}/velocity")
        s_point = seebeck["points"][0] if seebeck else None
        warnings = sum(len(r.get("response", {}).get("warning_codes", []))
                       for res in (r1, r2) for k, r in res.items() if k.startswith(name + "/"))
        rows.append({
            "candidate": name,
            "kind": COMPOUNDS[name][0] + " (fictional)" if fictional else "handbook parameters",
            "valleys": valleys["valley_count"] if valleys else None,
            "conductivity_mass_me": valleys["conductivity_mass_me"] if valleys else None,
            "dos_mass_me": valleys["dos_mass_me"] if valleys else None,
            "thermal_velocity_cm_per_s": velocity["thermal_velocity_cm_per_s"] if velocity else None,
            "seebeck_uv_per_k": s_point["seebeck_uv_per_k"][0] if s_point else None,
            "seebeck_source": None if not s_point else
                "model grid" if fictional else "LDA silicon bands, 24^3 (tests/data)",
            "warnings": warnings,
        })
    report = {"study": "Lakemoor Institute channel and thermoelectric screening (fictional)",
              "rows": rows}
    (out / "report.json").write_text(json.dumps(report, indent=1) + "\n")
    keys = list(rows[0])
    with open(out / "report.csv", "w") as f:
        f.write(",".join(keys) + "\n")
        for row in rows:
            f.write(",".join("" if row[k] is None else str(row[k]) for k in keys) + "\n")

    def ranked(key, reverse):
        have = [r for r in rows if r[key] is not None]
        return sorted(have, key=lambda r: abs(r[key]), reverse=reverse)

    print("Lakemoor Institute, thin-film screening group: channel and thermoelectric candidates")
    print("(three fictional compounds from model bands; Si, Ge, GaAs from handbook parameters,")
    print(" Si's Seebeck coefficient from the project's LDA silicon grid; no grids for Ge, GaAs)\n")
    print(f"{'candidate':10} {'valleys':>7} {'m_c (m_e)':>10} {'m_dos (m_e)':>11} "
          f"{'v_th 300 K (cm/s)':>18} {'S at 1e19 (uV/K)':>17} {'warnings':>8}")
    def fmt(v, f):
        return format("-", ">" + f.split(".")[0]) if v is None else format(v, f)

    for r in rows:
        print(f"{r['candidate']:10} {fmt(r['valleys'], '7.1f')} "
              f"{fmt(r['conductivity_mass_me'], '10.4f')} {fmt(r['dos_mass_me'], '11.4f')} "
              f"{fmt(r['thermal_velocity_cm_per_s'], '18.3e')} {fmt(r['seebeck_uv_per_k'], '17.1f')} "
              f"{r['warnings']:8d}")
    print()
    channel = ranked("conductivity_mass_me", False)
    fast = ranked("thermal_velocity_cm_per_s", True)
    thermo = ranked("seebeck_uv_per_k", True)
    print("lightest conductivity mass: " + ", ".join(
        f"{r['candidate']} {r['conductivity_mass_me']:.3f}" for r in channel))
    print("highest thermal velocity:   " + ", ".join(
        f"{r['candidate']} {r['thermal_velocity_cm_per_s']:.2e}" for r in fast))
    print(f"largest |Seebeck| at {DOPING_SEEBECK:.0e} cm^-3, 300 K: " + ", ".join(
        f"{r['candidate']} {r['seebeck_uv_per_k']:.0f}" for r in thermo))
    print("\nEach figure rests on the batch results beside the report; the warnings column")
    print("counts what the operations flagged (unconverged masses, unresolved windows).")

    plots = [
        ("Si-carriers-temperature.png", "Si/carriers-temperature", "results-1.jsonl"),
        ("Si-carriers-doping.png", "Si/carriers-doping", "results-1.jsonl"),
        ("Si-cyclotron.png", "Si/cyclotron", "results-1.jsonl"),
    ] + [(f"{n}-thermal.png", f"{n}/thermal", "results-1.jsonl") for n in COMPOUNDS] \
      + [(f"{n}-kane.png", f"{n}/kane", "results-1.jsonl") for n in COMPOUNDS] \
      + [(f"{n}-cuts.png", f"{n}/conduction-minimum", "results-1.jsonl") for n in COMPOUNDS] \
      + [(f"{n}-orbits.png", f"{n}/orbits", "results-2.jsonl") for n in COMPOUNDS]
    made = []
    for png, item, results in plots:
        p = subprocess.run([bm, "plot", str(out / results), "--item", item,
                            "--output", str(out / png)], capture_output=True, text=True)
        if p.returncode == 0:
            made.append(png)
        else:
            print(f"plot {png}: {p.stderr.strip()}")
    print(f"\nreport, batch results and {len(made)} plots in {out}")


if __name__ == "__main__":
    main(sys.argv[1], sys.argv[2] if len(sys.argv) > 2 else os.path.join(os.getcwd(), "study"))
