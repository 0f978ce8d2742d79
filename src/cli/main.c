#include <stdio.h>
#include <string.h>
#include "embz.h"

int main(int argc, char **argv)
{
    if (argc > 1 && strcmp(argv[1], "--version") == 0) {
        printf("embz %s\n", EMBZ_VERSION);
        return 0;
    }
    fprintf(stderr, "embz: no command yet\n");
    return 2;
}
