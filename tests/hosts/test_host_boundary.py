#!/usr/bin/python3
"""test_host_boundary.py: the library lives inside other people's processes.
Through the C entry point and through GObject introspection, the whole request
corpus (test_gsl_handler.corpus: example requests, hostile mutations, domain
edges, a first-principles grid) must leave the host as it found it:

- nothing written to the process's stdout or stderr (file descriptors 1 and 2
  point at files for the duration; both must stay empty);
- no exit() or abort(): the corpus runs in a child process that must reach its
  last line and say so (an exit(0) inside the library would otherwise pass);
- no process-wide state changed: the locale (every category, set to C.UTF-8
  first so that a reset to "C" shows), every signal's disposition (the raw
  handler, mask and flags of signals 1 to 64), GSL's error handler, the umask, the
  environment and the working directory the host chose."""
import ctypes as C
import json
import os
import subprocess
import sys
import tempfile

HERE = os.path.dirname(os.path.abspath(__file__))
SIGACTION_BYTES = 256          # larger than glibc's struct sigaction on any target
# glibc's struct sigaction on 64-bit Linux: handler at 0, the mask at 8 (the
# kernel fills only its first 8 bytes: 64 signals; the rest is left as found),
# flags at 136
SIGACTION_FIELDS = ((0, 8), (8, 16), (136, 140))
LC_CATEGORIES = {'LC_CTYPE': 0, 'LC_NUMERIC': 1, 'LC_TIME': 2, 'LC_COLLATE': 3,
                 'LC_MONETARY': 4, 'LC_MESSAGES': 5, 'LC_ALL': 6}


def process_state(libc, gsl, handler):
    """Everything process-wide the library could touch, as comparable values."""
    libc.setlocale.restype = C.c_char_p
    libc.setlocale.argtypes = [C.c_int, C.c_char_p]
    state = {name: libc.setlocale(cat, None).decode() for name, cat in LC_CATEGORIES.items()}
    for sig in range(1, 65):
        buf = C.create_string_buffer(SIGACTION_BYTES)
        if libc.sigaction(sig, None, buf) == 0:
            state['signal %d' % sig] = ':'.join(buf.raw[a:b].hex() for a, b in SIGACTION_FIELDS)
    # reading the handler means setting it: set the host's own straight back
    current = gsl.gsl_set_error_handler(handler)
    state['gsl handler'] = current
    mask = os.umask(0o022)
    os.umask(mask)
    state['umask'] = mask
    state['environment'] = dict(os.environ)
    state['cwd'] = os.getcwd()
    return state


def child(route):
    """Runs the corpus through one route with fds 1 and 2 on files; prints a
    JSON summary on the saved stdout as its last act."""
    sys.path.insert(0, HERE)
    import test_gsl_handler as corpus_source   # noqa: E402  (loads the library)
    libc = C.CDLL(None)
    gsl = corpus_source.gsl
    handler = corpus_source.handler_address(corpus_source.recording_handler)
    gsl.gsl_set_error_handler(handler)
    libc.setlocale.restype = C.c_char_p
    libc.setlocale.argtypes = [C.c_int, C.c_char_p]
    if not libc.setlocale(LC_CATEGORIES['LC_ALL'], b'C.UTF-8'):
        raise SystemExit('this machine has no C.UTF-8 locale')
    requests = corpus_source.corpus()
    home = os.getcwd()

    if route == 'entry-point':
        api = corpus_source.lib.bandmass_plugin_get_api(1).contents

        def run(op, text):
            corpus_source.call(api, op, text)
    else:
        import gi
        gi.require_version('Bandmass', '1.0')
        from gi.repository import Bandmass, GLib

        def run(op, text):
            try:
                Bandmass.call(op, text)
            except GLib.Error:
                pass

    # captured before the first call: the library's one-time set-up included
    os.chdir(home)
    before = process_state(libc, gsl, handler)
    saved_out, saved_err = os.dup(1), os.dup(2)
    out = tempfile.TemporaryFile()
    err = tempfile.TemporaryFile()
    sys.stdout.flush()
    sys.stderr.flush()
    os.dup2(out.fileno(), 1)
    os.dup2(err.fileno(), 2)
    try:
        for op, text, folder in requests:
            os.chdir(folder)
            run(op, text)
        os.chdir(home)
        after = process_state(libc, gsl, handler)
    finally:
        os.dup2(saved_out, 1)
        os.dup2(saved_err, 2)
    written = {}
    for name, f in (('stdout', out), ('stderr', err)):
        f.seek(0)
        written[name] = f.read(2000).decode('utf-8', 'replace')
    changed = sorted(k for k in set(before) | set(after) if before.get(k) != after.get(k))
    print(json.dumps({'requests': len(requests), 'written': written, 'changed': changed,
                      'completed': True}))
    sys.stdout.flush()
    os._exit(0)


def main():
    failed = False
    for route in ('entry-point', 'gi'):
        p = subprocess.run([sys.executable, __file__, route], capture_output=True, text=True)
        lines = p.stdout.strip().splitlines()
        try:
            summary = json.loads(lines[-1])
        except (IndexError, ValueError):
            summary = {}
        if p.returncode != 0 or not summary.get('completed'):
            print('%s: the process did not finish the corpus (exit status %d): %s'
                  % (route, p.returncode, p.stderr[-2000:]))
            failed = True
            continue
        for stream, text in summary['written'].items():
            if text:
                print('%s: the library wrote to %s: %r' % (route, stream, text[:500]))
                failed = True
        if summary['changed']:
            print('%s: process-wide state changed: %s' % (route, ', '.join(summary['changed'])))
            failed = True
        print('%s: %d requests, nothing written to stdout or stderr, no exit or abort, '
              'locale, signals, GSL handler, umask, environment and folder unchanged: %s'
              % (route, summary['requests'], 'no' if failed else 'yes'))
    return 1 if failed else 0


if __name__ == '__main__':
    if len(sys.argv) > 1:
        child(sys.argv[1])
    sys.exit(main())
