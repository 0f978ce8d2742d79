/* Hands one command's option table to the option fuzzer (fuzz_opts.c). The table is a static
 * object of src/cli/cmd_NAME.c, so this file is that source with one getter added; it is
 * compiled once per command with -DFUZZ_CMD_FILE="src/cli/cmd_NAME.c", -DFUZZ_SPEC=NAME_spec
 * and -DFUZZ_GETTER=fuzz_spec_NAME (tests/fuzz/meson.build). The CLI sources stay as they are;
 * a renamed table fails to compile here. */
#include FUZZ_CMD_FILE

const cli_spec_t *FUZZ_GETTER(void);
const cli_spec_t *FUZZ_GETTER(void)
{
    return &FUZZ_SPEC;
}
