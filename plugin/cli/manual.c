/* manual.c: bandmass.1 and the bash completion, from the registry's tables. */
#include "manual.h"

#include <string.h>

#include "registry.h"

/* The commands that are not operations: synopsis and meaning. */
static const struct {
    const char *synopsis, *meaning;
} commands[] = {
    {"ops [--json | --markdown | --man | --bash-completion]",
     "List the operations. --json and --markdown give every key, unit, range and response "
     "field; --man writes this page, --bash-completion the completion script."},
    {"call OP [--input FILE] [--output FILE] [--compact]",
     "Run OP on a JSON request read from FILE (standard input by default) and write the JSON "
     "response."},
    {"OP [--KEY VALUE]... [--json | --csv] [--output FILE]",
     "Run OP with its request keys as options and print a readable table; --json prints the "
     "response object, --csv its table as CSV."},
    {"batch MANIFEST [--output FILE] [--threads N] [--quiet]",
     "Run a manifest of requests (JSON lines: {\"op\": OP, \"request\": {...}, \"id\": ID}, "
     "or a template line with \"each\": {KEY: [values]}) on N threads, writing one JSON line "
     "per item in manifest order after a provenance header; the same --output again resumes "
     "the run. Progress and a summary go to standard error."},
    {"batch-table RESULTS... --fields PATH,... [--output FILE]",
     "The items of batch outputs as CSV: id, status and each response field, a path of keys "
     "joined by '.' with list indexes [N]."},
    {"OP --help", "The keys, units, ranges and defaults of OP, and its response keys."},
    {"OP [--KEY VALUE]... --plot FILE",
     "Also draw the result of an operation that has a plot (carrier-statistics sweeps, "
     "thermal-mass, mass-tensor and kane-fit with cuts, cyclotron-orbit and "
     "cyclotron-ellipsoid field sweeps); the extension of FILE chooses SVG, PNG or PDF. "
     "Built where cairo is found."},
    {"plot RESULTS.jsonl --x FIELD --y FIELD [--y FIELD]... [--log-x] [--log-y] --output FILE",
     "Draw batch results (JSON lines of items with an id and a response): one curve per --y "
     "against --x, each FIELD a dotted path into the responses."},
    {"plot RESULTS.jsonl --item ID --output FILE",
     "Draw one item's own plot from its stored response, as --plot draws it."},
    {"--version", "The version."},
};

/* Request keys whose value is a file name (or may be one). */
static gboolean takes_file(const BmParam *p)
{
    return (p->kinds & BM_VALUE_STRING) &&
           (!strcmp(p->name, "grid") || !strcmp(p->name, "table") ||
            !strcmp(p->name, "material") || g_str_has_suffix(p->name, "_file"));
}

/* Text in troff: backslashes escaped, no line may start a request. */
static void roff(GString *out, const char *text)
{
    gboolean line_start = out->len == 0 || out->str[out->len - 1] == '\n';
    for (const char *c = text ? text : ""; *c; c++) {
        if (line_start && (*c == '.' || *c == '\''))
            g_string_append(out, "\\&");
        if (*c == '\\')
            g_string_append(out, "\\e");
        else if (*c == '-')
            g_string_append(out, "\\-");
        else
            g_string_append_c(out, *c);
        line_start = *c == '\n';
    }
}

static void roff_line(GString *out, const char *macro, const char *text)
{
    if (macro)
        g_string_append_printf(out, "%s ", macro);
    roff(out, text);
    g_string_append_c(out, '\n');
}

static void man_operation(GString *out, const BmOperation *op)
{
    roff_line(out, ".SS", op->name);
    roff(out, op->summary);
    g_string_append(out, ".\n");
    for (const BmParam *p = op->params; p && p->name; p++) {
        g_autofree char *dashed = g_strdelimit(g_strdup(p->name), "_", '-');
        g_autofree char *opt = g_strdup_printf("--%s%s", dashed,
                                               p->kinds == BM_VALUE_BOOLEAN ? " [true|false]"
                                               : takes_file(p) ? " FILE" : " VALUE");
        g_string_append(out, ".TP\n.B ");
        roff(out, opt);
        g_string_append_c(out, '\n');
        g_autoptr(GString) text = g_string_new(p->summary);
        g_autofree char *range = bm_param_range_text(p);
        if (range)
            g_string_append_printf(text, " [%s]", range);
        else if (p->unit)
            g_string_append_printf(text, " [%s]", p->unit);
        if (p->required)
            g_string_append(text, " [required]");
        if (p->default_json)
            g_string_append_printf(text, " [default %s]", p->default_json);
        g_autofree const BmChoice **choices = bm_param_choices(p);
        for (guint i = 0; choices && choices[i]; i++)
            g_string_append_printf(text, "%s%s: %s", i ? "; " : " Choices: ", choices[i]->name,
                                   choices[i]->description);
        roff_line(out, NULL, text->str);
    }
    g_string_append(out, ".PP\nResponse keys:\n");
    for (const BmField *f = op->response; f && f->name; f++) {
        g_autofree char *text = g_strdup_printf("%s%s%s%s%s", f->optional ? "(some requests) " : "",
                                                f->meaning, f->unit ? " [" : "",
                                                f->unit ? f->unit : "", f->unit ? "]" : "");
        g_string_append(out, ".TP\n.I ");
        roff(out, f->name);
        g_string_append_c(out, '\n');
        roff_line(out, NULL, text);
    }
}

char *bm_cli_man_page(const char *version)
{
    GString *out = g_string_new(NULL);
    g_string_append_printf(out, ".TH BANDMASS 1 \"\" \"bandmass %s\" \"User Commands\"\n", version);
    g_string_append(out, ".\\\" generated by 'bandmass ops --man' from the registry's tables\n");
    g_string_append(out, ".SH NAME\nbandmass \\- effective masses from band data and "
                         "measurements\n.SH SYNOPSIS\n");
    for (gsize i = 0; i < G_N_ELEMENTS(commands); i++) {
        g_string_append(out, ".B bandmass\n");
        roff_line(out, NULL, commands[i].synopsis);
        g_string_append(out, ".br\n");
    }
    g_string_append(out, ".SH DESCRIPTION\n");
    roff_line(out, NULL,
              "bandmass computes effective-mass tensors at band extrema of first-principles "
              "band grids and k-tables, multi-valley conductivity and density-of-states "
              "masses, temperature-dependent full-band masses, carrier statistics (Nc, Nv, ni, "
              "Fermi level, ionised dopants) and cyclotron masses, and fits masses to "
              "measurements. Every operation takes a JSON request and answers with a JSON "
              "response; the same operations are reachable from Python, GJS, Octave and C "
              "through the library.");
    g_string_append(out, ".SH COMMANDS\n");
    for (gsize i = 0; i < G_N_ELEMENTS(commands); i++) {
        g_string_append(out, ".TP\n.B ");
        roff(out, commands[i].synopsis);
        g_string_append_c(out, '\n');
        roff_line(out, NULL, commands[i].meaning);
    }
    g_string_append(out, ".SH OPTION VALUES\n");
    roff_line(out, NULL,
              "Option names are request keys with '-' for '_' (--temperature-k 300). Numbers "
              "are plain decimals in the key's unit, without the unit (300, 1.5e16). Arrays "
              "and objects are given as JSON ('[1,0,0]') or as comma lists (100,200); list "
              "items may be ranges: START:STOP:STEP (100:500:50) or START:STOP:xFACTOR "
              "(1e14:1e20:x10). A [true|false] option alone means true.");
    g_string_append(out, ".SH OPERATIONS\n");
    guint n;
    const BmOperation *const *ops = bm_registry_operations(&n);
    for (guint i = 0; i < n; i++)
        man_operation(out, ops[i]);
    g_string_append(out, ".SH WARNINGS\n");
    roff_line(out, NULL,
              "Results that may be unconverged, ill-posed or non-physical carry warnings "
              "(warnings and warning_codes in the response, printed under the table). A mass "
              "is either within its stated error or marked not converged.");
    g_string_append(out, ".SH EXIT STATUS\n");
    roff_line(out, NULL, "0 success, 2 bad input or usage (the message names what was wrong and "
                         "where), 1 internal failure.");
    g_string_append(out, ".SH SAFETY\n");
    roff_line(out, NULL,
              "Carrier densities, masses and mobilities from bandmass are model results. Where "
              "a design decision bears on safety (power devices, sensors, anything rated), "
              "check them against measurement and defer to the applicable codes and licensed "
              "practice.");
    g_string_append(out, ".SH SEE ALSO\n");
    roff_line(out, NULL, "The README and docs/operations.md of the source tree.");
    return g_string_free(out, FALSE);
}

/* A shell word list: names are plain [a-z0-9_-], safe inside single quotes. */
static void words(GString *out, const char *const *names, gsize n)
{
    for (gsize i = 0; i < n; i++)
        g_string_append_printf(out, "%s%s", i ? " " : "", names[i]);
}

char *bm_cli_bash_completion(gboolean (*has_plot)(const BmOperation *op))
{
    guint n;
    const BmOperation *const *ops = bm_registry_operations(&n);
    GString *out = g_string_new("# bash completion for bandmass, generated by "
                                "'bandmass ops --bash-completion'\n"
                                "_bandmass()\n{\n"
                                "    local cur prev op\n"
                                "    cur=\"${COMP_WORDS[COMP_CWORD]}\"\n"
                                "    prev=\"${COMP_WORDS[COMP_CWORD-1]}\"\n"
                                "    op=\"${COMP_WORDS[1]}\"\n"
                                "    if [ \"$COMP_CWORD\" -eq 1 ]; then\n"
                                "        COMPREPLY=($(compgen -W 'ops call plot batch batch-table "
                                "--help --version ");
    g_autofree const char **names = g_new0(const char *, n + 1);
    for (guint i = 0; i < n; i++)
        names[i] = ops[i]->name;
    words(out, names, n);
    g_string_append(out, "' -- \"$cur\"))\n        return\n    fi\n"
                         "    case \"$prev\" in\n"
                         "    --input|--output|--plot) COMPREPLY=($(compgen -f -- \"$cur\")); "
                         "return ;;\n"
                         "    esac\n"
                         "    case \"$op\" in\n"
                         "    ops) COMPREPLY=($(compgen -W '--json --markdown --man "
                         "--bash-completion' -- \"$cur\")); return ;;\n"
                         "    batch) COMPREPLY=($(compgen -W '--output --threads --quiet' -- "
                         "\"$cur\") $(compgen -f -- \"$cur\")); return ;;\n"
                         "    batch-table) COMPREPLY=($(compgen -W '--fields --output' -- "
                         "\"$cur\") $(compgen -f -- \"$cur\")); return ;;\n"
                         "    call)\n"
                         "        if [ \"$COMP_CWORD\" -eq 2 ]; then\n"
                         "            COMPREPLY=($(compgen -W '");
    words(out, names, n);
    g_string_append(out, "' -- \"$cur\"))\n"
                         "        else\n"
                         "            COMPREPLY=($(compgen -W '--input --output --compact' -- "
                         "\"$cur\"))\n"
                         "        fi\n        return ;;\n"
                         "    plot) COMPREPLY=($(compgen -W '--x --y --item --log-x --log-y --output "
                         "--help' -- \"$cur\") $(compgen -f -- \"$cur\")); return ;;\n");
    for (guint i = 0; i < n; i++) {
        const BmOperation *op = ops[i];
        g_string_append_printf(out, "    %s)\n        case \"$prev\" in\n", op->name);
        GString *opts = g_string_new("--json --csv --output --help");
        if (has_plot && has_plot(op))
            g_string_append(opts, " --plot");
        for (const BmParam *p = op->params; p && p->name; p++) {
            g_autofree char *dashed = g_strdelimit(g_strdup(p->name), "_", '-');
            g_string_append_printf(opts, " --%s", dashed);
        }
        for (const BmParam *p = op->params; p && p->name; p++) {
            g_autofree char *dashed = g_strdelimit(g_strdup(p->name), "_", '-');
            g_autofree const BmChoice **choices = bm_param_choices(p);
            if (choices && choices[0]) {
                g_string_append_printf(out, "        --%s) COMPREPLY=($(compgen -W '", dashed);
                for (guint c = 0; choices[c]; c++)
                    g_string_append_printf(out, "%s%s", c ? " " : "", choices[c]->name);
                if (takes_file(p))
                    g_string_append(out, "' -- \"$cur\") $(compgen -f -- \"$cur\")); return ;;\n");
                else
                    g_string_append(out, "' -- \"$cur\")); return ;;\n");
            } else if (takes_file(p)) {
                g_string_append_printf(out, "        --%s) COMPREPLY=($(compgen -f -- \"$cur\"));"
                                            " return ;;\n", dashed);
            } else if (p->kinds == BM_VALUE_BOOLEAN) {
                g_string_append_printf(out, "        --%s) COMPREPLY=($(compgen -W 'true false "
                                            "%s' -- \"$cur\")); return ;;\n", dashed, opts->str);
            }
        }
        g_string_append_printf(out, "        esac\n        COMPREPLY=($(compgen -W '%s' -- "
                                    "\"$cur\"))\n        return ;;\n", opts->str);
        g_string_free(opts, TRUE);
    }
    g_string_append(out, "    esac\n}\ncomplete -o filenames -F _bandmass bandmass\n");
    return g_string_free(out, FALSE);
}
