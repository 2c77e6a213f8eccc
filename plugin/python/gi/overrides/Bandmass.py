# Bandmass.py: PyGObject overrides for the Bandmass 1.0 API. Installed in
# PyGObject's overrides folder (gi/overrides), so `from gi.repository import
# Bandmass` picks it up. It changes one thing: Bandmass.Bands.new_from_array
# and new_from_lattice accept a NumPy array (or any buffer of doubles) of any
# shape, (nbands, n1, n2, n3) or flat, and hand its bytes over in one block
# (Bands.new_from_bytes) instead of converting value by value. Lists and
# other sequences still go the introspected way. Nothing is computed here.
#
# The block is an anonymous memory file the grid maps read-only (Linux
# memfd): the kernel copies the array into it in one write, with no page
# faults, where a Python bytes plus a GLib.Bytes would copy twice into fresh
# memory and fault on every page. Elsewhere, or if the memory file cannot
# be made, the bytes go through GLib.Bytes.
import os

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
    return _mapped_bytes(view) or GLib.Bytes.new(view.tobytes())


def _mapped_bytes(view):
    """The bytes of a C-contiguous view in a read-only mapping of an anonymous
    memory file, or None where that is not available. The mapping keeps the
    file alive; it is released with the last reference to the GLib.Bytes."""
    create = getattr(os, 'memfd_create', None)
    if create is None or view.nbytes == 0:
        return None
    try:
        fd = create('bandmass-energies', os.MFD_CLOEXEC | getattr(os, 'MFD_ALLOW_SEALING', 0))
    except OSError:
        return None
    try:
        data, done = view.cast('B'), 0
        while done < len(data):
            done += os.write(fd, data[done:])
        _seal(fd)
        return GLib.MappedFile.new_from_fd(fd, False).get_bytes()
    except (OSError, GLib.Error):
        return None
    finally:
        os.close(fd)


def _seal(fd):
    """Seals the memory file against any later write, shrinking or growth
    (nothing can change the mapped energies or cut them short), where the
    kernel allows it; the file is private to this process either way."""
    try:
        import fcntl
        fcntl.fcntl(fd, fcntl.F_ADD_SEALS, fcntl.F_SEAL_SHRINK | fcntl.F_SEAL_GROW
                    | fcntl.F_SEAL_WRITE | fcntl.F_SEAL_SEAL)
    except (ImportError, AttributeError, OSError):
        pass


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
