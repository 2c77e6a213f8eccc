/* bandmass-export.h: BM_PUBLIC marks the functions libbandmass exports. The
 * library is built with hidden visibility: everything else (the core, the
 * readers, the registry, the operations) stays inside it. Plain C, no GLib,
 * so bandmass-plugin.h can use it too. */
#ifndef BANDMASS_EXPORT_H
#define BANDMASS_EXPORT_H

#if defined(__GNUC__) || defined(__clang__)
#define BM_PUBLIC __attribute__((visibility("default")))
#else
#define BM_PUBLIC
#endif

#endif
