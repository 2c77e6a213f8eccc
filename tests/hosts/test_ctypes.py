#!/usr/bin/python3
# test_ctypes.py: the C plugin entry point from Python ctypes (no GObject
# introspection): the table, a call that answers as the CLI does, errors.
import ctypes as C
import json
import os
import subprocess
import unittest

CLI = os.environ['BANDMASS_CLI']
ABI_MAJOR = 1
OK, INVALID_INPUT, UNKNOWN_OPERATION = 0, 1, 3


class Api(C.Structure):
    """bandmass_plugin_api, ABI 1.0 (bandmass-plugin.h)."""
    _fields_ = [
        ('size', C.c_uint32),
        ('abi_major', C.c_uint16),
        ('abi_minor', C.c_uint16),
        ('library_version', C.c_char_p),
        ('n_operations', C.c_size_t),
        ('operation_names', C.POINTER(C.c_char_p)),
        ('operation_summaries', C.POINTER(C.c_char_p)),
        ('operation_params_json', C.POINTER(C.c_char_p)),
        ('operations_json', C.c_char_p),
        ('call', C.CFUNCTYPE(C.c_int, C.c_char_p, C.c_char_p,
                             C.POINTER(C.c_void_p), C.POINTER(C.c_void_p))),
        ('free_string', C.CFUNCTYPE(None, C.c_void_p)),
    ]


lib = C.CDLL(os.environ['BANDMASS_LIB'])
lib.bandmass_plugin_get_api.restype = C.POINTER(Api)
lib.bandmass_plugin_get_api.argtypes = [C.c_uint]


def call(api, op, request):
    response, message = C.c_void_p(), C.c_void_p()
    status = api.call(op.encode(), None if request is None else request.encode(),
                      C.byref(response), C.byref(message))
    try:
        text = C.string_at(response.value).decode() if response.value else None
        err = C.string_at(message.value).decode() if message.value else None
    finally:
        api.free_string(response)
        api.free_string(message)
    return status, text, err


class Plugin(unittest.TestCase):
    def setUp(self):
        self.api = lib.bandmass_plugin_get_api(ABI_MAJOR).contents

    def test_table(self):
        self.assertEqual(self.api.abi_major, ABI_MAJOR)
        self.assertGreaterEqual(self.api.size, C.sizeof(Api))
        self.assertFalse(lib.bandmass_plugin_get_api(ABI_MAJOR + 1))   # NULL
        cli_ops = json.loads(subprocess.run([CLI, 'ops', '--json'], capture_output=True,
                                            check=True, text=True).stdout)
        self.assertEqual(json.loads(self.api.operations_json), cli_ops)
        self.assertEqual(self.api.n_operations, len(cli_ops))
        for i, op in enumerate(cli_ops):
            self.assertEqual(self.api.operation_names[i].decode(), op['name'])
            self.assertEqual(self.api.operation_summaries[i].decode(), op['summary'])
            self.assertEqual(json.loads(self.api.operation_params_json[i]), op['params'])

    def test_call_equals_cli(self):
        status, text, err = call(self.api, 'constants', '{}')
        self.assertEqual((status, err), (OK, None))
        cli = subprocess.run([CLI, 'call', 'constants', '--compact'], input='{}',
                             capture_output=True, check=True, text=True).stdout.strip()
        self.assertEqual(text, cli)

    def test_errors(self):
        status, text, err = call(self.api, 'constants', '{"depth_m": 3}')
        self.assertEqual(status, INVALID_INPUT)
        self.assertIsNone(text)
        self.assertIn('request key "depth_m" is not a parameter of constants', err)
        status, text, err = call(self.api, 'nonesuch', None)
        self.assertEqual(status, UNKNOWN_OPERATION)
        self.assertIn('no operation named "nonesuch"', err)

    def test_deep_nesting_in_a_small_thread(self):
        # 10,000 nested brackets (20 kB) from a thread with a 1 MB stack: refused
        # before the recursive parser sees them, so the host survives.
        # Regression test: this used to kill the process.
        import threading
        deep = '{"eta": ' + '[' * 10000 + ']' * 10000 + '}'
        out = {}
        threading.stack_size(1 << 20)
        t = threading.Thread(target=lambda: out.update(r=call(self.api, 'fermi-integral', deep)))
        t.start()
        t.join()
        threading.stack_size(0)
        status, text, err = out['r']
        self.assertEqual(status, INVALID_INPUT)
        self.assertIn('nested deeper than 64 levels', err)


if __name__ == '__main__':
    unittest.main(verbosity=2)
