/* carrier-statistics.c: operation "carrier-statistics" -- Nc, Nv, ni, the
 * charge-neutrality Fermi level and ionised dopants, from the core solver. */
#include <math.h>
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-carriers.h"
#include "material-input.h"
#include "bm-enums.h"

static const BmParam params[] = {
    { "material", BM_VALUE_STRING | BM_VALUE_OBJECT, TRUE, NULL,
      "built-in name (bandmass materials), path of a material JSON file, or an object "
      "{electron_dos_mass_me, statistics_hole_dos_mass_me, a gap (varshni, bose_einstein "
      "or band_gap_ev), name, dopants, ...}", .unit = NULL },
    { "temperature_k", BM_VALUE_NUMBER, FALSE, NULL, "temperature", .unit = "K",
      .lower = BM_GT(0) },
    { "temperatures_k", BM_VALUE_NUMBER | BM_VALUE_ARRAY, FALSE, NULL,
      "list of temperatures: the response holds \"points\" (one row each, --csv)",
      .unit = "K", .lower = BM_GT(0) },
    { "donors", BM_VALUE_ARRAY, FALSE, "[]",
      "donor species: {density_cm3, ionization_ev (Ec - E_D, eV), degeneracy (default 2)} "
      "or {species (a dopant of the material, e.g. \"P\"), density_cm3}", .unit = NULL },
    { "acceptors", BM_VALUE_ARRAY, FALSE, "[]",
      "acceptor species: {density_cm3, ionization_ev (E_A - Ev, eV), degeneracy (default 4)} "
      "or {species, density_cm3}", .unit = NULL },
    { "donor_densities_cm3", BM_VALUE_NUMBER | BM_VALUE_ARRAY, FALSE, NULL,
      "doping sweep: densities of the one donor species in donors (given there without "
      "density_cm3): one point each, every combination with temperatures and "
      "acceptor_densities_cm3", .unit = "cm^-3", .lower = BM_GE(0) },
    { "acceptor_densities_cm3", BM_VALUE_NUMBER | BM_VALUE_ARRAY, FALSE, NULL,
      "doping sweep: densities of the one acceptor species in acceptors, as "
      "donor_densities_cm3", .unit = "cm^-3", .lower = BM_GE(0) },
    { "statistics", BM_VALUE_STRING, FALSE, BM_STATISTICS_DEFAULT_JSON, "band occupation",
      .choices = &bm_enum_statistics },
    { "ionization_model", BM_VALUE_STRING, FALSE, "\"auto\"",
      "how a dopant level's ionisation energy depends on the density of its kind "
      "(heavy doping)", .choices = &bm_enum_ionization_model },
    { "band_gap_narrowing", BM_VALUE_STRING, FALSE, "\"auto\"",
      "band-gap narrowing by the total dopant density", .choices = &bm_enum_band_gap_narrowing },
    { "dos_mass_points", BM_VALUE_ARRAY, FALSE, NULL,
      "temperature-dependent DOS masses, linearly interpolated, replacing the material's: "
      "[{temperature_k, electron_dos_mass_me, statistics_hole_dos_mass_me}, ...] in "
      "increasing temperature", .unit = NULL },
    BM_PARAM_END
};

/* One temperature's keys are at the top level, or in each row of "points". */
static const BmField response[] = {
    { "temperature_k", "K", TRUE, "temperature (one temperature; else in each point)" },
    { "band_gap_ev", "eV", TRUE, "band gap at that temperature" },
    { "electron_dos_mass_me", "m_e", TRUE, "conduction-band DOS mass used" },
    { "statistics_hole_dos_mass_me", "m_e", TRUE,
      "valence-band DOS mass m_dh(T) used for Nv (the carrier-statistics hole DOS mass)" },
    { "nc_cm3", "cm^-3", TRUE, "effective density of states of the conduction band" },
    { "nc_error_cm3", "cm^-3", TRUE, "where a fixed DOS mass of the material carries "
      "error_me: the error of nc_cm3 it gives (3/2 of the mass's relative error)" },
    { "nv_error_cm3", "cm^-3", TRUE, "the same for nv_cm3" },
    { "ni_error_cm3", "cm^-3", TRUE, "the same for ni_cm3 (3/4 of the two relative errors "
      "in quadrature)" },
    { "nv_cm3", "cm^-3", TRUE, "effective density of states of the valence band" },
    { "ni_cm3", "cm^-3", TRUE, "intrinsic density sqrt(Nc Nv) exp(-Eg / 2kT) of the "
      "undoped gap" },
    { "band_gap_narrowing_ev", "eV", TRUE, "band-gap narrowing used in the solve (0 without)" },
    { "effective_band_gap_ev", "eV", TRUE, "band_gap_ev minus the narrowing" },
    { "nie_cm3", "cm^-3", TRUE, "effective intrinsic density sqrt(Nc Nv) exp(-Eg_eff / 2kT)" },
    { "fermi_level_ev", "eV", TRUE, "Fermi level from charge neutrality, above the "
      "valence-band maximum of the doped (narrowed) crystal" },
    { "fermi_level_undoped_reference_ev", "eV", TRUE, "the same Fermi level above the "
      "undoped crystal's valence-band maximum (the narrowing split half to each edge)" },
    { "ionized_fraction", NULL, TRUE, "(n - p) / (N_D - N_A), the ionised share of the net "
      "doping (null without net doping)" },
    { "n_cm3", "cm^-3", TRUE, "electron density" },
    { "p_cm3", "cm^-3", TRUE, "hole density" },
    { "donor_density_cm3", "cm^-3", TRUE, "donor density, all species (the point's in a "
      "doping sweep)" },
    { "acceptor_density_cm3", "cm^-3", TRUE, "acceptor density, all species" },
    { "ionized_donors_cm3", "cm^-3", TRUE, "ionised donors, all species" },
    { "ionized_acceptors_cm3", "cm^-3", TRUE, "ionised acceptors, all species" },
    { "ionized_donors_per_species_cm3", "cm^-3", TRUE, "per donor species (when there are some)" },
    { "ionized_acceptors_per_species_cm3", "cm^-3", TRUE,
      "per acceptor species (when there are some)" },
    { "regime", NULL, TRUE, "degenerate, intrinsic, compensated, freeze-out, "
      "partial-ionization, near-intrinsic or extrinsic (README, Carrier statistics)" },
    { "statistics", NULL, FALSE, "the statistics of the numbers: fermi-dirac or boltzmann" },
    { "boltzmann_deviation", NULL, TRUE,
      "largest relative change of n or p had the other statistics been used" },
    { "points", NULL, TRUE, "one object per temperature (and doping) with the keys above, "
      "in a doping sweep also its donors and acceptors as resolved (a list: donor density "
      "outermost, then acceptor density, then temperature)" },
    { "material", NULL, FALSE, "the material's name" },
    { "fermi_level_reference", NULL, FALSE, "the zero of fermi_level_ev" },
    { "band_gap_model", NULL, FALSE, "varshni, bose-einstein or fixed" },
    { "sources", NULL, FALSE, "where the gap and the DOS masses come from" },
    { "donor_ionization_model", NULL, FALSE, "the donors' ionisation model used" },
    { "acceptor_ionization_model", NULL, FALSE, "the acceptors' ionisation model used" },
    { "donor_mott_density_cm3", "cm^-3", FALSE, "hydrogenic Mott density of the donors "
      "(null when the material lacks a permittivity or mass)" },
    { "acceptor_mott_density_cm3", "cm^-3", FALSE, "hydrogenic Mott density of the "
      "acceptors (rough: hydrogenic acceptor)" },
    { "band_gap_narrowing_model", NULL, FALSE, "slotboom or none" },
    { "heavy_doping", NULL, FALSE, "the heavy-doping models in detail: donors, acceptors "
      "{model, alpha_ev_cm, mott_density_cm3, hydrogenic_binding_ev, bohr_radius_angstrom, "
      "hydrogenic_mass_me, mass_source, source}, band_gap_narrowing {model, parameters, "
      "total_density_cm3, apparent_narrowing_ev, fermi_dirac_corrected, edge_split, source}; "
      "at the first point of a doping sweep" },
    { "donors", NULL, FALSE, "the donors as resolved: density_cm3, ionization_ev, "
      "effective_ionization_ev, fully_ionized, degeneracy, source (species when named); at "
      "the first point of a doping sweep (each point has its own)" },
    { "acceptors", NULL, FALSE, "the acceptors as resolved, as donors" },
    BM_FIELD_END
};

typedef struct {
    bm_dopant d[BM_MAX_DOPANTS];
    const char *species[BM_MAX_DOPANTS];   /* NULL when given by ionization_ev */
    const char *source[BM_MAX_DOPANTS];
    size_t n;
} Dopants;

/* sweep: the key's densities come from sweep_key, one species without density_cm3 */
static gboolean read_dopants(JsonObject *request, const char *key, bm_dopant_kind kind,
                             const char *sweep_key, const BmMaterialInput *mat, Dopants *out,
                             GError **error)
{
    static const char *const keys[] = { "species", "density_cm3", "ionization_ev",
                                        "degeneracy", NULL };
    JsonArray *a = json_object_get_array_member(request, key);
    guint len = json_array_get_length(a);
    if (len > BM_MAX_DOPANTS) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: key \"%s\" holds %u species (at most %d)", key, len,
                    BM_MAX_DOPANTS);
        return FALSE;
    }
    if (sweep_key && len != 1) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: key \"%s\" sweeps the density of one species: give exactly one "
                    "in \"%s\" (it holds %u)", sweep_key, key, len);
        return FALSE;
    }
    out->n = len;
    for (guint i = 0; i < len; i++) {
        g_autofree char *where = g_strdup_printf("%s[%u]", key, i);
        JsonObject *o = bm_json_element_object(a, i, keys, where, error);
        if (!o)
            return FALSE;
        bm_dopant *d = &out->d[i];
        memset(d, 0, sizeof *d);
        out->species[i] = NULL;
        out->source[i] = "given in the request";
        if (sweep_key && json_object_has_member(o, "density_cm3")) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s: key \"density_cm3\" is not used with \"%s\", which gives the "
                        "densities: leave it out", where, sweep_key);
            return FALSE;
        }
        if (!sweep_key && !bm_json_number(o, "density_cm3", where, &d->density_cm3, error))
            return FALSE;
        if (d->density_cm3 < 0) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s: key \"density_cm3\" must be >= 0 (got %g)", where, d->density_cm3);
            return FALSE;
        }
        gboolean has_species = json_object_has_member(o, "species");
        if (has_species) {
            JsonNode *s = json_object_get_member(o, "species");
            if (!JSON_NODE_HOLDS_VALUE(s) || json_node_get_value_type(s) != G_TYPE_STRING) {
                g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                            "%s: key \"species\" must be a string", where);
                return FALSE;
            }
            bm_errbuf err = {0};
            const bm_material_dopant *md = bm_material_find_dopant(&mat->mat,
                json_node_get_string(s), kind, &err);
            if (!md) {
                g_autofree char *ctx = g_strdup_printf("%s: key \"species\"", where);
                bm_error_from_core(error, &err, ctx);
                return FALSE;
            }
            d->ionisation_ev = md->ionisation_ev;
            d->degeneracy = md->degeneracy;
            out->species[i] = md->element;
            out->source[i] = md->source;
        } else if (!json_object_has_member(o, "ionization_ev")) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s: give \"ionization_ev\" or \"species\"", where);
            return FALSE;
        }
        /* explicit values override the table's */
        if (!bm_json_number_opt(o, "ionization_ev", where, &d->ionisation_ev, error)
            || !bm_json_number_opt(o, "degeneracy", where, &d->degeneracy, error))
            return FALSE;
        if (d->degeneracy < 0) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s: key \"degeneracy\" must be > 0 (got %g)", where, d->degeneracy);
            return FALSE;
        }
        if (has_species && (json_object_has_member(o, "ionization_ev")
                            || json_object_has_member(o, "degeneracy")))
            out->source[i] = "given in the request (overrides the table)";
    }
    return TRUE;
}

static double s_total(const Dopants *d)
{
    double t = 0.0;
    for (size_t i = 0; i < d->n; i++)
        t += d->d[i].density_cm3;
    return t;
}

typedef struct {
    gsize n;
    double *t, *me, *mh;
} MassPoints;

/* "dos_mass_points" replaces the material's two DOS-mass models by tables. */
static gboolean read_mass_points(JsonObject *request, MassPoints *mp, bm_material *m,
                                 GError **error)
{
    static const char *const keys[] = { "temperature_k", "electron_dos_mass_me",
                                        "statistics_hole_dos_mass_me", NULL };
    JsonArray *a = json_object_get_array_member(request, "dos_mass_points");
    mp->n = json_array_get_length(a);
    if (mp->n == 0) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: key \"dos_mass_points\" is empty");
        return FALSE;
    }
    mp->t = g_new(double, mp->n);
    mp->me = g_new(double, mp->n);
    mp->mh = g_new(double, mp->n);
    for (gsize i = 0; i < mp->n; i++) {
        g_autofree char *where = g_strdup_printf("dos_mass_points[%zu]", (size_t)i);
        JsonObject *o = bm_json_element_object(a, (guint)i, keys, where, error);
        if (!o || !bm_json_positive(o, "temperature_k", where, &mp->t[i], error)
            || !bm_json_positive(o, "electron_dos_mass_me", where, &mp->me[i], error)
            || !bm_json_positive(o, "statistics_hole_dos_mass_me", where, &mp->mh[i], error))
            return FALSE;
    }
    const char *src = "request: dos_mass_points (linear interpolation)";
    m->electron_dos_mass = (bm_dos_mass_model){ .kind = BM_DOS_MASS_TABLE, .n = mp->n,
                                                .t_k = mp->t, .mass = mp->me, .source = src };
    m->statistics_hole_dos_mass = (bm_dos_mass_model){ .kind = BM_DOS_MASS_TABLE,
                                                       .n = mp->n, .t_k = mp->t,
                                                       .mass = mp->mh, .source = src };
    bm_errbuf err = {0};
    if (bm_dos_mass_check(&m->electron_dos_mass, "electron DOS mass", &err) != BM_OK
        || bm_dos_mass_check(&m->statistics_hole_dos_mass, "statistics hole DOS mass",
                             &err) != BM_OK) {
        bm_error_from_core(error, &err, "request: key \"dos_mass_points\"");
        return FALSE;
    }
    return TRUE;
}

/* Errors of Nc, Nv and ni where a fixed DOS mass carries one: Nc ~ m^(3/2),
 * ni ~ (Nc Nv)^(1/2), first order, the two masses independent. */
static void set_errors(JsonObject *o, const bm_carrier_state *st, const bm_material *m)
{
    const bm_dos_mass_model *e = &m->electron_dos_mass, *h = &m->statistics_hole_dos_mass;
    double re = e->kind == BM_DOS_MASS_FIXED && e->error > 0.0 ? e->error / e->value : 0.0;
    double rh = h->kind == BM_DOS_MASS_FIXED && h->error > 0.0 ? h->error / h->value : 0.0;
    if (re == 0.0 && rh == 0.0)
        return;
    bm_json_set_number(o, "nc_error_cm3", 1.5 * re * st->nc_cm3);
    bm_json_set_number(o, "nv_error_cm3", 1.5 * rh * st->nv_cm3);
    bm_json_set_number(o, "ni_error_cm3", 0.75 * hypot(re, rh) * st->ni_cm3);
}

static void set_state(JsonObject *o, const bm_carrier_state *st, const Dopants *don,
                      const Dopants *acc)
{
    bm_json_set_number(o, "temperature_k", st->temperature_k);
    bm_json_set_number(o, "band_gap_ev", st->band_gap_ev);
    bm_json_set_number(o, "electron_dos_mass_me", st->m_dos_electron);
    bm_json_set_number(o, "statistics_hole_dos_mass_me", st->m_dos_hole);
    bm_json_set_number(o, "nc_cm3", st->nc_cm3);
    bm_json_set_number(o, "nv_cm3", st->nv_cm3);
    bm_json_set_number(o, "ni_cm3", st->ni_cm3);
    bm_json_set_number(o, "band_gap_narrowing_ev", st->band_gap_narrowing_ev);
    bm_json_set_number(o, "effective_band_gap_ev", st->effective_band_gap_ev);
    bm_json_set_number(o, "nie_cm3", st->nie_cm3);
    bm_json_set_number(o, "fermi_level_ev", st->fermi_level_ev);
    bm_json_set_number(o, "fermi_level_undoped_reference_ev",
                       st->fermi_level_ev + 0.5 * st->band_gap_narrowing_ev);
    bm_json_set_number(o, "ionized_fraction", st->ionised_fraction);
    bm_json_set_number(o, "n_cm3", st->n_cm3);
    bm_json_set_number(o, "p_cm3", st->p_cm3);
    bm_json_set_number(o, "donor_density_cm3", s_total(don));
    bm_json_set_number(o, "acceptor_density_cm3", s_total(acc));
    bm_json_set_number(o, "ionized_donors_cm3", st->donors_ionised_cm3);
    bm_json_set_number(o, "ionized_acceptors_cm3", st->acceptors_ionised_cm3);
    if (don->n)
        bm_json_set_numbers(o, "ionized_donors_per_species_cm3", st->donor_ionised_cm3, don->n);
    if (acc->n)
        bm_json_set_numbers(o, "ionized_acceptors_per_species_cm3", st->acceptor_ionised_cm3,
                            acc->n);
    json_object_set_string_member(o, "regime", bm_enum_name(&bm_enum_regime, (int)st->regime));
    json_object_set_string_member(o, "statistics",
                                  bm_enum_name(&bm_enum_statistics, (int)st->statistics));
    bm_json_set_number(o, "boltzmann_deviation", st->boltzmann_deviation);
}

/* used and full: the effective energies and flags of the solve (the same at
 * every temperature: they depend on the densities only) */
static JsonArray *dopant_list(const Dopants *d, const double *used, const int *full)
{
    JsonArray *a = json_array_new();
    for (size_t i = 0; i < d->n; i++) {
        JsonObject *o = json_object_new();
        if (d->species[i])
            json_object_set_string_member(o, "species", d->species[i]);
        bm_json_set_number(o, "density_cm3", d->d[i].density_cm3);
        bm_json_set_number(o, "ionization_ev", d->d[i].ionisation_ev);
        bm_json_set_number(o, "effective_ionization_ev", used[i]);
        json_object_set_boolean_member(o, "fully_ionized", full[i] != 0);
        if (d->d[i].degeneracy > 0)
            bm_json_set_number(o, "degeneracy", d->d[i].degeneracy);
        else
            json_object_set_string_member(o, "degeneracy", "default");
        json_object_set_string_member(o, "source", d->source[i]);
        json_array_add_object_element(a, o);
    }
    return a;
}

/* The heavy-doping description of one dopant kind. */
static JsonObject *kind_json(const bm_material *m, bm_dopant_kind kind,
                             const bm_ionisation_model *im, double *mott_density_cm3)
{
    JsonObject *o = json_object_new();
    bm_hydrogenic_info h;
    bm_material_hydrogenic(m, kind, &h, NULL);
    *mott_density_cm3 = h.mott_density_cm3;
    json_object_set_string_member(o, "model", bm_ionisation_kind_name(im->kind));
    bm_json_set_number(o, "alpha_ev_cm", im->kind == BM_IONISATION_PEARSON_BARDEEN
                                         ? im->alpha_ev_cm : NAN);
    bm_json_set_number(o, "mott_density_cm3", h.mott_density_cm3);
    bm_json_set_number(o, "hydrogenic_binding_ev", h.binding_ev);
    bm_json_set_number(o, "bohr_radius_angstrom", h.bohr_radius_angstrom);
    bm_json_set_number(o, "hydrogenic_mass_me", h.mass);
    json_object_set_string_member(o, "mass_source", h.mass_source);
    const bm_sourced *alpha = kind == BM_DOPANT_DONOR ? &m->donor_ionisation_alpha
                                                      : &m->acceptor_ionisation_alpha;
    const char *src = "single level: the ionisation energies as given";
    if (im->kind == BM_IONISATION_PEARSON_BARDEEN)
        src = alpha->source ? alpha->source : "the material";
    else if (im->kind == BM_IONISATION_MOTT)
        src = "full ionisation at and above N_c = (0.26 / a*)^3 (Mott criterion; Edwards & "
              "Sienko, Phys. Rev. B 17, 2575 (1978); from memory), a* from the hydrogenic "
              "mass and relative_permittivity";
    json_object_set_string_member(o, "source", src);
    return o;
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    JsonObject *resp = NULL;
    JsonArray *pts = NULL;
    MassPoints mp = {0};
    Dopants don = {0}, acc = {0};
    g_autofree double *t = NULL;
    gsize nt = 0;
    BmMaterialInput mat = {0};
    gboolean have_mat = FALSE;

    /* the registry checked "statistics" and that every temperature is > 0 */
    const char *stats = json_object_get_string_member(request, "statistics");
    bm_statistics statistics = (bm_statistics)bm_enum_value(request, "statistics",
                                                            &bm_enum_statistics);
    int ion_choice = bm_enum_value(request, "ionization_model", &bm_enum_ionization_model);
    int bgn_choice = bm_enum_value(request, "band_gap_narrowing", &bm_enum_band_gap_narrowing);
    bm_carrier_state first = {0};
    gboolean one = json_object_has_member(request, "temperature_k");
    gboolean list = json_object_has_member(request, "temperatures_k");
    if (one == list) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: give exactly one of \"temperature_k\" or \"temperatures_k\"");
        return NULL;
    }
    const char *tkey = list ? "temperatures_k" : "temperature_k";
    t = bm_json_numbers(request, tkey, NULL, &nt, error);
    if (!t)
        return NULL;
    /* doping sweeps: every combination of donor density, acceptor density, temperature */
    const char *dkey = json_object_has_member(request, "donor_densities_cm3")
                       ? "donor_densities_cm3" : NULL;
    const char *akey = json_object_has_member(request, "acceptor_densities_cm3")
                       ? "acceptor_densities_cm3" : NULL;
    g_autofree double *nd = NULL, *na = NULL;
    gsize nnd = 1, nna = 1;
    if ((dkey && !(nd = bm_json_numbers(request, dkey, NULL, &nnd, error)))
        || (akey && !(na = bm_json_numbers(request, akey, NULL, &nna, error))))
        return NULL;
    const char *empty = nt == 0 ? tkey : nnd == 0 ? dkey : nna == 0 ? akey : NULL;
    if (empty) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "request: key \"%s\" is empty",
                    empty);
        return NULL;
    }
    gboolean doping_sweep = dkey || akey;
    list = list || doping_sweep;

    have_mat = bm_material_input_read(request, "material", &mat, error);
    if (!have_mat)
        goto done;
    if (json_object_has_member(request, "dos_mass_points")
        && !read_mass_points(request, &mp, &mat.mat, error))
        goto done;
    if (mat.mat.gap.kind == BM_GAP_NONE || mat.mat.electron_dos_mass.kind == BM_DOS_MASS_NONE
        || mat.mat.statistics_hole_dos_mass.kind == BM_DOS_MASS_NONE) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: missing key \"%s\"%s", mat.origin,
                    mat.mat.gap.kind == BM_GAP_NONE
                    ? "varshni\", \"bose_einstein\" or \"band_gap_ev"
                    : mat.mat.electron_dos_mass.kind == BM_DOS_MASS_NONE
                    ? "electron_dos_mass_me" : "statistics_hole_dos_mass_me",
                    mat.mat.gap.kind == BM_GAP_NONE ? "" : " (or give \"dos_mass_points\")");
        goto done;
    }
    if (!read_dopants(request, "donors", BM_DOPANT_DONOR, dkey, &mat, &don, error)
        || !read_dopants(request, "acceptors", BM_DOPANT_ACCEPTOR, akey, &mat, &acc, error))
        goto done;

    /* the core evaluates the gap and both DOS masses at each temperature */
    bm_semiconductor s = {0};
    s.gap = &mat.mat.gap;
    s.electron_dos_mass = &mat.mat.electron_dos_mass;
    s.hole_dos_mass = &mat.mat.statistics_hole_dos_mass;
    s.donors = don.d;
    s.ndonors = don.n;
    s.acceptors = acc.d;
    s.nacceptors = acc.n;
    s.statistics = statistics;
    {
        bm_errbuf err = {0};
        if (bm_material_ionisation_model(&mat.mat, BM_DOPANT_DONOR, ion_choice,
                                         &s.donor_ionisation, &err) != BM_OK
            || bm_material_ionisation_model(&mat.mat, BM_DOPANT_ACCEPTOR, ion_choice,
                                            &s.acceptor_ionisation, &err) != BM_OK) {
            bm_error_from_core(error, &err, "request: key \"ionization_model\"");
            goto done;
        }
    }
    const bm_bgn_model *bgn = bgn_choice && mat.mat.band_gap_narrowing.kind != BM_BGN_NONE
                              ? &mat.mat.band_gap_narrowing : NULL;
    s.band_gap_narrowing = bgn;

    resp = json_object_new();
    pts = list ? json_array_new() : NULL;
    for (gsize npt = 0; npt < nnd * nna * nt; npt++) {
        gsize i = npt % nt, b = npt / nt % nna, a = npt / nt / nna;
        if (dkey)
            don.d[0].density_cm3 = nd[a];
        if (akey)
            acc.d[0].density_cm3 = na[b];
        g_autoptr(GString) at = g_string_new(NULL);   /* the point, for messages */
        g_string_append_printf(at, "%g K", t[i]);
        if (dkey)
            g_string_append_printf(at, ", donors %g cm^-3", nd[a]);
        if (akey)
            g_string_append_printf(at, ", acceptors %g cm^-3", na[b]);
        g_autofree char *where = !list ? g_strdup("request: key \"temperature_k\"")
            : g_strdup_printf("request: the point at %s", at->str);
        bm_errbuf err = {0};
        bm_carrier_state st;
        if (bm_carriers_solve(&s, t[i], &st, &err) != BM_OK) {
            bm_error_from_core(error, &err, where);
            goto fail;
        }
        JsonObject *row = list ? json_object_new() : resp;
        set_state(row, &st, &don, &acc);
        set_errors(row, &st, &mat.mat);
        if (doping_sweep) {
            json_object_set_array_member(row, "donors", dopant_list(&don, st.donor_ionisation_ev,
                                                                    st.donor_fully_ionised));
            json_object_set_array_member(row, "acceptors",
                                         dopant_list(&acc, st.acceptor_ionisation_ev,
                                                     st.acceptor_fully_ionised));
        }
        if (npt == 0) {
            first = st;
            first.warnings = (bm_warnings){0};
        }
        if (list)
            json_array_add_object_element(pts, row);
        g_autofree char *prefix = list ? g_strdup_printf("%s: ", at->str) : g_strdup("");
        for (size_t k = 0; k < st.warnings.count; k++)
            bm_json_warn(resp, st.warnings.items[k].code, "%s%s", prefix,
                         st.warnings.items[k].text);
        bm_warnings_clear(&st.warnings);
    }
    /* the response's own dopant lists and heavy-doping summary: the first point */
    if (dkey)
        don.d[0].density_cm3 = nd[0];
    if (akey)
        acc.d[0].density_cm3 = na[0];
    json_object_set_string_member(resp, "material", mat.mat.name);
    json_object_set_string_member(resp, "fermi_level_reference", "valence-band maximum");
    json_object_set_string_member(resp, "band_gap_model", bm_gap_kind_name(mat.mat.gap.kind));
    JsonObject *src = json_object_new();
    json_object_set_string_member(src, "band_gap_ev",
                                  mat.mat.gap.source ? mat.mat.gap.source : mat.origin);
    json_object_set_string_member(src, "electron_dos_mass_me",
                                  mat.mat.electron_dos_mass.source);
    json_object_set_string_member(src, "statistics_hole_dos_mass_me",
                                  mat.mat.statistics_hole_dos_mass.source);
    json_object_set_object_member(resp, "sources", src);
    json_object_set_array_member(resp, "donors", dopant_list(&don, first.donor_ionisation_ev,
                                                             first.donor_fully_ionised));
    json_object_set_array_member(resp, "acceptors",
                                 dopant_list(&acc, first.acceptor_ionisation_ev,
                                             first.acceptor_fully_ionised));
    json_object_set_string_member(resp, "donor_ionization_model",
                                  bm_ionisation_kind_name(s.donor_ionisation.kind));
    json_object_set_string_member(resp, "acceptor_ionization_model",
                                  bm_ionisation_kind_name(s.acceptor_ionisation.kind));
    json_object_set_string_member(resp, "band_gap_narrowing_model",
                                  bm_bgn_kind_name(bgn ? bgn->kind : BM_BGN_NONE));
    {
        JsonObject *hd = json_object_new();
        double md, ma;
        JsonObject *dj = kind_json(&mat.mat, BM_DOPANT_DONOR, &s.donor_ionisation, &md);
        JsonObject *aj = kind_json(&mat.mat, BM_DOPANT_ACCEPTOR, &s.acceptor_ionisation, &ma);
        bm_json_set_number(resp, "donor_mott_density_cm3", md);
        bm_json_set_number(resp, "acceptor_mott_density_cm3", ma);
        json_object_set_object_member(hd, "donors", dj);
        json_object_set_object_member(hd, "acceptors", aj);
        JsonObject *b = json_object_new();
        json_object_set_string_member(b, "model", bm_bgn_kind_name(bgn ? bgn->kind
                                                                     : BM_BGN_NONE));
        if (bgn) {
            bm_json_set_number(b, "e1_ev", bgn->e1_ev);
            bm_json_set_number(b, "n0_cm3", bgn->n0_cm3);
            bm_json_set_number(b, "c", bgn->c);
            json_object_set_boolean_member(b, "apparent", bgn->apparent != 0);
            bm_json_set_number(b, "total_density_cm3", s_total(&don) + s_total(&acc));
            bm_json_set_number(b, "apparent_narrowing_ev", first.apparent_narrowing_ev);
            json_object_set_boolean_member(b, "fermi_dirac_corrected",
                                           bgn->apparent && statistics == BM_FERMI_DIRAC);
            json_object_set_string_member(b, "edge_split",
                "half to each edge: against the undoped crystal Ev rises and Ec falls by "
                "dEg/2 (chosen here, no source); fermi_level_ev is measured from the "
                "narrowed Ev, fermi_level_undoped_reference_ev from the undoped one");
            json_object_set_string_member(b, "source", bgn->source ? bgn->source
                                                                   : mat.origin);
        } else {
            json_object_set_string_member(b, "source", bgn_choice
                                          ? "the material has no band-gap narrowing model"
                                          : "switched off in the request");
        }
        json_object_set_object_member(hd, "band_gap_narrowing", b);
        json_object_set_object_member(resp, "heavy_doping", hd);
    }
    if (list) {
        json_object_set_string_member(resp, "statistics", stats);
        json_object_set_array_member(resp, "points", pts);
        pts = NULL;
    }
    goto done;

fail:
    if (pts)
        json_array_unref(pts);
    json_object_unref(resp);
    resp = NULL;
done:
    bm_material_input_clear(&mat);
    g_free(mp.t);
    g_free(mp.me);
    g_free(mp.mh);
    return resp;
}

const BmOperation bm_op_carrier_statistics = {
    .name = "carrier-statistics",
    .summary = "Effective densities of states, intrinsic density, Fermi level and ionised "
               "dopants from charge neutrality",
    .params = params,
    .run = run,
    .response = response,
};
