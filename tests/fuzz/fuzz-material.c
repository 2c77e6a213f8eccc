/* fuzz-material.c: the material file reader (through the "material" key
 * of carrier-statistics, as a file), then the material in use: carrier
 * statistics at 300 K, and the codec writing it back. */
#include "fuzz-common.h"
#include "material-input.h"
#include "registry.h"
#include "bm-json.h"

int LLVMFuzzerInitialize(int *argc, char ***argv)
{
    (void)argc, (void)argv;
    fuzz_init();
    return 0;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    const char *path = fuzz_file(data, size);
    GError *e = NULL;
    g_autoptr(JsonObject) request = json_object_new();
    json_object_set_string_member(request, "material", path);
    BmMaterialInput in;
    if (!bm_material_input_read(request, "material", &in, &e)) {
        fuzz_check_error(e, FALSE, "material reader");
        g_error_free(e);
        return 0;
    }
    g_autoptr(JsonObject) back = bm_material_to_json(&in.mat);
    g_autoptr(JsonNode) node = json_node_init_object(json_node_alloc(), back);
    g_autofree char *text = bm_json_to_string(node, FALSE);
    fuzz_check_response(text, "material written back");
    bm_material_input_clear(&in);

    g_autofree char *call = g_strdup_printf("{\"material\": \"%s\", \"temperature_k\": 300, "
                                            "\"donors\": [{\"density_cm3\": 1e16, "
                                            "\"ionization_ev\": 0.045}]}", path);
    char *r = bm_registry_call_json("carrier-statistics", call, NULL, FALSE, &e);
    if (r)
        fuzz_check_response(r, "carrier-statistics of a fuzzed material");
    else {
        fuzz_check_error(e, FALSE, "carrier-statistics of a fuzzed material");
        g_error_free(e);
    }
    g_free(r);
    return 0;
}
