/* Releasing the font caches that cairo and fontconfig keep for the life of the process. */
#define _GNU_SOURCE 1
#include <dlfcn.h>
#include <cairo.h>
#include "embz/render.h"

void embz_render_release_caches(void)
{
    cairo_debug_reset_static_data();
    /* fontconfig is loaded by cairo; look its clean-up up at run time so that we need not
     * link it ourselves */
    void (*fini)(void) = (void (*)(void)) dlsym(RTLD_DEFAULT, "FcFini");
    if (fini != NULL)
        fini();
}
