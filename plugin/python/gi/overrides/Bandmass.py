# Bandmass.py: PyGObject overrides for the Bandmass 1.0 API. Installed in
# PyGObject's overrides folder (gi/overrides), so `from gi.repository import
# Bandmass` picks it up. It changes one thing: Bandmass.Bands.new_from_array
# and new_from_lattice accept a NumPy array (or any buffer of doubles) of any
# shape, (nbands, n1, n2, n3) or flat, and hand its bytes over in one block
# (Bands.new_from_bytes) instead of converting value by value. Lists and
# other sequences still go the introspected way. Nothing is computed here.
from ..module import get_introspection_module
from ..overrides import override

from gi.repository import GLib

Bandmass = get_introspection_module('Bandmass')

__all__ = []


def _energy_bytes(energies):
    """The energies as one GLib.Bytes of C-ordered native doubles, or None
    when the object is not a buffer (then it goes value by value)."""
    try:
        view = memoryview(energies)
    except TypeError:
        return None
    if view.format not in ('d', '<d', '=d') or not view.c_contiguous:
        try:
            import numpy
        except ImportError:
            raise TypeError('Bandmass.Bands: the energies must be a C-contiguous buffer of '
                            'doubles (format "d"), got format %r' % view.format) from None
        view = memoryview(numpy.ascontiguousarray(energies, dtype=numpy.float64))
    return GLib.Bytes.new(view.tobytes())


def _flat(vectors):
    """Cell vectors as 9 numbers: a 3x3 array or nested lists are read row
    after row, as the C API takes them."""
    if hasattr(vectors, 'ravel'):
        return [float(v) for v in vectors.ravel()]
    out = []
    for v in vectors:
        if isinstance(v, (list, tuple)):
            out.extend(float(x) for x in v)
        else:
            out.append(float(v))
    return out


def _bands(energies, nbands, mesh, vectors, by_value, by_bytes):
    """A grid through by_bytes (one block) for a buffer, else by_value."""
    data = _energy_bytes(energies)
    if data is None:
        return by_value(energies, nbands, list(mesh), _flat(vectors))
    return by_bytes(data, nbands, list(mesh), _flat(vectors))


class Bands(Bandmass.Bands):
    @classmethod
    def new_from_array(cls, energies, nbands, mesh, reciprocal_vectors):
        return _bands(energies, nbands, mesh, reciprocal_vectors,
                      Bandmass.Bands.new_from_array, Bandmass.Bands.new_from_bytes)

    @classmethod
    def new_from_lattice(cls, energies, nbands, mesh, lattice_vectors):
        return _bands(energies, nbands, mesh, lattice_vectors,
                      Bandmass.Bands.new_from_lattice, Bandmass.Bands.new_from_bytes_lattice)


Bands = override(Bands)
__all__.append('Bands')
