#!/usr/bin/env bash
# demo.sh: the Lakemoor Institute screening study of orvane telluride (OrTe),
# a fictional rock-salt semiconductor, next to silicon. Installs what is
# missing, builds, runs the study through the bandmass command line and
# prints its report.
set -euo pipefail
here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
source "$here/../tests/setup.sh"

bm="$build/plugin/bandmass"
py=/usr/bin/python3
work="$build/demo"
mkdir -p "$work"

# Pulls one value out of a JSON response: json FILE 'python expression on r'
json() { "$py" -c "import json,sys; r=json.load(open(sys.argv[1])); print($2)" "$1"; }

section() { printf '\n== %s ==\n' "$1"; }

echo "Lakemoor Institute, thin-film screening group"
echo "Candidate absorber: orvane telluride (OrTe, fictional), fcc, a = 6.1 Angstrom"
echo "Band data: 24 x 24 x 24 k-mesh over the whole zone, 2 bands"

"$py" "$here/make_orvane_bands.py" "$work"
grid="$work/orvane-grid.json"

section "1. Conduction-band minimum: inertial mass tensor"
"$bm" mass-tensor --grid "$grid" --band conduction --extremum minimum
"$bm" mass-tensor --grid "$grid" --band conduction --extremum minimum --json --output "$work/cb.json"

section "2. Valence-band maximum"
"$bm" mass-tensor --grid "$grid" --band valence --extremum maximum
"$bm" mass-tensor --grid "$grid" --band valence --extremum maximum --json --output "$work/vb.json"

section "3. Conduction valleys: the X star of the fcc zone (point group Oh, zone face)"
valley=$(json "$work/cb.json" 'json.dumps({"principal_masses_me": r["extrema"][0]["principal_masses_me"],
    "axes": r["extrema"][0]["principal_axes"], "direction": r["extrema"][0]["k_inv_angstrom"]})')
"$bm" valley-average --valley "$valley" --point-group Oh --position face
"$bm" valley-average --valley "$valley" --point-group Oh --position face --json --output "$work/valleys.json"

section "4. Silicon for comparison: six X valleys, m_l = 0.98, m_t = 0.19 (Sze & Ng 2007)"
"$bm" valley-average --valley '{"longitudinal_mass_me": 0.98, "transverse_mass_me": 0.19, "axis": [1, 0, 0]}' \
    --point-group Oh --position interior

if "$bm" ops | grep -q carrier-statistics; then
    section "5. Carriers in OrTe, donors 1e17 cm^-3 at 40 meV, 100-500 K"
    me=$(json "$work/valleys.json" 'r["dos_mass_me"]')
    mh=$(json "$work/vb.json" 'abs(r["extrema"][0]["principal_masses_me"][0])')
    material="{\"name\": \"OrTe\", \"electron_dos_mass_me\": $me, \"statistics_hole_dos_mass_me\": $mh, \"band_gap_ev\": 0.85}"
    args=(--material "$material" --temperatures-k 100,200,300,400,500
          --donors '[{"density_cm3": 1e17, "ionization_ev": 0.04}]')
    "$bm" carrier-statistics "${args[@]}"
    "$bm" carrier-statistics "${args[@]}" --csv --output "$work/orte-carriers.csv"
    section "6. Silicon, phosphorus 1e16 cm^-3, 300 K"
    "$bm" carrier-statistics --material Si --temperature-k 300 \
        --donors '[{"density_cm3": 1e16, "ionization_ev": 0.045}]'
fi

section "Files"
echo "responses and tables in $work"
echo "These are model numbers for screening; check them against measurement before any decision that matters."
