#!/usr/bin/python3
# test_readme.py: each host script under examples/hosts/ appears in README.md
# verbatim, so the README shows exactly what the hosts suite runs; and the
# README's table of warning codes lists exactly the codes of core/bm-status.c.
import os
import re
import sys

top = os.path.join(os.path.dirname(os.path.abspath(__file__)), '..', '..')
readme = open(os.path.join(top, 'README.md')).read()
blocks = re.findall(r'```[a-z]*\n(.*?)```\n', readme, re.S)
missing = []
for name in sorted(os.listdir(os.path.join(top, 'examples', 'hosts'))):
    text = open(os.path.join(top, 'examples', 'hosts', name)).read()
    if text not in blocks:
        missing.append(name)
if missing:
    sys.exit('README.md lacks a code block equal to examples/hosts/' + ', '.join(missing))
codes = re.findall(r'\[BM_WARN_\w+\] = "([a-z0-9-]+)"',
                   open(os.path.join(top, 'core', 'bm-status.c')).read())
listed = re.findall(r'^\| `([a-z0-9-]+)` \|', readme, re.M)
if not codes or sorted(codes) != sorted(listed):
    sys.exit('README.md warning-code table differs from core/bm-status.c: code only %s, '
             'README only %s' % (sorted(set(codes) - set(listed)),
                                 sorted(set(listed) - set(codes))))
print('README.md shows every host example verbatim and every warning code')
