// test_gjs.js: the GObject-introspection API from GJS: one operation answers
// as the command line does, and bad input arrives as a GLib.Error.
const { GLib } = imports.gi;
imports.gi.versions.Bandmass = '1.0';
const Bandmass = imports.gi.Bandmass;

function check(condition, what) {
    if (!condition)
        throw new Error(`check failed: ${what}`);
}

const cli = GLib.getenv('BANDMASS_CLI');
const [, out, , status] = GLib.spawn_command_line_sync(`${cli} constants --json`);
check(status === 0, 'the CLI answers');
const viaCli = JSON.parse(new TextDecoder().decode(out));
const viaGjs = JSON.parse(Bandmass.call('constants', null));
check(JSON.stringify(viaGjs) === JSON.stringify(viaCli), 'GJS and CLI give the same answer');
check(viaGjs.constants.hbar2_over_me_ev_a2.value > 7, 'hbar^2/m_e is there');

let caught = null;
try {
    Bandmass.call('constants', '{"colour": "red"}');
} catch (e) {
    caught = e;
}
check(caught !== null, 'bad input throws');
check(caught.matches(Bandmass.Error, Bandmass.Error.INVALID_INPUT), 'in the Bandmass.Error domain');
check(caught.message.includes('request key "colour"'), 'the message names the key');

const ops = Bandmass.list_operations();
check(ops.some(o => o.get_name() === 'constants'), 'the operation list has constants');
// a band grid from a Float64Array, handed over as one block of bytes (the
// grid's shape and the size check; the numbers are the operation's business)
const energies = new Float64Array(2 * 3 * 4);
energies.forEach((_, i) => { energies[i] = i * 0.25; });
const bytes = new GLib.Bytes(new Uint8Array(energies.buffer));
const bands = Bandmass.Bands.new_from_bytes(bytes, 2, [3, 4, 1],
                                            [1, 0, 0, 0, 1, 0, 0, 0, 1]);
check(bands.get_nbands() === 2, 'two bands from bytes');
check(JSON.stringify(bands.get_mesh()) === '[3,4,1]', 'the mesh');
let sizeError = null;
try {
    Bandmass.Bands.new_from_bytes(bytes, 3, [3, 4, 1], [1, 0, 0, 0, 1, 0, 0, 0, 1]);
} catch (e) {
    sizeError = e;
}
check(sizeError !== null && sizeError.message.includes('24 energies given'),
      'a size mismatch is named');
print(`gjs: ${ops.length} operation(s), constants answer as the CLI, grids from bytes`);
