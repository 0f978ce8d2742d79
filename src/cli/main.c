/* embz: the command-line front end. Each subcommand is one row of the table below and one
 * file cmd_NAME.c; adding a command is adding a row. */
#include <stdio.h>
#include <string.h>
#include "cli.h"

typedef struct {
    const char *name;
    int (*run)(int argc, char **argv);   /* argv[0] is the command name */
    const char *summary;
    const cli_spec_t *const *spec;       /* its option table (for the shell completion) */
} cli_command_t;

static const cli_command_t commands[] = {
    { "families", cli_cmd_families, "list the shipped family library", &cli_spec_families },
    { "convert",  cli_cmd_convert,  "exact convertibility and distance K between two states", &cli_spec_convert },
    { "error",    cli_cmd_error,    "certified embezzlement error of a family at size n", &cli_spec_error },
    { "sweep",    cli_cmd_sweep,    "error versus size over a log-spaced range, with fitted laws", &cli_spec_sweep },
    { "classify", cli_cmd_classify, "verdict: universal embezzler or not, and how fast", &cli_spec_classify },
    { "scan",     cli_cmd_scan,     "verdict, limit and rate over a parameter grid", &cli_spec_scan },
    { "size",     cli_cmd_size,     "smallest size (and qubits) reaching an error goal", &cli_spec_size },
    { "optimal",  cli_cmd_optimal,  "the smallest error any state of rank n reaches (certified)", &cli_spec_optimal },
    { "plot",     cli_cmd_plot,     "plots of error versus size and of the weights", &cli_spec_plot },
    { "report",   cli_cmd_report,   "one document comparing families (HTML, Markdown, LaTeX, PDF)", &cli_spec_report },
    { "demo",     cli_cmd_demo,     "the built-in scenario: which family embezzles two ebits cheapest", &cli_spec_demo },
};
#define NCOMMANDS ((long) (sizeof(commands) / sizeof(commands[0])))

static void print_main_help(FILE *out)
{
    fprintf(out,
            "usage: embz COMMAND [options]\n"
            "       embz COMMAND --help     (or: embz help COMMAND)\n"
            "       embz --version\n"
            "\n"
            "Certified analysis of embezzling families of entangled states.\n"
            "\n"
            "commands:\n");
    for (long k = 0; k < NCOMMANDS; k++)
        fprintf(out, "  %-10s %s\n", commands[k].name, commands[k].summary);
    fprintf(out,
            "\n"
            "  %-10s %s\n"
            "\n"
            "Exit status: 0 success, 1 runtime failure, 2 usage or input error.\n"
            "Family files are searched in $EMBZ_FAMILY_PATH (colon separated), then in the\n"
            "installed data directory and the source tree's families/ directory.\n",
            "completion", "print the bash completion script: embz completion bash");
}

static const cli_command_t *find_command(const char *name)
{
    for (long k = 0; k < NCOMMANDS; k++)
        if (strcmp(commands[k].name, name) == 0) return &commands[k];
    return NULL;
}

static int run_main(int argc, char **argv)
{
    if (argc < 2) {
        fprintf(stderr, "embz: no command given\n");
        print_main_help(stderr);
        return CLI_EXIT_USAGE;
    }
    const char *cmd = argv[1];
    if (strcmp(cmd, "--help") == 0 || strcmp(cmd, "-h") == 0) {
        print_main_help(stdout);
        return CLI_EXIT_OK;
    }
    if (strcmp(cmd, "--version") == 0 || strcmp(cmd, "-V") == 0) {
        printf("embz %s\n", EMBZ_VERSION);
        return CLI_EXIT_OK;
    }
    if (strcmp(cmd, "help") == 0) {
        if (argc < 3) {
            print_main_help(stdout);
            return CLI_EXIT_OK;
        }
        if (strcmp(argv[2], "completion") == 0) {
            char help[] = "--help";
            char *sub[3] = { argv[2], help, NULL };
            return cli_cmd_completion(2, sub, NULL, 0);
        }
        const cli_command_t *c = find_command(argv[2]);
        if (c == NULL) {
            fprintf(stderr, "embz: unknown command '%s'\n", argv[2]);
            print_main_help(stderr);
            return CLI_EXIT_USAGE;
        }
        char help[] = "--help";
        char *sub[3] = { argv[2], help, NULL };
        return c->run(2, sub);
    }
    if (strcmp(cmd, "completion") == 0) {
        const cli_spec_t *specs[NCOMMANDS];
        for (long k = 0; k < NCOMMANDS; k++) specs[k] = *commands[k].spec;
        return cli_cmd_completion(argc - 1, argv + 1, specs, NCOMMANDS);
    }
    if (cmd[0] == '-') {
        fprintf(stderr, "embz: unknown option '%s' (options go after the command)\n", cmd);
        print_main_help(stderr);
        return CLI_EXIT_USAGE;
    }
    const cli_command_t *c = find_command(cmd);
    if (c == NULL) {
        fprintf(stderr, "embz: unknown command '%s'\n", cmd);
        print_main_help(stderr);
        return CLI_EXIT_USAGE;
    }
    return c->run(argc - 1, argv + 1);
}

int main(int argc, char **argv)
{
    int code = run_main(argc, argv);
    fflush(stdout);
    flint_cleanup();
    return code;
}
