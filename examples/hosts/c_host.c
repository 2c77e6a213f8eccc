/* c_host.c: bandmass from any C program through the plugin entry point:
 * dlopen the library, fetch the table, call an operation. No GLib needed. */
#include <dlfcn.h>
#include <stdio.h>
#include "bandmass-plugin.h"

int main(int argc, char **argv)
{
    const char *path = argc > 1 ? argv[1] : "libbandmass-1.0.so.0";
    void *lib = dlopen(path, RTLD_NOW | RTLD_LOCAL);
    if (!lib) {
        fprintf(stderr, "cannot load %s: %s\n", path, dlerror());
        return 1;
    }
    bandmass_plugin_get_api_func get_api;
    *(void **)&get_api = dlsym(lib, BANDMASS_PLUGIN_ENTRY);
    const bandmass_plugin_api *api = get_api ? get_api(BANDMASS_PLUGIN_ABI_MAJOR) : NULL;
    if (!api) {
        fprintf(stderr, "%s does not serve plugin ABI %d\n", path, BANDMASS_PLUGIN_ABI_MAJOR);
        return 1;
    }
    printf("bandmass %s, plugin ABI %u.%u\n", api->library_version,
           (unsigned)api->abi_major, (unsigned)api->abi_minor);
    for (size_t i = 0; i < api->n_operations; i++)
        printf("  %-20s %s\n", api->operation_names[i], api->operation_summaries[i]);

    char *response = NULL, *message = NULL;
    int status = api->call("constants", "{}", &response, &message);
    if (status != BANDMASS_PLUGIN_OK) {
        fprintf(stderr, "constants failed (%d): %s\n", status, message);
        api->free_string(message);
        return 1;
    }
    printf("%.120s...\n", response);
    api->free_string(response);

    status = api->call("constants", "{\"temperature_k\": 300}", &response, &message);
    printf("bad request -> status %d: %s\n", status, message);
    api->free_string(message);
    dlclose(lib);
    return status == BANDMASS_PLUGIN_INVALID_INPUT ? 0 : 1;
}
