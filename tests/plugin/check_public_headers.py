#!/usr/bin/python3
"""check_public_headers.py "CC ARGS" HEADER...: the headers that are installed stand
on their own. Each one includes only system headers, GLib/GObject/json-glib
and the other installed headers, and each one compiles alone (as C11, with
-Wall -Wextra -Werror) from a folder holding nothing but the installed set,
with only GLib's and GObject's compiler flags."""
import os
import re
import shlex
import shutil
import subprocess
import sys
import tempfile

cc, headers = shlex.split(sys.argv[1]), sys.argv[2:]
names = {os.path.basename(h) for h in headers}
allowed_system = re.compile(r'^(std\w*\.h|glib\.h|glib-object\.h|glib/.*|gobject/.*|'
                            r'json-glib/.*)$')
failures = []
for h in headers:
    for inc in re.findall(r'^\s*#\s*include\s*[<"]([^>"]+)[>"]', open(h).read(), re.M):
        if inc not in names and not allowed_system.match(inc):
            failures.append('%s includes %s, which is not installed' % (os.path.basename(h), inc))

cflags = subprocess.run(['pkg-config', '--cflags', 'gobject-2.0', 'json-glib-1.0'],
                        capture_output=True, text=True, check=True).stdout.split()
with tempfile.TemporaryDirectory() as d:
    inc = os.path.join(d, 'bandmass-1.0')
    os.mkdir(inc)
    for h in headers:
        shutil.copy(h, inc)
    for name in sorted(names):
        src = os.path.join(d, 'use.c')
        with open(src, 'w') as f:
            f.write('#include <%s>\nint bm_header_check(void);\n'
                    'int bm_header_check(void) { return 0; }\n' % name)
        p = subprocess.run(cc + ['-std=c11', '-Wall', '-Wextra', '-Wpedantic', '-Werror',
                            '-fsyntax-only', '-I' + inc] + cflags + [src],
                           capture_output=True, text=True)
        if p.returncode != 0:
            failures.append('%s does not compile alone:\n%s' % (name, p.stderr))
        else:
            print('ok     ' + name + ' compiles alone')
for f in failures:
    print('FAILED ' + f)
sys.exit(1 if failures else 0)
