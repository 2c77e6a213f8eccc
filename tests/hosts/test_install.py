#!/usr/bin/python3
"""test_install.py: `meson install` into a temporary root puts every part where
its users look for it, and the installed parts work from there without the
build tree: the CLI, a GI script (typelib and the NumPy override), the R
loader and module, a C host compiled against the installed headers through
pkg-config, the manual page and the bash completion.

Usage: test_install.py BUILD_DIR SOURCE_DIR"""
import json
import os
import shutil
import subprocess
import sys
import tempfile

BUILD, SRC = sys.argv[1], sys.argv[2]
failures = []


def check(ok, what):
    print(('ok   ' if ok else 'FAIL ') + what)
    if not ok:
        failures.append(what)


def run(cmd, env=None, **kw):
    return subprocess.run(cmd, env=env, capture_output=True, text=True, **kw)


def find(root, name):
    for d, _, files in os.walk(root):
        if name in files:
            return os.path.join(d, name)
    return None


def main():
    meson = shutil.which('meson')
    options = {o['name']: o['value'] for o in json.loads(
        run([meson, 'introspect', '--buildoptions', BUILD], check=True).stdout)}
    dest = tempfile.mkdtemp(prefix='bandmass-install-')
    try:
        p = run([meson, 'install', '-C', BUILD, '--destdir', dest, '--no-rebuild', '--quiet'])
        check(p.returncode == 0, 'meson install --destdir: ' + p.stderr[-500:])
        root = dest + options['prefix']

        def under(key, *parts):
            base = options[key]
            base = base if os.path.isabs(base) else os.path.join(options['prefix'], base)
            return os.path.join(dest + base, *parts)

        libdir = under('libdir')
        cli = under('bindir', 'bandmass')
        expected = {
            'CLI': cli,
            'shared library': os.path.join(libdir, 'libbandmass-1.0.so'),
            'GObject header': under('includedir', 'bandmass-1.0', 'bandmass.h'),
            'plugin header': under('includedir', 'bandmass-1.0', 'bandmass-plugin.h'),
            'pkg-config file': os.path.join(libdir, 'pkgconfig', 'bandmass-1.0.pc'),
            'typelib': os.path.join(libdir, 'girepository-1.0', 'Bandmass-1.0.typelib'),
            'GIR': under('datadir', 'gir-1.0', 'Bandmass-1.0.gir'),
            'manual page': under('mandir', 'man1', 'bandmass.1'),
            'bash completion': under('datadir', 'bash-completion', 'completions', 'bandmass'),
        }
        if os.path.exists(os.path.join(BUILD, 'plugin', 'octave', 'bandmass.mex')):
            expected['Octave adapter'] = under('datadir', 'bandmass', 'octave', 'bandmass.mex')
        r_built = os.path.exists(os.path.join(BUILD, 'plugin', 'r', 'bandmass_r.so'))
        if r_built:
            expected['R module'] = under('datadir', 'bandmass', 'r', 'bandmass_r.so')
            expected['R loader'] = under('datadir', 'bandmass', 'r', 'bandmass.R')
        for what, path in expected.items():
            check(os.path.exists(path), '%s installed at %s' % (what, path[len(dest):]))

        # the CLI from the installed tree, nothing of the build on its paths
        env = {'PATH': '/usr/bin:/bin', 'LD_LIBRARY_PATH': libdir, 'LANG': 'C.UTF-8'}
        # the sanitizer pass's run-time and options (tests/sanitize/wrap.sh) go along
        env.update({k: v for k, v in os.environ.items()
                    if k in ('LD_PRELOAD', 'ASAN_OPTIONS', 'UBSAN_OPTIONS', 'G_SLICE')})
        built = run([os.path.join(BUILD, 'plugin', 'bandmass'), 'call', 'constants'],
                    input='{}').stdout
        compact = run([os.path.join(BUILD, 'plugin', 'bandmass'), 'call', 'constants',
                       '--compact'], input='{}').stdout
        p = run([cli, 'call', 'constants'], env=env, input='{}')
        check(p.returncode == 0 and p.stdout == built, 'installed CLI answers as the built one')

        # GI from the installed typelib and override
        override = find(root, 'Bandmass.py')
        check(override is not None, 'PyGObject override installed')
        if override:
            gi_env = dict(env, GI_TYPELIB_PATH=os.path.join(libdir, 'girepository-1.0'),
                          PYTHONPATH=os.path.dirname(os.path.dirname(os.path.dirname(override))))
            script = ("import gi, numpy as np\n"
                      "gi.require_version('Bandmass', '1.0')\n"
                      "from gi.repository import Bandmass\n"
                      "import gi.overrides.Bandmass as o\n"
                      "assert o.__file__.startswith(%r), o.__file__\n"
                      "e = np.zeros((1, 4, 4, 4))\n"
                      "Bandmass.Bands.new_from_array(e.ravel(), 1, [4, 4, 4], "
                      "np.eye(3).ravel())\n"
                      "print(Bandmass.call('constants', '{}'))\n" % dest)
            p = run(['/usr/bin/python3', '-c', script], env=gi_env)
            check(p.returncode == 0 and p.stdout.strip() == compact.strip(),
                  'GI script on the installed typelib answers as the CLI ' + p.stderr[-500:])

        # R: the installed loader names the installed module; with that name
        # moved into the temporary root it loads and answers as the CLI
        loader = expected.get('R loader')
        if r_built and os.path.exists(loader) and shutil.which('Rscript'):
            module = expected['R module'][len(dest):]
            text = open(loader).read()
            check('dyn.load("%s")' % module in text, 'R loader names the installed module')
            moved = os.path.join(dest, 'bandmass-moved.R')
            with open(moved, 'w') as f:
                f.write(text.replace(module, dest + module))
            script = ('source(%r); v <- bandmass_call("constants")$constants; '
                      'cat(sprintf("%%.17g", v$boltzmann_ev_per_k$value))' % moved)
            p = run(['Rscript', '--vanilla', '-e', script], env=env)
            want = json.loads(built)['constants']['boltzmann_ev_per_k']['value']
            check(p.returncode == 0 and p.stdout and float(p.stdout) == want,
                  'R loader and module from the installed tree answer as the CLI '
                  + p.stderr[-500:])

        # a C host built against the installed headers through pkg-config
        pc_env = dict(env, PKG_CONFIG_PATH=os.path.join(libdir, 'pkgconfig'),
                      PKG_CONFIG_SYSROOT_DIR=dest)
        flags = run(['pkg-config', '--cflags', 'bandmass-1.0'], env=pc_env)
        check(flags.returncode == 0 and dest in flags.stdout,
              'pkg-config finds bandmass-1.0 ' + flags.stderr)
        exe = os.path.join(dest, 'c_host')
        cc = shutil.which('cc') or shutil.which('gcc')
        p = run([cc] + flags.stdout.split() + [os.path.join(SRC, 'examples', 'hosts', 'c_host.c'),
                                               '-o', exe, '-ldl'])
        check(p.returncode == 0, 'C host compiles against the installed headers ' + p.stderr)
        if p.returncode == 0:
            p = run([exe, os.path.join(libdir, 'libbandmass-1.0.so')], env=env)
            check(p.returncode == 0 and p.stdout, 'C host runs on the installed library')

        # the manual page renders; the completion loads and names every operation
        page = expected['manual page']
        if os.path.exists(page):
            text = open(page).read()
            check(text.startswith('.TH BANDMASS 1'), 'manual page starts with .TH')
            ops = json.loads(run([cli, 'ops', '--json'], env=env).stdout)
            check(all(('.SS ' + o['name'].replace('-', '\\-')) in text for o in ops),
                  'manual page has a section for every operation')
            if shutil.which('groff'):
                # groff is none of ours: without the sanitizer pass's preload
                plain = {k: v for k, v in os.environ.items() if k != 'LD_PRELOAD'}
                p = run(['groff', '-man', '-Tutf8', '-ww', '-z', page], env=plain)
                check(p.returncode == 0 and not p.stderr, 'groff renders the page cleanly '
                      + p.stderr[:300])
        comp = expected['bash completion']
        if os.path.exists(comp):
            p = run(['bash', '-c', 'source "$1"; complete -p bandmass; '
                     'COMP_WORDS=(bandmass mass-tensor --extremum ""); COMP_CWORD=3; '
                     '_bandmass; echo "${COMPREPLY[*]}"', 'x', comp])
            check(p.returncode == 0 and 'minimum maximum all' in p.stdout,
                  'bash completion loads and completes choices ' + p.stderr)
    finally:
        shutil.rmtree(dest, ignore_errors=True)
    print('%d failures' % len(failures))
    return 1 if failures else 0


if __name__ == '__main__':
    sys.exit(main())
