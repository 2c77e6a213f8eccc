#!/usr/bin/python3
# python_gi.py: bandmass from Python through GObject introspection: one call,
# the operation list, and a band grid handed over straight from NumPy.
import json

import gi
gi.require_version('Bandmass', '1.0')
from gi.repository import Bandmass, GLib
import numpy as np

# Any operation: JSON request in, JSON response out (as `bandmass call OP`).
constants = json.loads(Bandmass.call('constants', '{}'))['constants']
print('hbar^2/m_e =', constants['hbar2_over_me_ev_a2']['value'], 'eV A^2')

for op in Bandmass.list_operations():
    keys = ', '.join(p.get_name() for p in op.get_params())
    print(f'{op.get_name():20s} {op.get_summary()}  [{keys}]')

# Bad input raises GLib.Error in the Bandmass.Error domain, naming the key.
try:
    Bandmass.call('constants', '{"temperature_k": 300}')
except GLib.Error as e:
    assert e.matches(Bandmass.Error.quark(), Bandmass.Error.INVALID_INPUT)
    print('error:', e.message)

# A band grid from NumPy: shape (nbands, n1, n2, n3), eV; no file is written.
a, n = 4.0, 16                                    # cubic cell (A), mesh
k = 2 * np.pi / a * np.arange(n) / n
kx, ky, kz = np.meshgrid(k, k, k, indexing='ij')
energies = (2 * 0.5 * (1 - np.cos(kx * a)) + 2 * 1.0 * (1 - np.cos(ky * a))
            + 2 * 2.0 * (1 - np.cos(kz * a)))[np.newaxis]
recip = 2 * np.pi / a * np.eye(3)                 # rows b1 b2 b3, 1/A
bands = Bandmass.Bands.new_from_array(energies, energies.shape[0],
                                      energies.shape[1:], recip)
print('grid:', bands.get_nbands(), 'band(s) on a', list(bands.get_mesh()), 'mesh')

# Masses along x, y, z: hbar^2 / (2 t a^2) for t = 0.5, 1, 2 eV (cosine bands).
for x in bands.find_extrema(None):
    print(x.get_kind(), x.get_energy(), 'eV at', x.get_k(), '1/A;',
          'masses', x.get_principal_masses(), 'm_e', x.get_warnings())
