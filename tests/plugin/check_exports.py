#!/usr/bin/python3
"""check_exports.py LIB HEADER...: the dynamic symbols LIB defines are exactly
the functions the public HEADERs mark BM_PUBLIC (with G_DECLARE_FINAL_TYPE's
*_get_type for a marked declaration). Anything else exported, or anything
public missing, fails."""
import re
import subprocess
import sys

lib, headers = sys.argv[1], sys.argv[2:]
public = set()
for h in headers:
    # declarations only: no preprocessor lines, no comments
    text = re.sub(r'^\s*#.*$', '', open(h).read(), flags=re.M)
    text = re.sub(r'/\*.*?\*/', '', text, flags=re.S)
    for decl in re.findall(r'\bBM_PUBLIC\b([^;]*?)(?:;|\)\s*$)', text, re.M):
        m = re.match(r'\s*G_DECLARE_FINAL_TYPE\(\s*\w+\s*,\s*(\w+)', decl)
        if m:
            public.add(m.group(1) + '_get_type')
            continue
        names = re.findall(r'(\w+)\s*\(', decl)
        if not names:
            sys.exit('%s: cannot read the BM_PUBLIC declaration %r' % (h, decl))
        public.add(names[0])
if not public:
    sys.exit('no BM_PUBLIC declarations found in ' + ' '.join(headers))

out = subprocess.run(['nm', '-D', '--defined-only', lib], capture_output=True, text=True,
                     check=True).stdout
# symbols every ELF shared object may define (linker-made, not code)
toolchain = {'_init', '_fini', '_edata', '_end', '__bss_start'}
exported = {line.split()[-1] for line in out.splitlines() if line.strip()} - toolchain

extra = sorted(exported - public)
missing = sorted(public - exported)
print('%d exported, %d public' % (len(exported), len(public)))
if extra:
    print('exported but not public: ' + ', '.join(extra))
if missing:
    print('public but not exported: ' + ', '.join(missing))
sys.exit(1 if extra or missing else 0)
