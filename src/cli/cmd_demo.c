/* PLACEHOLDER while the command is being written: replaced before release. */
#include <stdio.h>
#include "cli.h"

int cli_cmd_demo(int argc, char **argv)
{
    (void) argc;
    (void) argv;
    fprintf(stderr, "embz demo: not available in this build\n");
    return 1;
}
