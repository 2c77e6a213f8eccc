/* valley-average.c: operation "valley-average" -- the star of a valley under a
 * point group, or an explicit valley list, and its conductivity and DOS masses. */
#include <math.h>
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-valleys.h"
#include "bm-units.h"
#include "bm-materials.h"
#include "material-input.h"
#include "valley-input.h"
#include "bm-enums.h"

/* const view of a double[3][3] for the setters (C11 qualifier rules) */
#define CM3(m) ((const double (*)[3])(m))

static const BmParam params[] = {
    BM_VALLEY_INPUT_PARAMS,
    { "temperature_k", BM_VALUE_NUMBER, FALSE, NULL,
      "temperature for thermal valley populations (needed when offsets differ)",
      .unit = "K", .lower = BM_GE(0) },
    { "statistics", BM_VALUE_STRING, FALSE, BM_STATISTICS_DEFAULT_JSON,
      "statistics of the thermal populations (fermi-dirac needs fermi_level_ev)",
      .choices = &bm_enum_statistics },
    { "fermi_level_ev", BM_VALUE_NUMBER, FALSE, NULL,
      "Fermi level for fermi-dirac, measured like the offsets (positive into the band)",
      .unit = "eV" },
    { "strain", BM_VALUE_ARRAY, FALSE, NULL,
      "strain tensor [[e_xx, e_xy, e_xz], ...] (symmetric, in the point group's frame): "
      "each valley's edge moves by Xi_d tr(e) + Xi_u a.e.a (a the valley's direction; "
      "Herring & Vogt 1956), added to its energy_offset_ev; needs temperature_k",
      .unit = NULL },
    { "deformation_potentials_ev", BM_VALUE_OBJECT, FALSE, NULL,
      "with strain: {uniaxial (Xi_u), dilation (Xi_d, default 0: it moves every valley "
      "alike)}; built in for the conduction valleys of Si and Ge with \"material\"",
      .unit = "eV" },
    { "confinement_miller", BM_VALUE_ARRAY, FALSE, NULL,
      "Miller indices [h, k, l] of a surface or quantum-well plane: each valley's "
      "quantization mass along its normal and its 2D masses in the plane, grouped into "
      "subband ladders", .unit = NULL },
    { "well_width_nm", BM_VALUE_NUMBER, FALSE, NULL,
      "with confinement_miller: the width of an infinite square well, for the first three "
      "subbands of each ladder (energies from the bottom of the well), ready for "
      "sheet-density", .unit = "nm", .lower = BM_GT(0) },
    BM_PARAM_END
};

static const BmField response[] = {
    { "strain", NULL, TRUE,
      "with strain: {tensor, uniaxial_ev, dilation_ev, source, valley_shifts_ev (one per "
      "valley, in the order of valleys)}" },
    { "confinement", NULL, TRUE,
      "with confinement_miller: {miller_indices, normal (Cartesian unit vector), "
      "normal_from, ladders [{quantization_mass_me, dos_mass_2d_me, "
      "conductivity_masses_2d_me, valley_degeneracy, valleys (indices)}, heaviest "
      "quantization mass (lowest subbands) first], valleys [{quantization_mass_me, "
      "dos_mass_2d_me, inplane_masses_me, inplane_axes}], subbands (with well_width_nm: "
      "[{energy_ev, mass_me, valley_degeneracy, ladder, index}] by energy, as sheet-density "
      "takes them), method}" },
    { "valley_count", NULL, FALSE, "number of valleys (sum of the weights)" },
    { "dos_mass_me", "m_e", FALSE, "density-of-states mass of all valleys together" },
    { "dos_mass_reference", NULL, FALSE, "the edge the DOS mass refers to" },
    { "conductivity_mass_tensor_me", "m_e", FALSE,
      "conductivity mass tensor: inverse of the population-weighted mean inverse tensor" },
    { "conductivity_mass_me", "m_e", FALSE, "3 / trace of the inverse tensor" },
    { "conductivity_isotropic", NULL, FALSE, "whether the tensor is a scalar" },
    { "dos_mass_error_me", "m_e", TRUE, "where the valley's masses carry errors: the error "
      "of dos_mass_me they give" },
    { "conductivity_mass_error_me", "m_e", TRUE, "the same for conductivity_mass_me" },
    { "errors_from", NULL, TRUE, "how those errors were propagated" },
    { "conductivity_mass_meaning", NULL, TRUE,
      "what conductivity_mass_me is when the tensor is not isotropic" },
    { "conductivity_principal_masses_me", "m_e", TRUE,
      "principal values of the tensor (not isotropic)" },
    { "conductivity_principal_axes", NULL, TRUE,
      "their axes, rows of Cartesian unit vectors (not isotropic)" },
    { "population", NULL, FALSE,
      "how the valleys are populated: {statistics (equal, boltzmann, fermi-dirac), "
      "temperature_k, fermi_level_ev}" },
    { "material", NULL, TRUE, "the material's name (with \"material\")" },
    { "valley_source", NULL, TRUE, "source of the material's valley (with \"material\")" },
    { "point_group", NULL, TRUE, "the point group of the star (with \"valley\" or \"material\")" },
    { "star_symmetry", NULL, TRUE, "the symmetry of the star: the point group with time "
      "reversal, its Laue class (with \"valley\" or \"material\")" },
    { "position", NULL, TRUE, "the valley site of the star (with \"valley\" or "
      "\"material\"; zone-shares with \"lattice_angstrom\")" },
    { "position_from", NULL, TRUE,
      "how the site was chosen: request, default, or the extremum's k (with \"valley\")" },
    { "direction_snapped", NULL, TRUE,
      "an extremum's direction turned onto its symmetry element: {angle_rad, tolerance_rad "
      "(twice k_error / |k|, 1e-4 to 0.05)}" },
    { "carrier", NULL, FALSE,
      "electron, or hole when the valleys have negative masses (a band maximum)" },
    { "carrier_note", NULL, TRUE, "for holes: how the negative masses were taken" },
    { "valleys", NULL, FALSE,
      "each valley: direction, weight, principal_masses_me, axes, energy_offset_ev, "
      "population_fraction" },
    BM_FIELD_END
};


static gboolean read_population(JsonObject *request, bm_population *pop, gboolean *has_t,
                                GError **error)
{
    /* the registry checked "statistics" against the one statistics table */
    pop->statistics = (bm_statistics)bm_enum_value(request, "statistics", &bm_enum_statistics);
    *has_t = json_object_has_member(request, "temperature_k");
    if (!*has_t) {
        if (json_object_has_member(request, "fermi_level_ev")) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request: \"fermi_level_ev\" needs \"temperature_k\" (without a "
                        "temperature every valley is populated alike)");
            return FALSE;
        }
        return TRUE;   /* equal populations: the statistics do not enter */
    }
    pop->thermal = 1;
    if (!bm_json_number(request, "temperature_k", NULL, &pop->temperature_k, error))
        return FALSE;
    if (pop->statistics != BM_FERMI_DIRAC)
        return TRUE;
    if (!json_object_has_member(request, "fermi_level_ev")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: fermi-dirac populations (the default \"statistics\") need "
                    "\"fermi_level_ev\"; give it, or \"statistics\": \"boltzmann\" for "
                    "non-degenerate carriers");
        return FALSE;
    }
    return bm_json_number(request, "fermi_level_ev", NULL, &pop->fermi_level_ev, error);
}

static JsonObject *population_json(const bm_population *pop, gboolean has_t)
{
    JsonObject *p = json_object_new();
    json_object_set_string_member(p, "statistics", !pop->thermal ? "equal"
                                  : bm_enum_name(&bm_enum_statistics, (int)pop->statistics));
    if (has_t)
        bm_json_set_number(p, "temperature_k", pop->temperature_k);
    if (pop->thermal && pop->statistics == BM_FERMI_DIRAC)
        bm_json_set_number(p, "fermi_level_ev", pop->fermi_level_ev);
    return p;
}

static JsonArray *valleys_json(const BmValleySet *s)
{
    JsonArray *va = json_array_new();
    for (size_t i = 0; i < s->n; i++) {
        const bm_valley *v = &s->valleys[i];
        JsonObject *o = json_object_new();
        bm_json_set_vec3(o, "direction", v->direction);
        if (s->zone_shares)
            bm_json_set_vec3(o, "k_inv_angstrom", v->k);
        bm_json_set_number(o, "weight", v->weight);
        bm_json_set_vec3(o, "principal_masses_me", v->masses);
        bm_json_set_mat3(o, "axes", CM3(v->axes));
        bm_json_set_number(o, "energy_offset_ev", v->energy_offset_ev);
        bm_json_set_number(o, "population_fraction", v->population);
        json_array_add_object_element(va, o);
    }
    return va;
}

/* The scalar is 3 / tr(M_c^-1), and tr(M_c^-1) is the population-weighted
 * mean of the valleys' traces: where every valley has the same trace (the
 * valleys of one star, whatever their offsets) no population can move it. */
static const char *conductivity_meaning(const BmValleySet *s)
{
    double lo = INFINITY, hi = -INFINITY;
    for (size_t v = 0; v < s->n; v++) {
        const double (*m)[3] = (const double (*)[3])s->valleys[v].inv_mass;
        double tr = m[0][0] + m[1][1] + m[2][2];
        lo = fmin(lo, tr);
        hi = fmax(hi, tr);
    }
    if (hi - lo <= 1e-9 * fabs(hi))
        return "3 / trace of the inverse tensor: the harmonic mean of the principal values, "
               "a direction average. Every valley here has the same trace, so no shift of "
               "the valley populations (strain, valley offsets, temperature) can change it: "
               "read conductivity_principal_masses_me for transport along a direction";
    return "3 / trace of the inverse tensor: the harmonic mean of the principal values, a "
           "direction average; read conductivity_principal_masses_me for transport along a "
           "direction";
}

/* A valley star has the symmetry of the point group with time reversal
 * (k -> -k), which adds inversion: the group's Laue class. */
static void set_star_symmetry(JsonObject *resp, const char *group_name)
{
    bm_point_group g;
    bm_errbuf err = {0};
    if (bm_point_group_get(group_name, &g, &err) != BM_OK)
        return;
    g_autofree char *text = g_strdup_printf("%s with time reversal (k -> -k): the Laue "
                                            "class %s, so groups of one Laue class give the "
                                            "same star", g.name, g.laue);
    json_object_set_string_member(resp, "star_symmetry", text);
}

static JsonObject *respond(const BmValleySet *s, const bm_population *pop, gboolean has_t,
                           const bm_valley_average *avg)
{
    JsonObject *resp = json_object_new();
    bm_json_set_number(resp, "valley_count", s->count);
    bm_json_set_number(resp, "dos_mass_me", avg->dos_mass);
    json_object_set_string_member(resp, "dos_mass_reference", "lowest valley edge");
    /* anisotropic: the directional masses first, the scalar after them with
     * what it means (and when populations cannot move it) */
    if (!avg->conductivity_isotropic) {
        bm_json_set_vec3(resp, "conductivity_principal_masses_me", avg->conductivity_masses);
        bm_json_set_mat3(resp, "conductivity_principal_axes", CM3(avg->conductivity_axes));
    }
    bm_json_set_mat3(resp, "conductivity_mass_tensor_me", CM3(avg->conductivity_mass_tensor));
    bm_json_set_number(resp, "conductivity_mass_me", avg->conductivity_mass);
    if (s->has_mass_errors) {
        bm_json_set_number(resp, "dos_mass_error_me", s->dos_rel_error * avg->dos_mass);
        bm_json_set_number(resp, "conductivity_mass_error_me",
                           s->conductivity_rel_error * avg->conductivity_mass);
        json_object_set_string_member(resp, "errors_from", "the valley's mass errors, "
                                      "independent, to first order (m_d ~ (m1 m2 m3)^(1/3), "
                                      "m_c = 3 / sum 1/m_i)");
    }
    json_object_set_boolean_member(resp, "conductivity_isotropic", avg->conductivity_isotropic);
    if (!avg->conductivity_isotropic)
        json_object_set_string_member(resp, "conductivity_mass_meaning",
                                      conductivity_meaning(s));
    json_object_set_object_member(resp, "population", population_json(pop, has_t));
    if (s->has_mat) {
        json_object_set_string_member(resp, "material", s->mat.mat.name);
        json_object_set_string_member(resp, "valley_source", s->mat.mat.electron.source);
    }
    if (s->group_name) {
        json_object_set_string_member(resp, "point_group", s->group_name);
        set_star_symmetry(resp, s->group_name);
        json_object_set_string_member(resp, "position", s->site_name);
        if (s->site_from)
            json_object_set_string_member(resp, "position_from", s->site_from);
        if (s->snap_tol > 0.0) {
            JsonObject *sn = json_object_new();
            bm_json_set_number(sn, "angle_rad", s->snapped_rad);
            bm_json_set_number(sn, "tolerance_rad", s->snap_tol);
            json_object_set_object_member(resp, "direction_snapped", sn);
        }
    }
    json_object_set_string_member(resp, "carrier", bm_valley_carrier_name(s->carrier));
    if (s->carrier == BM_CARRIER_HOLE)
        json_object_set_string_member(resp, "carrier_note",
                                      "negative inertial masses (a band maximum): a hole "
                                      "valley, averaged with the hole masses |m|");
    json_object_set_array_member(resp, "valleys", valleys_json(s));
    bm_json_warn_all(resp, &s->pw);
    bm_json_warn_all(resp, &s->carried);
    if (s->star)
        bm_json_warn_all(resp, &s->star->warnings);
    bm_json_warn_all(resp, &avg->warnings);
    return resp;
}


/* Built-in conduction-band deformation potentials (eV). Xi_u: Si Delta 9.16
 * (Van de Walle & Martin, Phys. Rev. B 34, 5621 (1986)), Ge L 16.2 (Van de
 * Walle, Phys. Rev. B 39, 1871 (1989)); both from memory. Xi_d is not built
 * in: it moves every valley of the star alike (the gap, not the populations). */
static const struct { const char *material; double uniaxial; const char *source; }
deformation_table[] = {
    { "Si", 9.16, "Van de Walle & Martin, Phys. Rev. B 34, 5621 (1986), Xi_u of the Delta "
                  "valleys (from memory); Xi_d not built in" },
    { "Ge", 16.2, "Van de Walle, Phys. Rev. B 39, 1871 (1989), Xi_u of the L valleys (from "
                  "memory); Xi_d not built in" },
};

/* Strain: each valley's edge moves by Xi_d tr(e) + Xi_u a.e.a (Herring & Vogt,
 * Phys. Rev. 101, 944 (1956)), a the unit direction of the valley. */
static JsonObject *apply_strain(JsonObject *request, BmValleySet *s, GError **error)
{
    double e[3][3];
    if (!bm_json_mat3(request, "strain", "request", e, error))
        return NULL;
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < i; j++)
            if (fabs(e[i][j] - e[j][i]) > 1e-12 * (1.0 + fabs(e[i][j]))) {
                g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "request: \"strain\" "
                            "is not symmetric: [%d][%d] = %g but [%d][%d] = %g", i, j,
                            e[i][j], j, i, e[j][i]);
                return NULL;
            }
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            if (fabs(e[i][j]) > 0.2) {
                g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "request: \"strain\"[%d]"
                            "[%d] = %g is beyond 0.2 (a strain, not a percentage?); the "
                            "deformation-potential model is linear in small strains", i, j,
                            e[i][j]);
                return NULL;
            }
    if (s->carrier == BM_CARRIER_HOLE) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "request: \"strain\" moves "
                    "conduction valleys; a hole valley (a band maximum) needs the valence "
                    "deformation potentials of a k.p model, which this does not apply");
        return NULL;
    }
    double xu = NAN, xd = 0.0;
    const char *source = "request";
    if (json_object_has_member(request, "deformation_potentials_ev")) {
        JsonObject *d = json_object_get_object_member(request, "deformation_potentials_ev");
        static const char *const keys[] = { "uniaxial", "dilation", NULL };
        if (!bm_json_only_keys(d, keys, "deformation_potentials_ev", error)
            || !bm_json_number(d, "uniaxial", "deformation_potentials_ev", &xu, error))
            return NULL;
        if (json_object_has_member(d, "dilation")
            && !bm_json_number(d, "dilation", "deformation_potentials_ev", &xd, error))
            return NULL;
        if (!isfinite(xu) || !isfinite(xd) || fabs(xu) > 100 || fabs(xd) > 100) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "request: "
                        "\"deformation_potentials_ev\" needs a finite \"uniaxial\" within "
                        "|Xi| <= 100 eV");
            return NULL;
        }
    } else {
        for (size_t i = 0; s->has_mat && i < G_N_ELEMENTS(deformation_table); i++)
            if (strcmp(s->mat.mat.name, deformation_table[i].material) == 0) {
                xu = deformation_table[i].uniaxial;
                source = deformation_table[i].source;
            }
        if (isnan(xu)) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "request: \"strain\" needs "
                        "\"deformation_potentials_ev\": {\"uniaxial\": Xi_u} (built in "
                        "only for the conduction valleys of the materials Si and Ge)");
            return NULL;
        }
    }
    double tr = e[0][0] + e[1][1] + e[2][2];
    JsonObject *o = json_object_new();
    bm_json_set_mat3(o, "tensor", (const double (*)[3])e);
    bm_json_set_number(o, "uniaxial_ev", xu);
    bm_json_set_number(o, "dilation_ev", xd);
    json_object_set_string_member(o, "source", source);
    JsonArray *shifts = json_array_new();
    for (size_t v = 0; v < s->n; v++) {
        const double *a = s->valleys[v].direction;
        double aea = 0.0;
        for (int i = 0; i < 3; i++)
            for (int j = 0; j < 3; j++)
                aea += a[i] * e[i][j] * a[j];
        double shift = xd * tr + xu * aea;
        s->valleys[v].energy_offset_ev += shift;
        json_array_add_double_element(shifts, shift);
    }
    json_object_set_array_member(o, "valley_shifts_ev", shifts);
    return o;
}

static gboolean is_cubic(const char *group)
{
    static const char *const cubic[] = { "T", "Th", "O", "Td", "Oh", "23", "m-3", "432",
                                         "-43m", "m-3m" };
    for (size_t i = 0; group && i < G_N_ELEMENTS(cubic); i++)
        if (strcmp(group, cubic[i]) == 0)
            return TRUE;
    return FALSE;
}

/* The layer normal of Miller indices (h k l): h b1 + k b2 + l b3 for the
 * lattice given, (h, k, l) itself along the cube axes of a cubic crystal. */
static gboolean layer_normal(JsonObject *request, const BmValleySet *s, double hkl[3],
                             double n[3], const char **from, GError **error)
{
    if (!bm_json_vec3(request, "confinement_miller", "request", hkl, error))
        return FALSE;
    for (int i = 0; i < 3; i++)
        if (hkl[i] != nearbyint(hkl[i]) || fabs(hkl[i]) > 1000) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "request: "
                        "\"confinement_miller\"[%d] = %g is not a Miller index (an integer, "
                        "|h| <= 1000)", i, hkl[i]);
            return FALSE;
        }
    if (hkl[0] == 0 && hkl[1] == 0 && hkl[2] == 0) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"confinement_miller\" (0 0 0) names no plane");
        return FALSE;
    }
    if (s->zone_shares) {
        double b[3][3];
        double (*a)[3] = (double (*)[3])s->lattice;
        for (int i = 0; i < 3; i++)
            for (int j = 0; j < 3; j++) {
                int i1 = (i + 1) % 3, i2 = (i + 2) % 3, j1 = (j + 1) % 3, j2 = (j + 2) % 3;
                b[i][j] = a[i1][j1] * a[i2][j2] - a[i1][j2] * a[i2][j1];   /* a_i1 x a_i2 */
            }
        for (int j = 0; j < 3; j++)
            n[j] = hkl[0] * b[0][j] + hkl[1] * b[1][j] + hkl[2] * b[2][j];
        *from = "h b1 + k b2 + l b3 of lattice_angstrom";
    } else {
        if (s->group_name && !is_cubic(s->group_name)) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "request: Miller indices of "
                        "a %s crystal need its lattice: give \"lattice_angstrom\" (and the "
                        "valley's k)", s->group_name);
            return FALSE;
        }
        memcpy(n, hkl, 3 * sizeof *n);
        *from = "(h, k, l) along the cube axes x, y, z (a cubic crystal)";
    }
    double l = sqrt(n[0] * n[0] + n[1] * n[1] + n[2] * n[2]);
    for (int j = 0; j < 3; j++)
        n[j] /= l;
    return TRUE;
}

/* Each valley confined along the normal; valleys of one quantization and
 * 2D DOS mass form a ladder of subbands, heaviest m_z (lowest subbands) first. */
static JsonObject *confinement_json(JsonObject *request, const BmValleySet *s, GError **error)
{
    double hkl[3], n[3];
    const char *from = NULL;
    if (!layer_normal(request, s, hkl, n, &from, error))
        return NULL;
    g_autofree bm_confined_valley *cv = g_new0(bm_confined_valley, s->n);
    g_autofree int *ladder = g_new(int, s->n);
    bm_errbuf err = {0};
    for (size_t v = 0; v < s->n; v++)
        if (bm_valley_confine(&s->valleys[v], n, &cv[v], &err) != BM_OK) {
            bm_error_from_core(error, &err, "confinement");
            return NULL;
        }
    /* ladders: distinct (m_z, m_d2D), ordered by decreasing m_z */
    size_t nl = 0;
    g_autofree size_t *first = g_new(size_t, s->n);
    for (size_t v = 0; v < s->n; v++) {
        ladder[v] = -1;
        for (size_t l = 0; l < nl && ladder[v] < 0; l++) {
            const bm_confined_valley *c = &cv[first[l]];
            if (fabs(c->quantization_mass - cv[v].quantization_mass) <= 1e-9 * c->quantization_mass
                && fabs(c->dos_mass_2d - cv[v].dos_mass_2d) <= 1e-9 * c->dos_mass_2d)
                ladder[v] = (int)l;
        }
        if (ladder[v] < 0) {
            first[nl] = v;
            ladder[v] = (int)nl++;
        }
    }
    g_autofree size_t *order = g_new(size_t, nl);
    for (size_t l = 0; l < nl; l++)
        order[l] = l;
    for (size_t i = 0; i < nl; i++)
        for (size_t j = i + 1; j < nl; j++)
            if (cv[first[order[j]]].quantization_mass > cv[first[order[i]]].quantization_mass) {
                size_t t = order[i];
                order[i] = order[j];
                order[j] = t;
            }
    JsonObject *o = json_object_new();
    bm_json_set_vec3(o, "miller_indices", hkl);
    bm_json_set_vec3(o, "normal", n);
    json_object_set_string_member(o, "normal_from", from);
    JsonArray *la = json_array_new();
    g_autofree double *degen = g_new0(double, nl);
    for (size_t r = 0; r < nl; r++) {
        size_t l = order[r];
        const bm_confined_valley *c = &cv[first[l]];
        JsonObject *lo = json_object_new();
        JsonArray *members = json_array_new();
        for (size_t v = 0; v < s->n; v++)
            if (ladder[v] == (int)l) {
                degen[r] += s->valleys[v].weight;
                json_array_add_int_element(members, (gint64)v);
            }
        bm_json_set_number(lo, "quantization_mass_me", c->quantization_mass);
        bm_json_set_number(lo, "dos_mass_2d_me", c->dos_mass_2d);
        JsonArray *cm = json_array_new();
        json_array_add_double_element(cm, c->inplane_masses[0]);
        json_array_add_double_element(cm, c->inplane_masses[1]);
        json_object_set_array_member(lo, "conductivity_masses_2d_me", cm);
        bm_json_set_number(lo, "valley_degeneracy", degen[r]);
        json_object_set_array_member(lo, "valleys", members);
        json_array_add_object_element(la, lo);
    }
    json_object_set_array_member(o, "ladders", la);
    JsonArray *va = json_array_new();
    for (size_t v = 0; v < s->n; v++) {
        JsonObject *vo = json_object_new();
        bm_json_set_number(vo, "quantization_mass_me", cv[v].quantization_mass);
        bm_json_set_number(vo, "dos_mass_2d_me", cv[v].dos_mass_2d);
        JsonArray *im = json_array_new();
        json_array_add_double_element(im, cv[v].inplane_masses[0]);
        json_array_add_double_element(im, cv[v].inplane_masses[1]);
        json_object_set_array_member(vo, "inplane_masses_me", im);
        JsonArray *ax = json_array_new();
        for (int m = 0; m < 2; m++) {
            JsonArray *row = json_array_new();
            for (int i = 0; i < 3; i++)
                json_array_add_double_element(row, cv[v].inplane_axes[m][i]);
            json_array_add_array_element(ax, row);
        }
        json_object_set_array_member(vo, "inplane_axes", ax);
        json_array_add_object_element(va, vo);
    }
    json_object_set_array_member(o, "valleys", va);
    if (json_object_has_member(request, "well_width_nm")) {
        double w = json_object_get_double_member(request, "well_width_nm") * 10.0;   /* A */
        /* infinite square well: E = hbar^2 pi^2 j^2 / (2 m_z W^2), j = 1, 2, 3 */
        size_t ns = 3 * nl, k = 0;
        g_autofree double *e = g_new(double, ns);
        g_autofree size_t *lad = g_new(size_t, ns), *idx = g_new(size_t, ns);
        for (size_t r = 0; r < nl; r++)
            for (int j = 1; j <= 3; j++, k++) {
                e[k] = BM_HBAR2_OVER_ME_EV_A2 * M_PI * M_PI * j * j
                     / (2.0 * cv[first[order[r]]].quantization_mass * w * w);
                lad[k] = r;
                idx[k] = (size_t)j;
            }
        g_autofree size_t *by = g_new(size_t, ns);
        for (size_t i = 0; i < ns; i++)
            by[i] = i;
        for (size_t i = 0; i < ns; i++)
            for (size_t j = i + 1; j < ns; j++)
                if (e[by[j]] < e[by[i]]) {
                    size_t t = by[i];
                    by[i] = by[j];
                    by[j] = t;
                }
        JsonArray *sa = json_array_new();
        for (size_t i = 0; i < ns; i++) {
            size_t q = by[i];
            JsonObject *so = json_object_new();
            bm_json_set_number(so, "energy_ev", e[q]);
            bm_json_set_number(so, "mass_me", cv[first[order[lad[q]]]].dos_mass_2d);
            bm_json_set_number(so, "valley_degeneracy", degen[lad[q]]);
            json_object_set_int_member(so, "ladder", (gint64)lad[q]);
            json_object_set_int_member(so, "index", (gint64)idx[q]);
            json_array_add_object_element(sa, so);
        }
        json_object_set_array_member(o, "subbands", sa);
    }
    json_object_set_string_member(o, "method", "effective-mass approximation for ellipsoids "
                                  "tilted against the layer (Stern & Howard 1967): m_z = 1 / "
                                  "(n W n), in-plane inverse tensor W_ij - W_in W_jn / W_nn; "
                                  "subband energies of an infinite square well, a first "
                                  "estimate (a real well is finite and not square)");
    return o;
}

/* Without a temperature every valley is populated alike, which needs equal
 * energy offsets: said here in the request's terms. */
static gboolean offsets_differ(const BmValleySet *s)
{
    for (size_t i = 1; i < s->n; i++)
        if (s->valleys[i].energy_offset_ev != s->valleys[0].energy_offset_ev)
            return TRUE;
    return FALSE;
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    bm_errbuf err = {0};
    BmValleySet s = {0};
    bm_population pop = {0, BM_FERMI_DIRAC, 0.0, 0.0};
    gboolean has_t = FALSE;
    JsonObject *resp = NULL;
    JsonObject *strain = NULL;
    if (!bm_valley_set_read(request, &s, error) || !read_population(request, &pop, &has_t, error))
        goto done;
    if (json_object_has_member(request, "deformation_potentials_ev")
        && !json_object_has_member(request, "strain")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"deformation_potentials_ev\" needs \"strain\"");
        goto done;
    }
    if (json_object_has_member(request, "strain") && !(strain = apply_strain(request, &s, error)))
        goto done;
    if (!has_t && offsets_differ(&s)) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: the valleys' energy_offset_ev differ: give \"temperature_k\"");
        goto done;
    }
    bm_valley_average avg;
    if (bm_valley_average_compute(s.valleys, s.n, &pop, &avg, &err) != BM_OK) {
        bm_error_from_core(error, &err, "valley-average");
        goto done;
    }
    if (json_object_has_member(request, "well_width_nm")
        && !json_object_has_member(request, "confinement_miller")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"well_width_nm\" needs \"confinement_miller\" (the well's plane)");
        bm_warnings_clear(&avg.warnings);
        goto done;
    }
    JsonObject *conf = NULL;
    if (json_object_has_member(request, "confinement_miller")
        && !(conf = confinement_json(request, &s, error))) {
        bm_warnings_clear(&avg.warnings);
        goto done;
    }
    resp = respond(&s, &pop, has_t, &avg);
    if (strain)
        json_object_set_object_member(resp, "strain", g_steal_pointer(&strain));
    if (conf)
        json_object_set_object_member(resp, "confinement", conf);
    bm_warnings_clear(&avg.warnings);
done:
    if (strain)
        json_object_unref(strain);
    bm_valley_set_clear(&s);
    return resp;
}

const BmOperation bm_op_valley_average = {
    .name = "valley-average",
    .summary = "Valley star from a point group or a material (or an explicit list) and its "
               "conductivity and density-of-states masses",
    .params = params,
    .run = run,
    .response = response,
};
