/* embz completion bash: a bash completion script made from the option tables that --help
 * prints, so that the two cannot drift apart. */
#include <stdio.h>
#include <string.h>
#include "cli.h"

/* The words an option's value may take, where there is a fixed list; cmd NULL: every
 * command that has the option (a row for one command comes first and wins). */
typedef struct {
    const char *cmd, *opt, *words;
} cli_choice_t;

static const cli_choice_t choices[] = {
    { "size", "measure", "k purified" },
    { NULL, "measure", "k fidelity purified overlap" },
    { "optimal", "method", "closed lp" },
    { NULL, "method", "auto explicit analytic" },
    { "optimal", "start", "equal solver" },
    { "plot", "format", "svg pdf png" },
    { NULL, "format", "html md tex pdf" },
    { NULL, "target", "ebit ebits: uniform:" },
};
#define NCHOICES ((long) (sizeof(choices) / sizeof(choices[0])))

static const char *choice_words(const char *cmd, const char *opt)
{
    for (long k = 0; k < NCHOICES; k++)
        if ((choices[k].cmd == NULL || strcmp(choices[k].cmd, cmd) == 0)
            && strcmp(choices[k].opt, opt) == 0)
            return choices[k].words;
    return NULL;
}

/* The option names of spec as one word list ("--size -n --target -t ... --help -h"). */
static void option_words(FILE *out, const cli_spec_t *spec)
{
    for (long k = 0; spec->opts != NULL && spec->opts[k].name != NULL; k++) {
        const cli_opt_t *o = spec->opts + k;
        if (o->help == NULL) continue;           /* an old name: accepted, not offered */
        fprintf(out, "--%s ", o->name);
        if (o->short_name) fprintf(out, "-%c ", o->short_name);
    }
    fprintf(out, "--help -h");
}

/* One case arm: what follows an option of spec that takes a value. */
static void value_cases(FILE *out, const cli_spec_t *spec)
{
    fprintf(out, "                case \"$prev\" in\n");
    for (long k = 0; spec->opts != NULL && spec->opts[k].name != NULL; k++) {
        const cli_opt_t *o = spec->opts + k;
        if (o->kind == CLI_FLAG) continue;
        char pat[80];
        if (o->short_name) snprintf(pat, sizeof(pat), "--%s|-%c", o->name, o->short_name);
        else snprintf(pat, sizeof(pat), "--%s", o->name);
        const char *words = choice_words(spec->name, o->name);
        int files = o->metavar != NULL && strcmp(o->metavar, "FILE") == 0;
        if (strcmp(o->name, "target") == 0)
            fprintf(out, "                    %s) _embz_words \"%s\"; _embz_files; _embz_nospace; return ;;\n",
                    pat, words);
        else if (words != NULL)
            fprintf(out, "                    %s) _embz_words \"%s\"; return ;;\n", pat, words);
        else if (files)
            fprintf(out, "                    %s) _embz_files; return ;;\n", pat);
        else
            fprintf(out, "                    %s) return ;;\n", pat);
    }
    fprintf(out, "                esac\n");
}

static void write_bash(FILE *out, const cli_spec_t *const *specs, long nspecs)
{
    fprintf(out,
            "# bash completion for embz, made by 'embz completion bash' from the option tables\n"
            "# that 'embz COMMAND --help' prints. Install it as\n"
            "# share/bash-completion/completions/embz, or source it.\n"
            "# Candidates are added one per line (no word splitting or globbing of names), words\n"
            "# of a fixed list through compgen -W, file and family names without expansion.\n"
            "_embz_words() { local w; while IFS= read -r w; do [ -n \"$w\" ] && COMPREPLY+=(\"$w\"); done < <(compgen -W \"$1\" -- \"$cur\"); }\n"
            "_embz_files() { local w; compopt -o filenames 2>/dev/null; while IFS= read -r w; do COMPREPLY+=(\"$w\"); done < <(compgen -f -- \"$cur\"); }\n"
            "_embz_families() {\n"
            "    local w p=\"${COMP_WORDS[0]}\"\n"
            "    p=\"${p/#\\~/$HOME}\"\n"
            "    while IFS= read -r w; do\n"
            "        [[ \"$w\" == \"$cur\"* ]] && COMPREPLY+=(\"$w\")\n"
            "    done < <(\"$p\" families --names 2>/dev/null)\n"
            "}\n"
            "# no space after a candidate only when every candidate ends in ':' (ebits:, uniform:)\n"
            "_embz_nospace() { local w; for w in \"${COMPREPLY[@]}\"; do [[ \"$w\" == *: ]] || return; done; [ ${#COMPREPLY[@]} -gt 0 ] && compopt -o nospace 2>/dev/null; }\n"
            "_embz() {\n"
            "    local cur=\"${COMP_WORDS[COMP_CWORD]}\" prev=\"${COMP_WORDS[COMP_CWORD-1]}\"\n"
            "    COMPREPLY=()\n"
            "    # bash splits --opt=value and uniform:4 into words at '=' and ':'\n"
            "    if [ \"$cur\" = \"=\" ]; then cur=\"\"; elif [ \"$prev\" = \"=\" ] && [ \"$COMP_CWORD\" -ge 2 ]; then prev=\"${COMP_WORDS[COMP_CWORD-2]}\"; fi\n"
            "    if [ \"$cur\" = \":\" ] || [ \"$prev\" = \":\" ]; then return; fi\n"
            "    if [ \"$COMP_CWORD\" -eq 1 ]; then\n"
            "        _embz_words \"");
    for (long k = 0; k < nspecs; k++) fprintf(out, "%s ", specs[k]->name);
    fprintf(out, "help completion --help --version\"\n"
                 "        return\n"
                 "    fi\n"
                 "    case \"${COMP_WORDS[1]}\" in\n"
                 "        help)\n"
                 "            [ \"$COMP_CWORD\" -eq 2 ] && _embz_words \"");
    for (long k = 0; k < nspecs; k++) fprintf(out, "%s ", specs[k]->name);
    fprintf(out, "\"\n"
                 "            ;;\n"
                 "        completion)\n"
                 "            [ \"$COMP_CWORD\" -eq 2 ] && _embz_words \"bash\"\n"
                 "            ;;\n");
    for (long k = 0; k < nspecs; k++) {
        const cli_spec_t *s = specs[k];
        fprintf(out, "        %s)\n", s->name);
        value_cases(out, s);
        fprintf(out, "                if [[ \"$cur\" == -* ]]; then\n"
                     "                    _embz_words \"");
        option_words(out, s);
        fprintf(out, "\"\n");
        if (s->max_pos > 0) {
            /* positional arguments: families (and their files) or state files */
            int fam = s->args != NULL && strstr(s->args, "FAMILY") != NULL;
            fprintf(out, "                else\n"
                         "                    %s_embz_files\n", fam ? "_embz_families; " : "");
        }
        fprintf(out, "                fi\n"
                     "            ;;\n");
    }
    fprintf(out, "    esac\n"
                 "}\n"
                 "complete -F _embz embz\n");
}

static const cli_opt_t completion_opts[] = { CLI_OPT_END };

static const cli_spec_t completion_spec = {
    "completion", "bash",
    "Print a completion script for the shell (bash): commands, options, the values of\n"
    "--measure, --method, --format and --target, family names and files.",
    "Install: embz completion bash > ~/.local/share/bash-completion/completions/embz\n"
    "(the make install of embz puts it in share/bash-completion/completions). Or:\n"
    "source <(embz completion bash)\n",
    completion_opts, 1, 1
};

int cli_cmd_completion(int argc, char **argv, const cli_spec_t *const *specs, long nspecs)
{
    cli_args_t a;
    int code;
    if (!cli_begin(&a, &completion_spec, argc, argv, &code)) return code;
    if (strcmp(a.pos[0], "bash") != 0) {
        code = cli_usage_error(&completion_spec, "unknown shell '%s' (only bash)", a.pos[0]);
        cli_args_clear(&a);
        return code;
    }
    cli_args_clear(&a);
    write_bash(stdout, specs, nspecs);
    return CLI_EXIT_OK;
}
