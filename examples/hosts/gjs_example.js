// gjs_example.js: bandmass from GJS through GObject introspection.
imports.gi.versions.Bandmass = '1.0';
const Bandmass = imports.gi.Bandmass;

const answer = JSON.parse(Bandmass.call('constants', '{}'));
const c = answer.constants.cyclotron_ghz_per_tesla;
print(`free-electron cyclotron frequency: ${c.value} GHz/T (${c.meaning})`);

try {
    Bandmass.call('nonesuch', null);
} catch (e) {
    print(`error ${e.code}: ${e.message}`);   // Bandmass.Error.UNKNOWN_OPERATION
}
