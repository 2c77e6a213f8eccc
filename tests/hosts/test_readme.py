#!/usr/bin/python3
# test_readme.py: each host script under examples/hosts/ appears in README.md
# verbatim, so the README shows exactly what the hosts suite runs.
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
print('README.md shows every host example verbatim')
