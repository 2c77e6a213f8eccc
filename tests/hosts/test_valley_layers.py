#!/usr/bin/python3
# test_valley_layers.py: valley-average with confinement (subband ladders),
# strain (deformation potentials) and mass errors.
#
# References:
# - Si inversion layers, with m_l = 0.916 and m_t = 0.190 (Stern & Howard,
#   Phys. Rev. 163, 816 (1967); the table of Ando, Fowler & Stern, Rev. Mod.
#   Phys. 54, 437 (1982); values from memory):
#     (001): 2 valleys m_z 0.916, m_d 0.190; 4 valleys m_z 0.190, m_d 0.417
#     (110): 4 valleys m_z 0.315, m_d 0.324; 2 valleys m_z 0.190, m_d 0.417
#     (111): 6 valleys m_z 0.258, m_d 0.358
# - identity: m_d^2 m_z = m1 m2 m3 for any valley and plane.
# - strain: Herring & Vogt (Phys. Rev. 101, 944 (1956)): a valley along a
#   moves by Xi_d tr(e) + Xi_u a.e.a; Si Xi_u = 9.16 eV (built in, Van de
#   Walle & Martin 1986, from memory).
# - first-order error propagation (calculus): m_d ~ (m_l m_t^2)^(1/3),
#   m_c = 3 / (1/m_l + 2/m_t).
import json
import math
import os
import subprocess
import sys

from valley_calls import CLI, call, check, failures


SI = {'longitudinal_mass_me': 0.916, 'transverse_mass_me': 0.190, 'axis': [1, 0, 0]}


def ladders(hkl, **extra):
    r = call(dict({'valley': SI, 'point_group': 'Oh', 'confinement_miller': hkl}, **extra))
    return r['confinement']


published = {
    (0, 0, 1): [(0.916, 0.190, 2), (0.190, 0.417, 4)],
    (1, 1, 0): [(0.315, 0.324, 4), (0.190, 0.417, 2)],
    (1, 1, 1): [(0.258, 0.358, 6)],
}
for hkl, want in published.items():
    got = ladders(list(hkl))['ladders']
    ok = len(got) == len(want) and all(
        abs(g['quantization_mass_me'] - mz) < 0.0015 and abs(g['dos_mass_2d_me'] - md) < 0.0015
        and g['valley_degeneracy'] == gv for g, (mz, md, gv) in zip(got, want))
    check('Si (%d%d%d) ladders as Stern & Howard give them: %s' % (hkl + (want,)), ok)

# identity on a tilted, fully anisotropic valley in a low-symmetry plane
r = call({'valley': {'principal_masses_me': [0.2, 0.5, 1.3],
                     'axes': [[0.6, 0.8, 0], [-0.8, 0.6, 0], [0, 0, 1]], 'direction': [0.6, 0.8, 0]},
          'point_group': 'Oh', 'confinement_miller': [1, 2, 3]})
ok = all(abs(v['dos_mass_2d_me'] ** 2 * v['quantization_mass_me'] - 0.2 * 0.5 * 1.3) < 1e-12
         for v in r['confinement']['valleys'])
check('m_d^2 m_z = m1 m2 m3 in every valley (identity)', ok)
ok = all(abs(v['inplane_masses_me'][0] * v['inplane_masses_me'][1] - v['dos_mass_2d_me'] ** 2)
         < 1e-12 for v in r['confinement']['valleys'])
check('the in-plane masses multiply to m_d^2 (identity)', ok)

# subbands of a 5 nm infinite well, ready for sheet-density
c = ladders([0, 0, 1], well_width_nm=5)
e1 = 3.80998212 * math.pi ** 2 / (0.916 * 50.0 ** 2)   # hbar^2 pi^2 / (2 m_z W^2)
check('lowest subband of a 5 nm well: hbar^2 pi^2 / (2 m_l W^2), twofold',
      abs(c["subbands"][0]["energy_ev"] - e1) < 1e-6 * e1
      and c['subbands'][0]['valley_degeneracy'] == 2)
sub = [{k: s[k] for k in ('energy_ev', 'mass_me', 'valley_degeneracy')} for s in c['subbands']]
p = subprocess.run([CLI, 'call', 'sheet-density'], capture_output=True, text=True,
                   input=json.dumps({'subbands': sub, 'temperature_k': 300,
                                     'fermi_level_ev': 0.0}))
check('the subbands go into sheet-density as they are', p.returncode == 0)

# strain: biaxial tension in the (001) plane
e_par, e_perp = 0.01, -0.0077
r = call({'material': 'Si', 'strain': [[e_par, 0, 0], [0, e_par, 0], [0, 0, e_perp]],
          'temperature_k': 300, 'statistics': 'boltzmann'})
shifts = r['strain']['valley_shifts_ev']
dirs = [v['direction'] for v in r['valleys']]
want = [9.16 * (e_par if abs(d[2]) < 0.5 else e_perp) for d in dirs]
check('strained Si: each valley moves by Xi_u a.e.a (Herring & Vogt), z pair lowest',
      all(abs(a - b) < 1e-12 for a, b in zip(shifts, want)))
zpop = sum(v['population_fraction'] for v in r['valleys'] if abs(v['direction'][2]) > 0.5)
split = 9.16 * (e_par - e_perp)
boltz = 2 / (2 + 4 * math.exp(-split / (8.617333262e-5 * 300)))
check('strained Si: the z pair holds 2 / (2 + 4 exp(-dE/kT)) of the electrons',
      abs(zpop - boltz) < 1e-6)   # (constants to 1e-7)
p = call({'material': 'GaAs', 'strain': [[0.01, 0, 0], [0, 0.01, 0], [0, 0, 0]],
          'temperature_k': 300, 'statistics': 'boltzmann'}, expect_ok=False)
check('strain without deformation potentials for the material is refused',
      p.returncode == 2 and 'deformation_potentials_ev' in p.stderr)
p = call({'material': 'Si', 'strain': [[1, 0, 0], [0, 1, 0], [0, 0, 1]],
          'temperature_k': 300, 'statistics': 'boltzmann'}, expect_ok=False)
check('a strain of 1 (a percentage?) is refused', p.returncode == 2)

# errors
ml, mt, dl, dt = 0.98, 0.19, 0.03, 0.01
r = call({'valley': {'longitudinal_mass_me': ml, 'transverse_mass_me': mt, 'axis': [1, 0, 0],
                     'longitudinal_mass_error_me': dl, 'transverse_mass_error_me': dt},
          'point_group': 'Oh'})
md = r['dos_mass_me']
want_d = md * math.hypot(dl / ml / 3, 2 * dt / mt / 3)
mc = 3 / (1 / ml + 2 / mt)
want_c = math.hypot(mc ** 2 / (3 * ml ** 2) * dl, mc ** 2 / 3 * 2 / mt ** 2 * dt)
check('m_d error to first order', abs(r['dos_mass_error_me'] / want_d - 1) < 1e-5)
check('m_c error to first order', abs(r['conductivity_mass_error_me'] / want_c - 1) < 1e-5)

# carrier-statistics: a fixed DOS mass with an error gives errors of Nc and ni
mat = {'name': 'Orvane-T', 'band_gap_ev': 0.61,
       'electron_dos_mass_me': {'value': 0.42, 'error_me': 0.02},
       'statistics_hole_dos_mass_me': {'value': 0.55, 'error_me': 0.03}}
r = call({'material': mat, 'temperature_k': 300}, op='carrier-statistics')
re_, rh = 0.02 / 0.42, 0.03 / 0.55
check('Nc error is 3/2 of the mass\'s relative error (Nc ~ m^(3/2))',
      abs(r['nc_error_cm3'] / (1.5 * re_ * r['nc_cm3']) - 1) < 1e-12)
check('ni error is 3/4 of the two relative errors in quadrature (ni ~ (Nc Nv)^(1/2))',
      abs(r['ni_error_cm3'] / (0.75 * math.hypot(re_, rh) * r['ni_cm3']) - 1) < 1e-12)
lo = call({'material': dict(mat, electron_dos_mass_me=0.42 - 1e-4), 'temperature_k': 300},
          op='carrier-statistics')['nc_cm3']
hi = call({'material': dict(mat, electron_dos_mass_me=0.42 + 1e-4), 'temperature_k': 300},
          op='carrier-statistics')['nc_cm3']
check('the same slope as Nc recomputed at m +- 1e-4',
      abs((hi - lo) / 2e-4 * 0.02 / r['nc_error_cm3'] - 1) < 1e-6)
p = call({'material': dict(mat, electron_dos_mass_me={'value': 0.42, 'error_me': 0.5}),
          'temperature_k': 300}, op='carrier-statistics', expect_ok=False)
check('an error as large as the mass is refused', p.returncode == 2)

sys.exit(1 if failures else 0)
