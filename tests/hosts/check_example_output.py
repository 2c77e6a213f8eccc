#!/usr/bin/python3
# check_example_output.py NAME COMMAND...: runs the host script
# examples/hosts/NAME with COMMAND (the script's path appended) and checks
# that what it prints is the README's output block right after the code
# block that shows the script, so the printed output in README.md is true.
import os
import re
import subprocess
import sys

top = os.path.join(os.path.dirname(os.path.abspath(__file__)), '..', '..')
name, command = sys.argv[1], sys.argv[2:]
script = os.path.join(top, 'examples', 'hosts', name)
readme = open(os.path.join(top, 'README.md')).read()
blocks = re.findall(r'```([a-z]*)\n(.*?)```\n', readme, re.S)
text = open(script).read()
shown = [i for i, (_, body) in enumerate(blocks) if body == text]
if not shown or shown[0] + 1 >= len(blocks) or blocks[shown[0] + 1][0] != 'text':
    sys.exit('README.md has no ```text block of output after examples/hosts/' + name)
want = blocks[shown[0] + 1][1]
run = subprocess.run(command + [script], capture_output=True, text=True, cwd=top)
sys.stderr.write(run.stderr)
if run.returncode != 0:
    sys.exit('%s exited with status %d' % (name, run.returncode))
if run.stdout != want:
    sys.exit('examples/hosts/%s printed\n%s\nbut README.md shows\n%s' % (name, run.stdout, want))
print('examples/hosts/%s prints what README.md shows' % name)
