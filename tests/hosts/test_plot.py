#!/usr/bin/python3
# test_plot.py: every plot kind drawn from a real CLI run (--plot FILE and
# bandmass plot), and the files checked: a PNG's signature and the size in its
# IHDR chunk, an SVG that parses as XML with the stated size, one group of
# class "curve" per curve and the axis labels as text, a PDF's header. Bad plot
# paths are exit 2 with nothing written; a plot never changes the JSON or CSV.
import json
import os
import struct
import subprocess
import tempfile
import unittest
import xml.etree.ElementTree as ET
from pathlib import Path

CLI = os.environ['BANDMASS_CLI']
DATA = Path(__file__).resolve().parents[1] / 'data'
FP = DATA / 'first-principles'
SVG = '{http://www.w3.org/2000/svg}'
WIDE = (1280, 560)   # two or three panels (README, Plots)
ONE = (820, 560)     # one panel

T_SWEEP = ['carrier-statistics', '--material', 'Si', '--temperatures-k', '100:700:50',
           '--donors', '[{"species": "P", "density_cm3": 1e16}]']
D_SWEEP = ['carrier-statistics', '--material', 'Si', '--temperature-k', '300',
           '--donors', '[{"species": "P"}]', '--donor-densities-cm3', '1e13:1e19:x10']
THERMAL = ['thermal-mass', '--grid', str(FP / 'si-12.json'), '--bands', 'conduction',
           '--temperatures-k', '100,300,500', '--density-cm3', '1e15']
MASS = ['mass-tensor', '--grid', str(FP / 'si-12.json'), '--band', 'c1', '--extremum',
        'minimum', '--cuts']
KANE = ['kane-fit', '--grid', str(FP / 'si-16.json'), '--band', 'c1', '--cuts']
ELLIPSOID = ['cyclotron-ellipsoid', '--material', 'Si', '--field-directions',
             '{"from": [0,0,1], "to": [1,1,0], "steps": 19}']
ORBIT = ['cyclotron-orbit', '--grid', str(FP / 'si-12.json'), '--band', 'c1', '--energy-ev',
         '0.55', '--field-directions', '{"from": [0,0,1], "to": [1,1,0], "steps": 5}',
         '--contour']


def run(*args):
    return subprocess.run([CLI, *args], capture_output=True, text=True)


def png_size(path):
    data = Path(path).read_bytes()
    assert data[:8] == b'\x89PNG\r\n\x1a\n', 'not a PNG signature'
    assert data[12:16] == b'IHDR', 'the first chunk is not IHDR'
    return struct.unpack('>II', data[16:24])


def svg(path):
    """The root and, per panel id, its curve names and axis-label texts."""
    root = ET.parse(path).getroot()   # raises unless well-formed
    assert root.tag == SVG + 'svg', root.tag
    panels = {}
    for p in root.iter(SVG + 'g'):
        if p.get('class') != 'panel':
            continue
        curves = [g.get('data-name') or g.get('id') for g in p.iter(SVG + 'g')
                  if g.get('class') == 'curve']
        labels = [t.text for t in p.iter(SVG + 'text')
                  if 'axis-label' in (t.get('class') or '')]
        panels[p.get('id')] = (curves, labels)
    return root, panels


class Plots(unittest.TestCase):
    def setUp(self):
        self.tmp = tempfile.TemporaryDirectory()
        self.dir = Path(self.tmp.name)

    def tearDown(self):
        self.tmp.cleanup()

    def plot(self, args, name):
        path = self.dir / name
        p = run(*args, '--plot', str(path))
        self.assertEqual(p.returncode, 0, p.stderr)
        self.assertTrue(path.is_file(), p.stderr)
        return path

    def check_svg(self, args, size, curves_per_panel, labels):
        root, panels = svg(self.plot(args, 'p.svg'))
        self.assertEqual((int(root.get('width')), int(root.get('height'))), size)
        self.assertEqual([len(panels['panel-%d' % i][0]) for i in range(len(panels))],
                         curves_per_panel, panels)
        for i, (x, y) in enumerate(labels):
            self.assertEqual(panels['panel-%d' % i][1], [x, y])
        return panels

    def check_png(self, args, size):
        self.assertEqual(png_size(self.plot(args, 'p.png')), size)

    def test_carriers_temperature(self):
        # densities n, p, n_i against 1000/T; the Fermi level against T
        panels = self.check_svg(T_SWEEP, WIDE, [3, 1],
                                [('1000 / T (1/K)', 'density (cm⁻³)'),
                                 ('temperature (K)', 'energy above E_v (eV)')])
        self.assertEqual(panels['panel-0'][0], ['electrons n', 'holes p', 'intrinsic n_i'])
        self.check_png(T_SWEEP, WIDE)

    def test_carriers_doping(self):
        self.check_svg(D_SWEEP, WIDE, [2, 1],
                       [('donor density (cm⁻³)', 'density (cm⁻³)'),
                        ('donor density (cm⁻³)', 'energy above E_v (eV)')])
        self.check_png(D_SWEEP, WIDE)

    def test_thermal(self):
        # Si's conduction tensors are isotropic once averaged over the cubic
        # rotations: one conductivity curve and one Seebeck curve
        panels = self.check_svg(THERMAL, WIDE, [2, 1],
                                [('temperature (K)', 'mass (m_e)'),
                                 ('temperature (K)', 'Seebeck coefficient (µV/K)')])
        self.assertEqual(panels['panel-0'][0], ['density-of-states mass', 'conductivity mass'])

    def test_mass_tensor(self):
        # a grid: per principal axis the interpolated band, the quadric and,
        # where the mesh has points near the line, those points
        root, panels = svg(self.plot(MASS, 'p.svg'))
        self.assertEqual(len(panels), 3)
        for curves, labels in panels.values():
            self.assertIn(len(curves), (2, 3))
            self.assertEqual(curves[0], 'interpolated band')
            self.assertTrue(curves[1].startswith('quadric fit, m = '), curves)
            self.assertEqual(labels[1], 'energy (eV)')
            self.assertTrue(labels[0].startswith('k − k₀ along ['), labels)
        path = self.plot(MASS, 'p.pdf')
        self.assertEqual(path.read_bytes()[:5], b'%PDF-')

    def test_kane(self):
        root, panels = svg(self.plot(KANE, 'p.svg'))
        self.assertEqual(len(panels), 3)
        for curves, labels in panels.values():
            self.assertEqual(len(curves), 3, curves)
            self.assertTrue(curves[0].startswith('parabolic, m = '), curves)
            self.assertTrue(curves[1].startswith('Kane, m = '), curves)
            self.assertEqual(curves[2], 'points of the fits')
        self.check_png(KANE, WIDE)
        # the 12^3 mesh: no Kane fit converges (kane null), so no Kane curve
        root, panels = svg(self.plot([*KANE[:2], str(FP / 'si-12.json'), *KANE[3:]], 'q.svg'))
        for curves, labels in panels.values():
            self.assertEqual([c.split(',')[0] for c in curves], ['parabolic', 'points of the fits'])

    def test_ellipsoid(self):
        # Si's six valleys in a (1-10) sweep from [001]: two sets on one line each
        panels = self.check_svg(ELLIPSOID, ONE, [2],
                                [('field angle (degrees)', 'cyclotron mass (m_e)')])
        self.assertEqual(sorted(c.split(':')[0] for c in panels['panel-0'][0]),
                         ['valleys 1, 2, 3, 4', 'valleys 5, 6'])
        self.check_png(ELLIPSOID, ONE)
        self.assertEqual(self.plot(ELLIPSOID, 'p.pdf').read_bytes()[:5], b'%PDF-')

    def test_orbit(self):
        # the rotation diagram and the contours of the first direction
        root, panels = svg(self.plot(ORBIT, 'p.svg'))
        self.assertEqual((int(root.get('width')), int(root.get('height'))), WIDE)
        self.assertEqual(len(panels), 2)
        self.assertEqual(panels['panel-0'][1], ['field angle (degrees)', 'cyclotron mass (m_e)'])
        self.assertGreaterEqual(len(panels['panel-0'][0]), 1)
        self.assertEqual(len(panels['panel-1'][0]), len(panels['panel-0'][0]) + 1)  # + centre
        self.assertTrue(panels['panel-1'][1][0].startswith('k along u = ['))

    def test_output_unchanged(self):
        for view in ('--json', '--csv'):
            plain = run(*T_SWEEP, view)
            with_plot = run(*T_SWEEP, view, '--plot', str(self.dir / 'x.svg'))
            self.assertEqual(plain.returncode, 0)
            self.assertEqual(with_plot.returncode, 0, with_plot.stderr)
            self.assertEqual(plain.stdout, with_plot.stdout)
        plain = run(*ELLIPSOID)
        self.assertEqual(plain.stdout, run(*ELLIPSOID, '--plot', str(self.dir / 'y.png')).stdout)

    def refused(self, args, words):
        p = run(*args)
        self.assertEqual(p.returncode, 2, p.stderr)
        self.assertEqual(p.stdout, '')
        self.assertTrue(p.stderr.startswith('bandmass: error: '), p.stderr)
        for w in words:
            self.assertIn(w, p.stderr)
        self.assertEqual(list(self.dir.iterdir()), [])   # nothing written, no partial file

    def test_bad_plots(self):
        self.refused([*T_SWEEP, '--plot', str(self.dir / 'plot.txt')],
                     ['plot.txt', '.svg, .png or .pdf'])
        self.refused([*T_SWEEP, '--plot', str(self.dir / '.png')], ['.svg, .png or .pdf'])
        self.refused([*T_SWEEP, '--plot', str(self.dir / 'missing' / 'a.png')],
                     ['--plot', 'missing', 'does not exist'])
        self.refused([*T_SWEEP, '--plot', str(self.dir)], ['.svg, .png or .pdf'])
        self.refused([*T_SWEEP, '--plot'], ['--plot needs a file name'])
        self.refused(['constants', '--plot', str(self.dir / 'c.svg')], ['constants has no plot'])
        self.refused(['carrier-statistics', '--material', 'Si', '--temperature-k', '300',
                      '--plot', str(self.dir / 'one.svg')], ['one point', 'sweep'])
        self.refused(['mass-tensor', '--grid', str(FP / 'si-12.json'), '--band', 'c1',
                      '--plot', str(self.dir / 'm.svg')], ['cuts true'])
        # a directory where the file should be: refused by the writer
        (self.dir / 'd.svg').mkdir()
        p = run(*T_SWEEP, '--plot', str(self.dir / 'd.svg'))
        self.assertEqual(p.returncode, 2)
        self.assertIn('cannot write --plot', p.stderr)
        self.assertEqual(p.stdout, '')
        self.assertEqual([x.name for x in self.dir.iterdir()], ['d.svg'])

    def batch_file(self):
        """Results as a batch run writes them: a header line, then items."""
        lines = [json.dumps({'bandmass_batch': 1, 'provenance': {'version': 'test'}})]
        for i, t in enumerate((200, 300, 400, 500)):
            request = {'material': 'Si', 'temperature_k': t,
                       'donors': [{'species': 'P', 'density_cm3': 1e16}]}
            p = subprocess.run([CLI, 'call', 'carrier-statistics', '--compact'],
                               input=json.dumps(request), capture_output=True, text=True)
            self.assertEqual(p.returncode, 0, p.stderr)
            lines.append(json.dumps({'id': 'si-%d' % t, 'op': 'carrier-statistics',
                                     'status': 'ok', 'response': json.loads(p.stdout)}))
        lines.append(json.dumps({'id': 'bad', 'status': 'error',
                                 'error': {'message': 'no such material'}}))
        lines.append('not json at all')
        path = self.dir / 'results.jsonl'
        path.write_text('\n'.join(lines) + '\n')
        return path

    def test_batch(self):
        results = self.batch_file()
        out = self.dir / 'batch.svg'
        p = run('plot', str(results), '--x', 'temperature_k', '--y', 'n_cm3', '--y', 'p_cm3',
                '--log-y', '--output', str(out))
        self.assertEqual(p.returncode, 0, p.stderr)
        root, panels = svg(out)
        self.assertEqual((int(root.get('width')), int(root.get('height'))), ONE)
        curves, labels = panels['panel-0']
        self.assertEqual(curves, ['n_cm3 (cm⁻³)', 'p_cm3 (cm⁻³)'])
        self.assertEqual(labels, ['temperature_k (K)', 'value (cm⁻³)'])
        # four items drawn: four points on each polyline
        for g in root.iter(SVG + 'g'):
            if g.get('class') == 'curve':
                pts = [pl.get('points').split() for pl in g.iter(SVG + 'polyline')]
                self.assertEqual(sum(len(x) for x in pts), 4)
        out_png = self.dir / 'batch.png'
        p = run('plot', str(results), '--x', 'temperature_k', '--y', 'fermi_level_ev',
                '--output', str(out_png))
        self.assertEqual(p.returncode, 0, p.stderr)
        self.assertEqual(png_size(out_png), ONE)

    def test_batch_item(self):
        # one item's own plot from batch results equals --plot on the same request
        request = {'material': 'Si', 'temperatures_k': [200, 300, 400],
                   'donors': [{'species': 'P', 'density_cm3': 1e16}]}
        p = subprocess.run([CLI, 'call', 'carrier-statistics', '--compact'],
                           input=json.dumps(request), capture_output=True, text=True)
        self.assertEqual(p.returncode, 0, p.stderr)
        results = self.batch_file()
        with open(results, 'a') as f:
            f.write(json.dumps({'id': 'sweep', 'op': 'carrier-statistics', 'status': 'ok',
                                'response': json.loads(p.stdout)}) + '\n')
        p = run('plot', str(results), '--item', 'sweep', '--output', str(self.dir / 'i.svg'))
        self.assertEqual(p.returncode, 0, p.stderr)
        p = run('carrier-statistics', '--material', 'Si', '--temperatures-k', '200,300,400',
                '--donors', '[{"species": "P", "density_cm3": 1e16}]',
                '--plot', str(self.dir / 'd.svg'))
        self.assertEqual(p.returncode, 0, p.stderr)
        self.assertEqual((self.dir / 'i.svg').read_bytes(), (self.dir / 'd.svg').read_bytes())
        for item, words in (('bad', ['no answer to draw', 'error']),
                            ('nope', ['no item with id "nope"']),
                            ('si-300', ['one point'])):
            p = run('plot', str(results), '--item', item, '--output', str(self.dir / 'a.svg'))
            self.assertEqual(p.returncode, 2, p.stderr)
            for w in words:
                self.assertIn(w, p.stderr)
            self.assertFalse((self.dir / 'a.svg').exists())

    def test_batch_refused(self):
        results = self.batch_file()
        for args, words in (
                ([str(results), '--x', 'temperature_k', '--y', 'no_such_key', '--output',
                  str(self.dir / 'a.svg')], ['no item', 'no_such_key']),
                ([str(results), '--y', 'n_cm3', '--output', str(self.dir / 'a.svg')],
                 ['--x']),
                ([str(results), '--x', 'temperature_k', '--y', 'n_cm3'], ['--output']),
                ([str(results), '--x', 'temperature_k', '--y', 'n_cm3', '--output',
                  str(self.dir / 'a.jpg')], ['.svg, .png or .pdf']),
                ([str(self.dir / 'none.jsonl'), '--x', 'a', '--y', 'b', '--output',
                  str(self.dir / 'a.svg')], ['none.jsonl']),
                ([str(self.dir), '--x', 'a', '--y', 'b', '--output',
                  str(self.dir / 'a.svg')], ['batch results'])):
            p = run('plot', *args)
            self.assertEqual(p.returncode, 2, p.stderr)
            for w in words:
                self.assertIn(w, p.stderr)
            self.assertFalse((self.dir / 'a.svg').exists())


if __name__ == '__main__':
    unittest.main(verbosity=2)
