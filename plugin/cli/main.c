/* main.c: the bandmass command line, one more host of the operation
 * registry. Friendly subcommands are generated from the parameter tables. */
#include <stdio.h>
#include <string.h>
#include <errno.h>
#include <glib.h>

#include "registry.h"
#include "bm-json.h"
#include "render.h"
#include "output.h"
#include "options.h"
#include "csv.h"
#include "batch.h"
#include "bm-parallel.h"
#include "manual.h"
#include "plot-command.h"

#define EXIT_USAGE 2

static int fail(const GError *error)
{
    fprintf(stderr, "bandmass: error: %s\n", error->message);
    gboolean bad_input = error->domain == BM_ERROR
        && (error->code == BM_ERROR_INVALID_INPUT || error->code == BM_ERROR_IO
            || error->code == BM_ERROR_UNKNOWN_OPERATION);
    return bad_input ? EXIT_USAGE : 1;
}

static int usage_error(const char *fmt, ...) G_GNUC_PRINTF(1, 2);
static int usage_error(const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    g_autofree char *msg = g_strdup_vprintf(fmt, ap);
    va_end(ap);
    fprintf(stderr, "bandmass: error: %s (see bandmass --help)\n", msg);
    return EXIT_USAGE;
}

static void print_main_help(void)
{
    printf("bandmass %s: effective masses from band data and measurements\n\n"
           "Usage:\n"
           "  bandmass ops [--json | --markdown] list the operations (--json, --markdown:\n"
           "                                     every key, unit, range and response field)\n"
           "  bandmass ops --man | --bash-completion   the manual page, the completion script\n"
           "  bandmass call OP [--input FILE]    run OP on a JSON request (stdin by default)\n"
           "                [--output FILE] [--compact]\n"
           "  bandmass OP [--KEY VALUE]... [--json | --csv] [--output FILE]\n"
           "                                     run OP with request keys as options\n"
           "  bandmass OP --help                 the keys, units and defaults of OP\n"
           "  bandmass batch MANIFEST [--output FILE] [--threads N] [--quiet]\n"
           "                                     run a manifest of requests (JSON lines);\n"
           "                                     the same --output again resumes it\n"
           "  bandmass batch-table RESULTS... --fields PATH,... [--output FILE]\n"
           "                                     batch results as CSV, one row per item\n"
           "  bandmass OP ... --plot FILE        also draw the result (.svg, .png or .pdf)\n"
           "%s"
           "  bandmass --version\n\n"
           "Option names are request keys with '-' for '_' (--temperature-k 300).\n"
           "Arrays and objects are given as JSON ('[1,0,0]') or as comma lists (100,200);\n"
           "list items may be ranges: 100:500:50 (linear), 1e14:1e20:x10 (geometric).\n"
           "Numbers are plain decimals without units; true/false options may stand alone.\n"
           "Exit status: 0 success, 2 bad input or usage, 1 internal failure.\n",
           PACKAGE_VERSION, bm_cli_plot_usage);
}

/* Writes text to stdout, or to path by the rules of bm_cli_write_output. */
static gboolean emit(const char *path, const char *text, GError **error)
{
    if (!path) {
        if (fputs(text, stdout) >= 0 && fflush(stdout) == 0)
            return TRUE;
        g_set_error(error, BM_ERROR, BM_ERROR_IO, "could not write the output to standard "
                    "output: %s", g_strerror(errno));
        return FALSE;
    }
    return bm_cli_write_output(path, text, strlen(text), error);
}

static GString *read_stdin(GError **error);

/* The request text; one holding a NUL byte is refused here, where its length
 * is still known (past the NUL a C string would silently end). */
static char *read_all(const char *path, GError **error)
{
    char *text = NULL;
    gsize len = 0;
    if (path && !bm_error_read_file(path, "request", &text, &len, error))
        return NULL;
    if (!path) {
        GString *s = read_stdin(error);
        if (!s)
            return NULL;
        len = s->len;
        text = g_string_free(s, FALSE);
    }
    if (memchr(text, '\0', len)) {
        g_autofree char *what = g_strdup_printf("request %s", path ? path : "on standard input");
        if (!bm_json_check_text(text, (gssize)len, what, error))
            g_clear_pointer(&text, g_free);
    }
    return text;
}

static GString *read_stdin(GError **error)
{
    GString *s = g_string_new(NULL);
    char buf[65536];
    size_t got;
    while ((got = fread(buf, 1, sizeof buf, stdin)) > 0) {
        g_string_append_len(s, buf, (gssize)got);
        if (s->len > BM_MAX_DOCUMENT_BYTES) {
            g_string_free(s, TRUE);
            g_set_error(error, BM_ERROR, BM_ERROR_IO, "cannot read the request from standard "
                        "input: larger than the 1 GiB a document may have");
            return NULL;
        }
    }
    return s;
}

static void print_markdown(void);

static int cmd_ops(int argc, char **argv)
{
    gboolean as_json = FALSE, as_markdown = FALSE;
    for (int i = 0; i < argc; i++) {
        if (strcmp(argv[i], "--json") == 0)
            as_json = TRUE;
        else if (strcmp(argv[i], "--markdown") == 0)
            as_markdown = TRUE;
        else if (strcmp(argv[i], "--man") == 0) {
            g_autofree char *page = bm_cli_man_page(PACKAGE_VERSION);
            fputs(page, stdout);
            return 0;
        } else if (strcmp(argv[i], "--bash-completion") == 0) {
            g_autofree char *script = bm_cli_bash_completion(bm_cli_plot_supported);
            fputs(script, stdout);
            return 0;
        } else
            return usage_error("ops: unknown option %s", argv[i]);
    }
    if (as_markdown) {
        print_markdown();
        return 0;
    }
    if (as_json) {
        g_autoptr(JsonNode) all = bm_registry_describe();
        g_autofree char *text = bm_json_to_string(all, TRUE);
        printf("%s\n", text);
        return 0;
    }
    guint n;
    const BmOperation *const *ops = bm_registry_operations(&n);
    for (guint i = 0; i < n; i++)
        printf("  %-20s %s\n", ops[i]->name, ops[i]->summary);
    return 0;
}

static int cmd_call(int argc, char **argv)
{
    const char *op = NULL, *input = NULL, *output = NULL;
    gboolean compact = FALSE;
    for (int i = 0; i < argc; i++) {
        if (strcmp(argv[i], "--input") == 0 && i + 1 < argc)
            input = argv[++i];
        else if (strcmp(argv[i], "--output") == 0 && i + 1 < argc)
            output = argv[++i];
        else if (strcmp(argv[i], "--compact") == 0)
            compact = TRUE;
        else if (argv[i][0] == '-' && argv[i][1] != '\0')
            return usage_error("call: unknown or incomplete option %s", argv[i]);
        else if (!op)
            op = argv[i];
        else
            return usage_error("call: unexpected argument %s", argv[i]);
    }
    if (!op)
        return usage_error("call: name an operation (bandmass ops lists them)");
    g_autoptr(GError) error = NULL;
    g_autofree char *request = read_all(input, &error);
    if (!request)
        return fail(error);
    g_autofree char *response = bm_registry_call_json(op, request, NULL, !compact, &error);
    if (!response)
        return fail(error);
    g_autofree char *line = g_strconcat(response, "\n", NULL);
    if (!emit(output, line, &error))
        return fail(error);
    return 0;
}

/* "[> 0 K]" (or "[K]"), "[required]", "[default X]": the attributes of a key. */
static char *param_attributes(const BmParam *p)
{
    GString *s = g_string_new(NULL);
    g_autofree char *range = bm_param_range_text(p);
    if (range)
        g_string_append_printf(s, " [%s]", range);   /* the range names the unit */
    else if (p->unit)
        g_string_append_printf(s, " [%s]", p->unit);
    if (p->required)
        g_string_append(s, " [required]");
    if (p->default_json)
        g_string_append_printf(s, " [default %s]", p->default_json);
    return g_string_free(s, FALSE);
}

static void print_op_help(const BmOperation *op)
{
    printf("bandmass %s: %s\n\nOptions (request keys):\n", op->name, op->summary);
    for (const BmParam *p = op->params; p && p->name; p++) {
        g_autofree char *dashed = g_strdelimit(g_strdup(p->name), "_", '-');
        g_autofree char *opt = p->kinds == BM_VALUE_BOOLEAN
            ? g_strdup_printf("%s [true|false]", dashed) : g_strdup(dashed);
        g_autofree char *attr = param_attributes(p);
        printf("  --%-28s %s%s\n", opt, p->summary, attr);
        g_autofree const BmChoice **choices = bm_param_choices(p);
        for (guint i = 0; choices && choices[i]; i++)
            printf("  %-30s   %-14s %s\n", "", choices[i]->name, choices[i]->description);
    }
    printf("\nResponse (keys of the JSON object; * only for some requests):\n");
    for (const BmField *f = op->response; f && f->name; f++) {
        g_autofree char *unit = f->unit ? g_strdup_printf(" [%s]", f->unit) : g_strdup("");
        printf("  %-30s %s%s%s\n", f->name, f->optional ? "* " : "", f->meaning, unit);
    }
    for (const BmField *f = bm_common_fields; f->name; f++)
        printf("  %-30s %s\n", f->name, f->meaning);
    printf("\nValues: numbers are plain decimals in the key's unit, without the unit (300, "
           "1.5e16);\nlists take items and ranges: 100,200,300, START:STOP:STEP (100:500:50), "
           "\nSTART:STOP:xFACTOR (1e14:1e20:x10). A [true|false] option alone means true.\n");
    printf("\nOutput: a readable table; --json for the response object "
           "(as 'bandmass call %s'),\n--csv for its table as CSV (one row for a single point), "
           "--output FILE to write it\n(a file atomically, a device or FIFO through).\n", op->name);
    if (bm_cli_plot_supported(op))
        printf("--plot FILE also draws the result (README, Plots); the extension chooses the "
               "format:\n.svg, .png or .pdf.\n");
}

/* Markdown table cells: '|' escaped, no line breaks. */
static void md_cell(GString *out, const char *text)
{
    g_string_append(out, " ");
    for (const char *c = text ? text : ""; *c; c++) {
        if (*c == '|')
            g_string_append(out, "\\|");
        else if (*c == '\n')
            g_string_append_c(out, ' ');
        else
            g_string_append_c(out, *c);
    }
    g_string_append(out, " |");
}

static void md_operation(const BmOperation *op, GString *out)
{
    g_string_append_printf(out, "## %s\n\n%s.\n\nRequest:\n\n", op->name, op->summary);
    if (!op->params || !op->params->name) {
        g_string_append(out, "(no keys: `{}`)\n\n");
    } else {
        g_string_append(out, "| key | kinds | unit | range or choices | default | meaning |\n"
                             "|---|---|---|---|---|---|\n");
        for (const BmParam *p = op->params; p->name; p++) {
            g_autofree char *key = g_strdup_printf("`%s`", p->name);
            g_autofree const char **kinds = bm_value_kind_names(p->kinds);
            g_autofree char *kinds_text = g_strjoinv(", ", (char **)kinds);
            g_autofree char *range = bm_param_range_text(p);
            g_autofree const BmChoice **choices = bm_param_choices(p);
            g_autoptr(GString) allowed = g_string_new(range ? range : "");
            for (guint i = 0; choices && choices[i]; i++)
                g_string_append_printf(allowed, "%s`%s`: %s", i ? "; " : "", choices[i]->name,
                                       choices[i]->description);
            g_autofree char *def = p->required ? g_strdup("required")
                : p->default_json ? g_strdup_printf("`%s`", p->default_json) : g_strdup("");
            g_string_append(out, "|");
            md_cell(out, key);
            md_cell(out, kinds_text);
            md_cell(out, p->unit);
            md_cell(out, allowed->str);
            md_cell(out, def);
            md_cell(out, p->summary);
            g_string_append_c(out, '\n');
        }
        g_string_append_c(out, '\n');
    }
    g_string_append(out, "Response:\n\n| key | unit | always | meaning |\n|---|---|---|---|\n");
    for (int part = 0; part < 2; part++)
    for (const BmField *field = part ? bm_common_fields : op->response; field && field->name;
         field++) {
        g_autofree char *key = g_strdup_printf("`%s`", field->name);
        g_string_append(out, "|");
        md_cell(out, key);
        md_cell(out, field->unit);
        md_cell(out, field->optional ? "no" : "yes");
        md_cell(out, field->meaning);
        g_string_append_c(out, '\n');
    }
    g_string_append_c(out, '\n');
}

static void print_markdown(void)
{
    g_autoptr(GString) out = g_string_new(
        "# Operations\n\n"
        "<!-- Generated by `bandmass ops --markdown` from the registry's tables; the "
        "operations-doc test fails when this file and the tables disagree. Do not edit "
        "by hand. -->\n\n"
        "Every operation takes a JSON object and answers with one. The registry checks each "
        "request key against the table below (kind, range, choices) and fills in defaults; "
        "`bandmass OP --help` shows the same. Response keys marked \"no\" under *always* "
        "appear only for some requests (the meaning says which).\n\n");
    guint n;
    const BmOperation *const *ops = bm_registry_operations(&n);
    for (guint i = 0; i < n; i++)
        md_operation(ops[i], out);
    g_string_truncate(out, out->len - 1);   /* one newline at the end */
    fputs(out->str, stdout);
}

static int cmd_operation(const BmOperation *op, int argc, char **argv)
{
    enum { TABLE, JSON, CSV } view = TABLE;
    const char *output = NULL, *plot = NULL;
    g_autoptr(JsonObject) request = json_object_new();
    g_autoptr(GError) error = NULL;

    for (int i = 0; i < argc; i++) {
        const char *arg = argv[i];
        if (!strcmp(arg, "--help") || !strcmp(arg, "-h")) {
            print_op_help(op);
            return 0;
        }
        if (!strcmp(arg, "--json")) { view = JSON; continue; }
        if (!strcmp(arg, "--csv")) { view = CSV; continue; }
        if (!strcmp(arg, "--output")) {
            if (i + 1 >= argc)
                return usage_error("%s: --output needs a file name", op->name);
            output = argv[++i];
            continue;
        }
        if (!strcmp(arg, "--plot")) {
            if (i + 1 >= argc)
                return usage_error("%s: --plot needs a file name", op->name);
            plot = argv[++i];
            if (!bm_cli_plot_check(op, plot, &error))
                return fail(error);
            continue;
        }
        if (strncmp(arg, "--", 2) != 0)
            return usage_error("%s: unexpected argument \"%s\" (options are --KEY VALUE)",
                               op->name, arg);
        g_autofree char *typed = g_strdup(arg);    /* the option as typed, for messages */
        char *eq = strchr(typed, '=');
        const char *text = NULL;
        if (eq) {
            *eq = '\0';
            text = arg + (eq - typed) + 1;
        }
        g_autofree char *name = g_strdelimit(g_strdup(typed + 2), "-", '_');
        const BmParam *p = NULL;
        for (const BmParam *q = op->params; q && q->name; q++)
            if (!strcmp(q->name, name))
                p = q;
        if (!p)
            return usage_error("%s: unknown option %s (bandmass %s --help lists them)",
                               op->name, typed, op->name);
        if (!text) {
            if (p->kinds == BM_VALUE_BOOLEAN)   /* a flag alone, or with true/false */
                text = i + 1 < argc && strncmp(argv[i + 1], "--", 2) ? argv[++i] : "true";
            else if (i + 1 < argc)
                text = argv[++i];
            else
                return usage_error("%s: option %s needs a value", op->name, typed);
        }
        if (json_object_has_member(request, p->name))
            return usage_error("%s: option %s is given twice", op->name, typed);
        JsonNode *value = bm_cli_option_value(p, typed, text, &error);
        if (!value)
            return fail(error);
        /* the registry's check, here so that the message names the option */
        if (!bm_param_check(p, op->name, value, &error)) {
            json_node_unref(value);
            g_prefix_error(&error, "option %s: ", typed);
            return fail(error);
        }
        json_object_set_member(request, p->name, value);
    }

    g_autoptr(JsonObject) response = bm_registry_invoke(op, request, NULL, &error);
    if (!response)
        return fail(error);
    /* the plot first: a plot that cannot be drawn or written leaves nothing */
    if (plot && !bm_cli_plot_response(op, response, plot, &error))
        return fail(error);

    g_autoptr(GString) out = g_string_new(NULL);
    if (view == JSON) {
        g_autoptr(JsonNode) node = json_node_new(JSON_NODE_OBJECT);
        json_node_set_object(node, response);
        g_autofree char *text = bm_json_to_string(node, TRUE);
        g_string_append_printf(out, "%s\n", text);
    } else if (view == CSV) {
        if (!bm_cli_csv(op, response, out, &error))
            return fail(error);
    } else {
        bm_cli_render(op, response, out);
        JsonArray *warnings = json_object_get_array_member(response, "warnings");
        for (guint i = 0; warnings && i < json_array_get_length(warnings); i++)
            g_string_append_printf(out, "warning: %s\n",
                                   json_array_get_string_element(warnings, i));
    }
    if (!emit(output, out->str, &error))
        return fail(error);
    return 0;
}

/* ---- batch runs (batch.c) ---- */

typedef struct {
    const BmBatch *batch;
    BmBatchWriter *writer;
    gsize first;
} BatchRun;

static void batch_item(gsize i, gpointer data)
{
    BatchRun *run = data;
    if (!bm_batch_writer_ok(run->writer))
        return;   /* the output failed: the rest is not run */
    gboolean failed = FALSE;
    char *line = bm_batch_run(run->batch, run->first + i, &failed);
    bm_batch_writer_put(run->writer, run->first + i, line, failed);
}

static int cmd_batch(int argc, char **argv)
{
    const char *manifest = NULL, *output = NULL;
    gboolean quiet = FALSE;
    guint threads = MIN(g_get_num_processors(), 64);
    for (int i = 0; i < argc; i++) {
        if (!strcmp(argv[i], "--output") && i + 1 < argc) {
            output = argv[++i];
        } else if (!strcmp(argv[i], "--threads") && i + 1 < argc) {
            const char *t = argv[++i];
            char *end = NULL;
            errno = 0;
            guint64 v = g_ascii_strtoull(t, &end, 10);
            if (errno || !g_ascii_isdigit(*t) || *end || v < 1 || v > 64)
                return usage_error("batch: --threads \"%s\": a whole number from 1 to 64", t);
            threads = (guint)v;
        } else if (!strcmp(argv[i], "--quiet")) {
            quiet = TRUE;
        } else if (argv[i][0] == '-' && argv[i][1] != '\0') {
            return usage_error("batch: unknown or incomplete option %s", argv[i]);
        } else if (!manifest) {
            manifest = argv[i];
        } else {
            return usage_error("batch: unexpected argument %s", argv[i]);
        }
    }
    if (!manifest)
        return usage_error("batch: name a manifest (JSON lines: {\"op\": ..., \"request\": "
                           "{...}, \"id\": ...})");
    g_autoptr(GError) error = NULL;
    g_autoptr(BmBatch) batch = bm_batch_load(manifest, &error);
    if (!batch)
        return fail(error);
    g_autofree char *header = bm_batch_header(batch, "threads", threads);
    BmBatchWriter *writer = bm_batch_writer_open(batch, output, header, !quiet, &error);
    if (!writer)
        return fail(error);
    BatchRun run = { batch, writer, bm_batch_writer_done(writer) };
    bm_parallel_for(bm_batch_length(batch) - run.first, threads, batch_item, &run);
    if (!bm_batch_writer_close(writer, &error)) {
        fprintf(stderr, "bandmass: error: %s\n", error->message);
        return 1;
    }
    return 0;
}

static int cmd_batch_table(int argc, char **argv)
{
    const char *fields = NULL, *output = NULL;
    g_autoptr(GPtrArray) results = g_ptr_array_new();
    for (int i = 0; i < argc; i++) {
        if (!strcmp(argv[i], "--fields") && i + 1 < argc)
            fields = argv[++i];
        else if (!strcmp(argv[i], "--output") && i + 1 < argc)
            output = argv[++i];
        else if (argv[i][0] == '-' && argv[i][1] != '\0')
            return usage_error("batch-table: unknown or incomplete option %s", argv[i]);
        else
            g_ptr_array_add(results, argv[i]);
    }
    if (results->len == 0)
        return usage_error("batch-table: name one or more outputs of bandmass batch");
    if (!fields)
        return usage_error("batch-table: --fields PATH,... names the response fields "
                           "(e.g. --fields fermi_level_ev,points[0].electrons_cm3)");
    g_ptr_array_add(results, NULL);
    g_autoptr(GError) error = NULL;
    g_autoptr(GString) out = g_string_new(NULL);
    if (!bm_batch_table((const char *const *)results->pdata, fields, out, &error))
        return fail(error);
    if (!emit(output, out->str, &error))
        return fail(error);
    return 0;
}

static int dispatch(int argc, char **argv)
{
    if (argc < 2) {
        print_main_help();
        return EXIT_USAGE;
    }
    const char *cmd = argv[1];
    if (!strcmp(cmd, "--help") || !strcmp(cmd, "-h") || !strcmp(cmd, "help")) {
        if (argc > 2 && bm_registry_lookup(argv[2])) {
            print_op_help(bm_registry_lookup(argv[2]));
            return 0;
        }
        print_main_help();
        return 0;
    }
    if (!strcmp(cmd, "--version")) {
        printf("bandmass %s\n", PACKAGE_VERSION);
        return 0;
    }
    if (!strcmp(cmd, "ops"))
        return cmd_ops(argc - 2, argv + 2);
    if (!strcmp(cmd, "call"))
        return cmd_call(argc - 2, argv + 2);
    if (!strcmp(cmd, "batch"))
        return cmd_batch(argc - 2, argv + 2);
    if (!strcmp(cmd, "batch-table"))
        return cmd_batch_table(argc - 2, argv + 2);
    if (!strcmp(cmd, "plot"))
        return bm_cli_plot_command(argc - 2, argv + 2);
    const BmOperation *op = bm_registry_lookup(cmd);
    if (!op)
        return usage_error("unknown command or operation \"%s\"", cmd);
    return cmd_operation(op, argc - 2, argv + 2);
}

int main(int argc, char **argv)
{
    bm_registry_init();
    int status = dispatch(argc, argv);
    /* every write to standard output is checked here, once: a full disk or a
     * closed pipe is a failure, never a silent exit 0 */
    if ((fflush(stdout) != 0 || ferror(stdout)) && status == 0) {
        fprintf(stderr, "bandmass: error: could not write the output to standard output: %s\n",
                g_strerror(errno));
        return 1;
    }
    return status;
}
