/* csv.c: the CSV view of a response. Each operation names where its rows are
 * (one table below); a row's members become columns (arrays numbered, unit
 * kept at the end of the name, per-species values named by species), and
 * the response's other scalar keys repeat in every row. */
#include <math.h>
#include <string.h>

#include "csv.h"
#include "bm-json.h"

/* ---- cells and column names ---- */

/* A number in the fewest digits that read back to the same double. */
static char *number_text(double v)
{
    char buf[G_ASCII_DTOSTR_BUF_SIZE];
    for (int digits = 15; digits <= 17; digits++) {
        g_ascii_formatd(buf, sizeof buf, digits == 15 ? "%.15g" : digits == 16 ? "%.16g"
                                                                                : "%.17g", v);
        if (g_ascii_strtod(buf, NULL) == v)
            break;
    }
    return g_strdup(buf);
}

char *bm_cli_csv_quoted(const char *s)
{
    if (!strpbrk(s, ",\"\n\r"))
        return g_strdup(s);
    g_auto(GStrv) parts = g_strsplit(s, "\"", -1);
    g_autofree char *doubled = g_strjoinv("\"\"", parts);
    return g_strdup_printf("\"%s\"", doubled);
}

char *bm_cli_csv_cell(JsonNode *n)
{
    if (!n || JSON_NODE_HOLDS_NULL(n))
        return g_strdup("");
    if (!JSON_NODE_HOLDS_VALUE(n))
        return NULL;
    GType t = json_node_get_value_type(n);
    if (t == G_TYPE_STRING)
        return bm_cli_csv_quoted(json_node_get_string(n));
    if (t == G_TYPE_BOOLEAN)
        return g_strdup(json_node_get_boolean(n) ? "true" : "false");
    if (t == G_TYPE_INT64)
        return g_strdup_printf("%" G_GINT64_FORMAT, json_node_get_int(n));
    return number_text(json_node_get_double(n));
}

static gboolean is_scalar(JsonNode *n)
{
    return JSON_NODE_HOLDS_NULL(n) || JSON_NODE_HOLDS_VALUE(n);
}

/* Unit endings of key names, longest first. */
static const char *const unit_suffixes[] = {
    "_inv_angstrom", "_cm2_per_ev", "_cm2_per_vs", "_s_per_cm", "_cm_per_s", "_per_me",
    "_ohm_cm", "_ev_cm", "_me", "_ev", "_cm3", "_cm2", "_ghz", "_nm", "_k", "_s", "_t", NULL
};

/* key with label inserted before its unit ending: ("principal_masses_me", "1")
 * gives principal_masses_1_me; a "_per_species" before the unit goes. */
static char *column_name(const char *key, const char *label)
{
    const char *unit = "";
    size_t len = strlen(key);
    for (const char *const *u = unit_suffixes; *u; u++) {
        size_t ul = strlen(*u);
        if (len > ul && !strcmp(key + len - ul, *u)) {
            unit = *u;
            break;
        }
    }
    g_autofree char *stem = g_strndup(key, len - strlen(unit));
    if (g_str_has_suffix(stem, "_per_species"))
        stem[strlen(stem) - strlen("_per_species")] = '\0';
    return g_strdup_printf("%s_%s%s", stem, label, unit);
}

/* ---- rows ---- */

/* One row: its column names in order and their cells. */
typedef struct {
    GPtrArray *names;
    GHashTable *cells;   /* name -> cell text */
} Row;

static Row *row_new(void)
{
    Row *r = g_new0(Row, 1);
    r->names = g_ptr_array_new_with_free_func(g_free);
    r->cells = g_hash_table_new_full(g_str_hash, g_str_equal, NULL, g_free);
    return r;
}

static void row_free(gpointer p)
{
    Row *r = p;
    g_hash_table_unref(r->cells);
    g_ptr_array_unref(r->names);
    g_free(r);
}

/* Adds a column (the first value of a name wins). */
static void row_put(Row *r, const char *name, char *text)
{
    if (!text)
        return;
    if (g_hash_table_contains(r->cells, name)) {
        g_free(text);
        return;
    }
    char *n = g_strdup(name);
    g_ptr_array_add(r->names, n);
    g_hash_table_insert(r->cells, n, text);
}

/* Appends the columns of src to dst, in their order. */
static void row_append(Row *dst, const Row *src)
{
    for (guint i = 0; i < src->names->len; i++) {
        const char *n = src->names->pdata[i];
        row_put(dst, n, g_strdup(g_hash_table_lookup(src->cells, n)));
    }
}

/* Labels for the elements of an array key: species names for per-species
 * values, x/y/z for Cartesian k; NULL: numbered from 1. */
typedef struct {
    char **donors, **acceptors;   /* labels of the response's dopant lists */
} Labels;

static const char *element_label(const Labels *lab, const char *key, guint i, char buf[16])
{
    static const char *const xyz[3] = { "x", "y", "z" };
    char **list = !strcmp(key, "ionized_donors_per_species_cm3") ? lab->donors
                : !strcmp(key, "ionized_acceptors_per_species_cm3") ? lab->acceptors : NULL;
    if (list && i < g_strv_length(list))
        return list[i];
    if (!strcmp(key, "k_inv_angstrom") && i < 3)
        return xyz[i];
    g_snprintf(buf, 16, "%u", i + 1);
    return buf;
}

/* The labels of a dopant list: the species, or the ionisation energy of a
 * level given by energy ("0.045eV"); a repeated label gets "_2", "_3". */
static char **dopant_labels(JsonObject *response, const char *key)
{
    JsonNode *n = json_object_get_member(response, key);
    if (!n || !JSON_NODE_HOLDS_ARRAY(n))
        return NULL;
    JsonArray *a = json_node_get_array(n);
    guint len = json_array_get_length(a);
    char **labels = g_new0(char *, len + 1);
    for (guint i = 0; i < len; i++) {
        JsonNode *e = json_array_get_element(a, i);
        JsonObject *o = JSON_NODE_HOLDS_OBJECT(e) ? json_node_get_object(e) : NULL;
        JsonNode *sp = o ? json_object_get_member(o, "species") : NULL;
        JsonNode *ev = o ? json_object_get_member(o, "ionization_ev") : NULL;
        char *base;
        if (sp && JSON_NODE_HOLDS_VALUE(sp) && json_node_get_value_type(sp) == G_TYPE_STRING)
            base = g_strdup(json_node_get_string(sp));
        else if (ev && JSON_NODE_HOLDS_VALUE(ev)) {
            g_autofree char *num = number_text(json_node_get_double(ev));
            base = g_strdup_printf("%seV", num);
        } else
            base = g_strdup_printf("%u", i + 1);
        guint seen = 0;
        for (guint j = 0; j < i; j++)
            if (g_str_has_prefix(labels[j], base)
                && (labels[j][strlen(base)] == '\0' || labels[j][strlen(base)] == '_'))
                seen++;
        labels[i] = seen ? g_strdup_printf("%s_%u", base, seen + 1) : g_strdup(base);
        g_free(base);
    }
    return labels;
}

/* The cells of one member: a scalar, an array (numbered or labelled
 * columns; warnings joined into one cell), at the top of a row an array of
 * arrays (key_i_j) and an object of scalars (key_member). Deeper structure
 * is for --json. */
static void flatten(Row *r, const Labels *lab, const char *key, JsonNode *n, gboolean top)
{
    if (is_scalar(n)) {
        row_put(r, key, bm_cli_csv_cell(n));
        return;
    }
    if (JSON_NODE_HOLDS_ARRAY(n)) {
        JsonArray *a = json_node_get_array(n);
        guint len = json_array_get_length(a);
        if (!strcmp(key, "warnings") || !strcmp(key, "warning_codes")) {
            g_autoptr(GString) s = g_string_new(NULL);
            for (guint i = 0; i < len; i++) {
                const char *t = json_array_get_string_element(a, i);
                g_string_append_printf(s, "%s%s", i ? "; " : "", t ? t : "");
            }
            row_put(r, key, bm_cli_csv_quoted(s->str));
            return;
        }
        for (guint i = 0; i < len; i++) {
            JsonNode *e = json_array_get_element(a, i);
            char buf[16];
            g_autofree char *name = column_name(key, element_label(lab, key, i, buf));
            if (is_scalar(e)) {
                row_put(r, name, bm_cli_csv_cell(e));
            } else if (top && JSON_NODE_HOLDS_ARRAY(e)) {
                JsonArray *inner = json_node_get_array(e);
                for (guint j = 0; j < json_array_get_length(inner); j++) {
                    JsonNode *f = json_array_get_element(inner, j);
                    if (!is_scalar(f))
                        continue;
                    g_autofree char *label = g_strdup_printf("%u_%u", i + 1, j + 1);
                    g_autofree char *name2 = column_name(key, label);
                    row_put(r, name2, bm_cli_csv_cell(f));
                }
            }
        }
        return;
    }
    if (top && JSON_NODE_HOLDS_OBJECT(n)) {
        JsonObject *o = json_node_get_object(n);
        g_autoptr(GList) members = json_object_get_members(o);
        for (GList *l = members; l; l = l->next) {
            JsonNode *m = json_object_get_member(o, l->data);
            if (!is_scalar(m))
                continue;
            g_autofree char *name = g_strdup_printf("%s_%s", key, (const char *)l->data);
            row_put(r, name, bm_cli_csv_cell(m));
        }
    }
}

static void flatten_object(Row *r, const Labels *lab, JsonObject *o, gboolean top)
{
    g_autoptr(GList) members = json_object_get_members(o);
    for (GList *l = members; l; l = l->next)
        flatten(r, lab, l->data, json_object_get_member(o, l->data), top);
}

/* The response's keys that are not the rows, for every row: scalars, arrays
 * of scalars and objects of scalars. */
static void constants_of(Row *r, const Labels *lab, JsonObject *response, const char *rows_key,
                         const char *rows_key2)
{
    g_autoptr(GList) members = json_object_get_members(response);
    for (GList *l = members; l; l = l->next) {
        const char *key = l->data;
        if ((rows_key && !strcmp(key, rows_key)) || !strcmp(key, "beyond_data")
            || (rows_key2 && !strcmp(key, rows_key2))
            || (rows_key && !strcmp(rows_key, "luttinger") && !strcmp(key, "band_fractions")))
            continue;
        JsonNode *n = json_object_get_member(response, key);
        if (JSON_NODE_HOLDS_ARRAY(n)) {
            JsonArray *a = json_node_get_array(n);
            gboolean flat = TRUE;
            for (guint i = 0; flat && i < json_array_get_length(a); i++)
                flat = is_scalar(json_array_get_element(a, i));
            if (!flat)
                continue;
        }
        flatten(r, lab, key, n, TRUE);
    }
}

/* ---- where each operation's rows are ---- */

typedef enum {
    ROWS_SINGLE,     /* the response is one row */
    ROWS_MEMBER,     /* an array of objects under key (absent: one row) */
    ROWS_OBJECTS,    /* an object of objects under key: one row each, "name" first */
    ROWS_PARALLEL,   /* arrays (or single numbers) under key and key2, element by element */
    ROWS_HOLES,      /* hole-mass: one row per hole band */
    ROWS_BANDS       /* mass-tensor of every band: each band's extrema */
} RowsKind;

static const struct {
    const char *op;
    RowsKind kind;
    const char *key, *key2;
} tables[] = {
    { "band-gap", ROWS_MEMBER, "points", NULL },
    { "thermal-mass", ROWS_MEMBER, "points", NULL },
    { "kane-fit", ROWS_MEMBER, "points", NULL },
    { "carrier-statistics", ROWS_MEMBER, "points", NULL },
    { "materials", ROWS_MEMBER, "points", NULL },
    { "mass-tensor", ROWS_MEMBER, "extrema", NULL },
    { "valley-average", ROWS_MEMBER, "valleys", NULL },
    { "sheet-density", ROWS_MEMBER, "subbands", NULL },
    { "constants", ROWS_OBJECTS, "constants", NULL },
    { "fermi-integral", ROWS_PARALLEL, "eta", "values" },
    { "hole-mass", ROWS_HOLES, NULL, NULL },
};

/* The rows of the objects in the array under key, then (mass-tensor) a
 * table's estimates beyond its data, each marked by a beyond_data column. */
static void member_rows(JsonObject *response, const char *key, GPtrArray *rows,
                        const Labels *lab)
{
    JsonNode *member = json_object_get_member(response, key);
    JsonArray *a = member && JSON_NODE_HOLDS_ARRAY(member) ? json_node_get_array(member) : NULL;
    JsonNode *beyond = json_object_get_member(response, "beyond_data");
    JsonArray *b = beyond && JSON_NODE_HOLDS_ARRAY(beyond) ? json_node_get_array(beyond) : NULL;
    for (int part = 0; part < 2; part++) {
        JsonArray *list = part ? b : a;
        for (guint i = 0; list && i < json_array_get_length(list); i++) {
            JsonNode *e = json_array_get_element(list, i);
            if (!JSON_NODE_HOLDS_OBJECT(e))
                continue;
            Row *r = row_new();
            if (!strcmp(key, "extrema"))
                row_put(r, "beyond_data", g_strdup(part ? "true" : "false"));
            flatten_object(r, lab, json_node_get_object(e), TRUE);
            g_ptr_array_add(rows, r);
        }
    }
}

/* hole-mass: heavy, light and split-off bands with their parabolic mass,
 * population and Luttinger directional and DOS masses. */
static void hole_rows(JsonObject *response, GPtrArray *rows, const Labels *lab)
{
    static const struct { const char *band, *fraction, *input, *luttinger, *dos; } bands[] = {
        { "heavy", "heavy", "heavy_hole_mass_me", "heavy_hole_mass_me", "heavy_hole_dos_mass_me" },
        { "light", "light", "light_hole_mass_me", "light_hole_mass_me", "light_hole_dos_mass_me" },
        { "split-off", "split_off", "split_off_mass_me", NULL, NULL },
    };
    JsonObject *fr = json_object_has_member(response, "band_fractions")
        ? json_object_get_object_member(response, "band_fractions") : NULL;
    JsonObject *in = json_object_has_member(response, "inputs")
        ? json_object_get_object_member(response, "inputs") : NULL;
    JsonObject *lu = json_object_has_member(response, "luttinger")
        ? json_object_get_object_member(response, "luttinger") : NULL;
    for (gsize b = 0; b < G_N_ELEMENTS(bands); b++) {
        Row *r = row_new();
        row_put(r, "band", g_strdup(bands[b].band));
        JsonObject *iv = in && json_object_has_member(in, bands[b].input)
            ? json_object_get_object_member(in, bands[b].input) : NULL;
        row_put(r, "parabolic_mass_me", bm_cli_csv_cell(iv ? json_object_get_member(iv, "value") : NULL));
        row_put(r, "population_fraction",
                bm_cli_csv_cell(fr ? json_object_get_member(fr, bands[b].fraction) : NULL));
        JsonObject *dir = lu && bands[b].luttinger
            && json_object_has_member(lu, bands[b].luttinger)
            ? json_object_get_object_member(lu, bands[b].luttinger) : NULL;
        const char *dirs[3] = { "100", "110", "111" };
        for (int d = 0; d < 3; d++) {
            g_autofree char *name = g_strdup_printf("luttinger_mass_%s_me", dirs[d]);
            row_put(r, name, bm_cli_csv_cell(dir ? json_object_get_member(dir, dirs[d]) : NULL));
        }
        row_put(r, "luttinger_dos_mass_me",
                bm_cli_csv_cell(lu && bands[b].dos ? json_object_get_member(lu, bands[b].dos) : NULL));
        g_ptr_array_add(rows, r);
    }
    (void)lab;
}

gboolean bm_cli_csv(const BmOperation *op, JsonObject *response, GString *out, GError **error)
{
    RowsKind kind = ROWS_SINGLE;
    const char *key = NULL, *key2 = NULL;
    for (gsize i = 0; i < G_N_ELEMENTS(tables); i++)
        if (!strcmp(tables[i].op, op->name)) {
            kind = tables[i].kind;
            key = tables[i].key;
            key2 = tables[i].key2;
        }
    g_auto(GStrv) donors = dopant_labels(response, "donors");
    g_auto(GStrv) acceptors = dopant_labels(response, "acceptors");
    Labels lab = { donors, acceptors };
    g_autoptr(GPtrArray) rows = g_ptr_array_new_with_free_func(row_free);
    Row *constants = row_new();
    const char *rows_key = key;

    JsonNode *member = key ? json_object_get_member(response, key) : NULL;
    if (!strcmp(op->name, "mass-tensor") && json_object_has_member(response, "bands")) {
        kind = ROWS_BANDS;
        member = json_object_get_member(response, "bands");
        rows_key = "bands";
    } else if (kind == ROWS_MEMBER && !member)
        kind = ROWS_SINGLE;   /* one point: the response is the row */
    switch (kind) {
    case ROWS_SINGLE: {
        Row *r = row_new();
        flatten_object(r, &lab, response, TRUE);
        g_ptr_array_add(rows, r);
        break;
    }
    case ROWS_MEMBER:
        member_rows(response, key, rows, &lab);
        break;
    case ROWS_BANDS: {
        /* mass-tensor with "band": "all": each band's rows, its index and name first */
        JsonArray *bands = json_node_get_array(member);
        for (guint i = 0; i < json_array_get_length(bands); i++) {
            JsonObject *one = json_array_get_object_element(bands, i);
            JsonObject *band = json_object_get_object_member(one, "band");
            guint before = rows->len;
            member_rows(one, "extrema", rows, &lab);
            for (guint q = before; q < rows->len; q++) {
                Row *r = rows->pdata[q], *head = row_new();
                row_put(head, "band_index", bm_cli_csv_cell(json_object_get_member(band, "index")));
                row_put(head, "band_name", bm_cli_csv_cell(json_object_get_member(band, "name")));
                row_append(head, r);
                rows->pdata[q] = head;
                row_free(r);
            }
        }
        break;
    }
    case ROWS_OBJECTS: {
        JsonObject *all = member && JSON_NODE_HOLDS_OBJECT(member) ? json_node_get_object(member)
                                                                   : NULL;
        g_autoptr(GList) names = all ? json_object_get_members(all) : NULL;
        for (GList *l = names; l; l = l->next) {
            JsonNode *e = json_object_get_member(all, l->data);
            if (!JSON_NODE_HOLDS_OBJECT(e))
                continue;
            Row *r = row_new();
            row_put(r, "name", bm_cli_csv_quoted(l->data));
            flatten_object(r, &lab, json_node_get_object(e), TRUE);
            g_ptr_array_add(rows, r);
        }
        break;
    }
    case ROWS_PARALLEL: {
        JsonNode *n1 = member, *n2 = json_object_get_member(response, key2);
        guint len = n1 && JSON_NODE_HOLDS_ARRAY(n1) ? json_array_get_length(json_node_get_array(n1))
                  : n1 ? 1 : 0;
        for (guint i = 0; i < len; i++) {
            Row *r = row_new();
            JsonNode *pair[2] = { n1, n2 };
            const char *names[2] = { key, key2 };
            for (int c = 0; c < 2; c++) {
                JsonNode *v = pair[c];
                if (v && JSON_NODE_HOLDS_ARRAY(v))
                    v = i < json_array_get_length(json_node_get_array(v))
                        ? json_array_get_element(json_node_get_array(v), i) : NULL;
                row_put(r, names[c], bm_cli_csv_cell(v));
            }
            g_ptr_array_add(rows, r);
        }
        break;
    }
    case ROWS_HOLES:
        hole_rows(response, rows, &lab);
        rows_key = "luttinger";   /* with band_fractions: in the rows */
        break;
    }
    if (kind != ROWS_SINGLE)
        constants_of(constants, &lab, response, rows_key, kind == ROWS_PARALLEL ? key2 : NULL);
    /* the header: every row's columns in the order first seen, then the constants */
    g_autoptr(GPtrArray) header = g_ptr_array_new();
    g_autoptr(GHashTable) seen = g_hash_table_new(g_str_hash, g_str_equal);
    for (guint r = 0; r < rows->len; r++) {
        Row *row = rows->pdata[r];
        for (guint c = 0; c < row->names->len; c++)
            if (g_hash_table_add(seen, row->names->pdata[c]))
                g_ptr_array_add(header, row->names->pdata[c]);
    }
    for (guint c = 0; c < constants->names->len; c++)
        if (g_hash_table_add(seen, constants->names->pdata[c]))
            g_ptr_array_add(header, constants->names->pdata[c]);
    if (header->len == 0) {
        row_free(constants);
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "--csv: the %s response has nothing to tabulate (use --json)", op->name);
        return FALSE;
    }
    for (guint c = 0; c < header->len; c++) {
        g_autofree char *h = bm_cli_csv_quoted(header->pdata[c]);
        g_string_append_printf(out, "%s%s", c ? "," : "", h);
    }
    g_string_append_c(out, '\n');
    for (guint r = 0; r < rows->len; r++) {
        Row *row = rows->pdata[r];
        for (guint c = 0; c < header->len; c++) {
            const char *t = g_hash_table_lookup(row->cells, header->pdata[c]);
            if (!t)
                t = g_hash_table_lookup(constants->cells, header->pdata[c]);
            g_string_append_printf(out, "%s%s", c ? "," : "", t ? t : "");
        }
        g_string_append_c(out, '\n');
    }
    row_free(constants);
    return TRUE;
}
