/* Tests for the rendering layer (src/render): tick placement, the palette, figure files,
 * inline SVG, report documents, escaping and atomic writes. Outside checks: XML parsing by
 * Python's xml.etree, PDF rendering by poppler's pdftoppm, PNG signature from the PNG
 * specification, Chromium for the HTML. */
#include <check.h>
#include <dirent.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>
#include "embz.h"

static char tmpdir[256];

static void make_tmpdir(void)
{
    snprintf(tmpdir, sizeof(tmpdir), "/tmp/embz-render-XXXXXX");
    ck_assert_ptr_nonnull(mkdtemp(tmpdir));
}

static void remove_tmpdir(void)
{
    char cmd[400];
    snprintf(cmd, sizeof(cmd), "rm -rf '%s'", tmpdir);
    ck_assert_int_eq(system(cmd), 0);
}

static char *path_in(const char *name)
{
    static char buf[8][512];
    static int k = 0;
    k = (k + 1) % 8;
    snprintf(buf[k], sizeof(buf[k]), "%s/%s", tmpdir, name);
    return buf[k];
}

static long count_entries(const char *dir)
{
    DIR *d = opendir(dir);
    long n = 0;
    struct dirent *e;
    ck_assert_ptr_nonnull(d);
    while ((e = readdir(d)) != NULL)
        if (strcmp(e->d_name, ".") && strcmp(e->d_name, ".."))
            n++;
    closedir(d);
    return n;
}

static char *read_all(const char *path, size_t *len)
{
    FILE *f = fopen(path, "rb");
    ck_assert_msg(f != NULL, "cannot open %s", path);
    fseek(f, 0, SEEK_END);
    long n = ftell(f);
    fseek(f, 0, SEEK_SET);
    char *s = malloc(n + 1);
    ck_assert_int_eq(fread(s, 1, n, f), (size_t) n);
    s[n] = 0;
    fclose(f);
    if (len)
        *len = (size_t) n;
    return s;
}

static void write_text(const char *path, const char *text)
{
    FILE *f = fopen(path, "w");
    ck_assert_ptr_nonnull(f);
    fputs(text, f);
    fclose(f);
}

/* Python's XML parser must accept the file. */
static int xml_ok(const char *path)
{
    char cmd[800];
    snprintf(cmd, sizeof(cmd), "/usr/bin/python3 -c 'import sys, xml.etree.ElementTree as E; "
             "E.parse(sys.argv[1])' '%s'", path);
    return system(cmd) == 0;
}

/* A figure with two panels: log-log with an enclosure band and a wide log range. */
static void sample_figure(embz_plot_t fig)
{
    embz_plot_init(fig, "Sample figure");
    slong p = embz_plot_add_panel(fig, "error against size", "size n", "error", 1, 1);
    slong s = embz_plot_add_series(fig, p, "1/i", EMBZ_PLOT_POINTS | EMBZ_PLOT_LINE, -1000);
    slong t = embz_plot_add_series(fig, p, "fit", EMBZ_PLOT_LINE | EMBZ_PLOT_BAND, -1000);
    for (int k = 1; k <= 1000; k += 111) {
        double y = log10(0.69 / (k * log(10.0) + 0.577));
        embz_plot_push(fig, p, s, k, y, y - 0.02, y + 0.02);
        embz_plot_push(fig, p, t, k, y, y - 0.1, y + 0.1);
    }
    slong q = embz_plot_add_panel(fig, "linear", "x", "y", 0, 0);
    slong u = embz_plot_add_series(fig, q, "line", EMBZ_PLOT_LINE | EMBZ_PLOT_DASHED, -1000);
    for (int k = 0; k < 20; k++)
        embz_plot_push(fig, q, u, k * 0.1, sin(k * 0.3), NAN, NAN);
}

static void sample_map(embz_plot_t fig)
{
    const char *xs[7] = { "-1.5", "-1.25", "-1", "-0.75", "-0.5", "-0.25", "0" };
    const char *ys[4] = { "0", "1", "2", "3" };
    embz_plot_init(fig, NULL);
    slong m = embz_plot_add_map(fig, "verdict map", "a", "b", 7, xs, 4, ys);
    slong c0 = embz_plot_add_category(fig, m, "embezzler", 0);
    slong c1 = embz_plot_add_category(fig, m, "not an embezzler", 1);
    slong c2 = embz_plot_add_category(fig, m, "inconclusive", EMBZ_PLOT_LIGHT);
    for (int i = 0; i < 7; i++)
        for (int j = 0; j < 4; j++)
            embz_plot_set_cell(fig, m, i, j, i == 2 ? (int) c0 : (i + j) % 5 == 0 ? (int) c2
                                                                               : (int) c1);
}

/* ------------------------------------------------------------------ ticks */

START_TEST(test_ticks_log_wide)
{
    /* 10^1 .. 10^1000: the first level whose labels are at most 10 must step by 100
     * decades (1, 2, 5, 10, 20, 50, 100, ... is the ladder), labels "10" with exponent. */
    embz_plot_tick_t *t = malloc(EMBZ_PLOT_MAX_TICKS * sizeof(*t));
    int found = 0;
    for (int level = 0; level < 40 && !found; level++) {
        slong n = embz_plot_ticks(t, 1, 1000, 1, level);
        if (n < 0)
            break;
        slong nmaj = 0;
        for (slong i = 0; i < n; i++)
            nmaj += t[i].major;
        if (nmaj > 10)
            continue;
        found = 1;
        for (slong i = 0; i < n; i++) {
            ck_assert(t[i].pos >= 1 - 1e-9 && t[i].pos <= 1000 + 1e-9);
            if (!t[i].major)
                continue;
            long k = atol(t[i].sup);
            ck_assert_str_eq(t[i].text, "10");
            ck_assert_int_eq(k % 100, 0);
            ck_assert(fabs(t[i].pos - k) < 1e-9);
        }
        ck_assert_int_eq(nmaj, 10);    /* 10^100, 10^200, ..., 10^1000 */
    }
    ck_assert(found);
    free(t);
}
END_TEST

START_TEST(test_ticks_random)
{
    /* property: ticks lie in the range, labelled ones strictly increase, coarser levels give
     * no more labelled ticks, log majors are decades (or 2 and 5 times) */
    flint_rand_t st;
    flint_randinit(st);
    embz_plot_tick_t *t = malloc(EMBZ_PLOT_MAX_TICKS * sizeof(*t));
    for (int iter = 0; iter < 2000; iter++) {
        int logscale = n_randint(st, 2);
        double lo = (n_randint(st, 2000) - 1000.0) / (1 + n_randint(st, 50));
        double hi = lo + pow(10.0, (n_randint(st, 700) - 200.0) / 100.0);
        slong prev_maj = 1000000;
        for (int level = 0; level < 60; level++) {
            slong n = embz_plot_ticks(t, lo, hi, logscale, level);
            if (n < 0)
                break;
            double last = -INFINITY;
            slong nmaj = 0;
            for (slong i = 0; i < n; i++) {
                ck_assert_msg(t[i].pos >= lo - 1e-6 * (hi - lo) && t[i].pos <= hi + 1e-6 * (hi - lo),
                              "tick %g outside [%g, %g] (log %d level %d)", t[i].pos, lo, hi,
                              logscale, level);
                if (!t[i].major)
                    continue;
                ck_assert(t[i].pos > last);
                ck_assert(t[i].text[0] != 0);
                last = t[i].pos;
                nmaj++;
                if (logscale && hi - lo > 3)
                    ck_assert(fabs(t[i].pos - round(t[i].pos)) < 1e-9);
            }
            if (level > 0 && logscale == 0)
                ck_assert(nmaj <= prev_maj);
            prev_maj = nmaj;
        }
    }
    free(t);
    flint_randclear(st);
}
END_TEST

START_TEST(test_ticks_linear_values)
{
    /* [0, 1] at level 0: steps of 0.1 labelled "0.0" .. "1.0" (12 ticks wanted -> 0.1) */
    embz_plot_tick_t t[EMBZ_PLOT_MAX_TICKS];
    slong n = embz_plot_ticks(t, 0, 1, 0, 0);
    slong nmaj = 0;
    for (slong i = 0; i < n; i++)
        if (t[i].major) {
            char want[16];
            snprintf(want, sizeof(want), "%.1f", nmaj * 0.1);
            ck_assert_str_eq(t[i].text, want);
            nmaj++;
        }
    ck_assert_int_eq(nmaj, 11);
    /* a short log range labels 1, 2, 5 times powers of ten: 10^-2 .. 10^0 */
    n = embz_plot_ticks(t, -2, 0, 1, 0);
    const char *want[] = { "1\xc3\x97" "10", "2\xc3\x97" "10", "5\xc3\x97" "10", "1\xc3\x97" "10",
                           "2\xc3\x97" "10", "5\xc3\x97" "10", "1" };
    nmaj = 0;
    for (slong i = 0; i < n; i++)
        if (t[i].major) {
            if (nmaj == 0 || nmaj == 3)
                ck_assert_str_eq(t[i].text, "10");
            else
                ck_assert_str_eq(t[i].text, want[nmaj]);
            nmaj++;
        }
    ck_assert_int_eq(nmaj, 7);
}
END_TEST

/* ------------------------------------------------------------------ palette */

static double lin(double c)
{
    return c <= 0.04045 ? c / 12.92 : pow((c + 0.055) / 1.055, 2.4);
}

static void to_lab(double lab[3], const double l[3])
{
    /* linear sRGB -> XYZ (D65) -> CIELAB, standard sRGB and CIE 1976 formulas [memory] */
    double X = 0.4124 * l[0] + 0.3576 * l[1] + 0.1805 * l[2];
    double Y = 0.2126 * l[0] + 0.7152 * l[1] + 0.0722 * l[2];
    double Z = 0.0193 * l[0] + 0.1192 * l[1] + 0.9505 * l[2];
    double v[3] = { X / 0.95047, Y / 1.0, Z / 1.08883 };
    for (int k = 0; k < 3; k++)
        v[k] = v[k] > 216.0 / 24389 ? cbrt(v[k]) : (24389.0 / 27 * v[k] + 16) / 116;
    lab[0] = 116 * v[1] - 16;
    lab[1] = 500 * (v[0] - v[1]);
    lab[2] = 200 * (v[1] - v[2]);
}

START_TEST(test_palette_cvd)
{
    /* dichromat simulation in linear RGB, Vienot, Brettel and Mollon (1999), matrices as
     * commonly quoted [memory] */
    static const double sim[3][3][3] = {
        { { 1, 0, 0 }, { 0, 1, 0 }, { 0, 0, 1 } },
        { { 0.11238, 0.88762, 0 }, { 0.11238, 0.88762, 0 }, { 0.00401, -0.00401, 1 } },
        { { 0.29275, 0.70725, 0 }, { 0.29275, 0.70725, 0 }, { -0.02234, 0.02234, 1 } },
    };
    double minde = 1e9;
    for (int v = 0; v < 3; v++)
        for (int a = 0; a < EMBZ_PLOT_NCOLOURS; a++)
            for (int b = a + 1; b < EMBZ_PLOT_NCOLOURS; b++) {
                double la[3], lb[3];
                embz_rgb_t ca = embz_plot_colour(a), cb = embz_plot_colour(b);
                double ia[3] = { lin(ca.r), lin(ca.g), lin(ca.b) };
                double ib[3] = { lin(cb.r), lin(cb.g), lin(cb.b) };
                double sa[3], sb[3];
                for (int i = 0; i < 3; i++) {
                    sa[i] = sb[i] = 0;
                    for (int j = 0; j < 3; j++) {
                        sa[i] += sim[v][i][j] * ia[j];
                        sb[i] += sim[v][i][j] * ib[j];
                    }
                    sa[i] = fmin(1, fmax(0, sa[i]));
                    sb[i] = fmin(1, fmax(0, sb[i]));
                }
                to_lab(la, sa);
                to_lab(lb, sb);
                double d = sqrt((la[0] - lb[0]) * (la[0] - lb[0]) + (la[1] - lb[1]) * (la[1] - lb[1])
                                + (la[2] - lb[2]) * (la[2] - lb[2]));
                ck_assert_msg(d >= 15, "colours %d and %d only %.1f apart (view %d)", a, b, d, v);
                minde = fmin(minde, d);
            }
    ck_assert(minde >= 15);
    /* the palette cycles */
    embz_rgb_t c0 = embz_plot_colour(0), c6 = embz_plot_colour(EMBZ_PLOT_NCOLOURS);
    ck_assert(c0.r == c6.r && c0.g == c6.g && c0.b == c6.b);
}
END_TEST

/* ------------------------------------------------------------------ figure files */

START_TEST(test_plot_files)
{
    make_tmpdir();
    embz_plot_t fig;
    embz_err_t err;
    embz_err_clear(&err);
    sample_figure(fig);
    ck_assert_int_eq(embz_plot_write(fig, path_in("a.svg"), &err), EMBZ_OK);
    ck_assert_int_eq(embz_plot_write(fig, path_in("a.PNG"), &err), EMBZ_OK);
    ck_assert_int_eq(embz_plot_write(fig, path_in("a.pdf"), &err), EMBZ_OK);
    ck_assert_int_eq(embz_plot_write(fig, path_in("a.gif"), &err), EMBZ_ERR_INPUT);
    ck_assert(xml_ok(path_in("a.svg")));
    size_t len;
    char *png = read_all(path_in("a.PNG"), &len);
    /* PNG signature (PNG specification, section 5.2) and IHDR with the size */
    ck_assert(len > 1000);
    ck_assert(memcmp(png, "\x89PNG\r\n\x1a\n", 8) == 0);
    ck_assert(memcmp(png + 12, "IHDR", 4) == 0);
    double W, H;
    embz_plot_size(&W, &H, fig);
    unsigned long pw = ((unsigned long) (unsigned char) png[16] << 24) | ((unsigned char) png[17] << 16)
                       | ((unsigned char) png[18] << 8) | (unsigned char) png[19];
    ck_assert_int_eq(pw, (unsigned long) (W * 1.5 + 0.5));
    free(png);
    char cmd[800];
    snprintf(cmd, sizeof(cmd), "pdftoppm -r 40 -png '%s' '%s' 2>/dev/null", path_in("a.pdf"),
             path_in("pdfpage"));
    if (access("/usr/bin/pdftoppm", X_OK) == 0)
        ck_assert_int_eq(system(cmd), 0);
    embz_plot_clear(fig);

    sample_map(fig);
    ck_assert_int_eq(embz_plot_write(fig, path_in("map.svg"), &err), EMBZ_OK);
    ck_assert(xml_ok(path_in("map.svg")));
    ck_assert_int_eq(embz_plot_write(fig, path_in("map.png"), &err), EMBZ_OK);
    embz_plot_clear(fig);
    /* an empty figure still draws */
    embz_plot_init(fig, "empty");
    embz_plot_add_panel(fig, NULL, NULL, NULL, 1, 0);
    ck_assert_int_eq(embz_plot_write(fig, path_in("e.svg"), &err), EMBZ_OK);
    ck_assert(xml_ok(path_in("e.svg")));
    embz_plot_clear(fig);
    remove_tmpdir();
}
END_TEST

START_TEST(test_svg_inline)
{
    embz_plot_t fig;
    embz_err_t err;
    char *a, *b;
    sample_figure(fig);
    ck_assert_int_eq(embz_plot_svg_string(&a, fig, "one-", &err), EMBZ_OK);
    ck_assert_int_eq(embz_plot_svg_string(&b, fig, "two-", &err), EMBZ_OK);
    ck_assert_ptr_null(strstr(a, "<?xml"));
    ck_assert(strncmp(a, "<svg", 4) == 0);
    /* every id and reference carries the prefix */
    for (const char *p = a; (p = strstr(p, " id=\"")) != NULL; p++)
        ck_assert(strncmp(p + 5, "one-", 4) == 0);
    for (const char *p = a; (p = strstr(p, "href=\"#")) != NULL; p++)
        ck_assert(strncmp(p + 7, "one-", 4) == 0);
    for (const char *p = a; (p = strstr(p, "url(#")) != NULL; p++)
        ck_assert(strncmp(p + 5, "one-", 4) == 0);
    ck_assert_ptr_nonnull(strstr(a, "id=\"one-"));
    ck_assert_ptr_null(strstr(b, "id=\"one-"));
    char *c = NULL;
    ck_assert_int_eq(embz_plot_svg_string(&c, fig, "bad\"", &err), EMBZ_ERR_INPUT);
    ck_assert_ptr_null(c);
    /* both parse as XML */
    make_tmpdir();
    write_text(path_in("a.svg"), a);
    write_text(path_in("b.svg"), b);
    ck_assert(xml_ok(path_in("a.svg")));
    ck_assert(xml_ok(path_in("b.svg")));
    remove_tmpdir();
    free(a);
    free(b);
    embz_plot_clear(fig);
}
END_TEST

/* ------------------------------------------------------------------ atomic writes */

START_TEST(test_atomic)
{
    make_tmpdir();
    embz_plot_t fig;
    embz_err_t err;
    sample_figure(fig);
    /* the directory part is a file: fails cleanly (works even for root) */
    write_text(path_in("plain"), "x");
    ck_assert_int_eq(embz_plot_write(fig, path_in("plain/x.svg"), &err), EMBZ_ERR_IO);
    ck_assert_int_eq(embz_plot_write(fig, path_in("nodir/x.svg"), &err), EMBZ_ERR_IO);
    ck_assert_ptr_nonnull(strstr(err.text, "nodir/x.svg"));
    ck_assert_int_eq(count_entries(tmpdir), 1);
    /* a read-only directory (root may write anyway: then the write succeeds atomically) */
    mkdir(path_in("ro"), 0555);
    int st = embz_plot_write(fig, path_in("ro/x.png"), &err);
    if (geteuid() != 0) {
        ck_assert_int_eq(st, EMBZ_ERR_IO);
        ck_assert_int_eq(count_entries(path_in("ro")), 0);
    } else {
        ck_assert_int_eq(count_entries(path_in("ro")), st == EMBZ_OK ? 1 : 0);
    }
    /* a failure in the middle of rendering: the old file stays, no temporary file is left */
    const char *exts[] = { "svg", "pdf", "png" };
    for (int k = 0; k < 3; k++) {
        char name[32];
        snprintf(name, sizeof(name), "keep.%s", exts[k]);
        write_text(path_in(name), "old content");
        for (size_t cut = 1; cut < 40000; cut *= 7) {
            fig->fail_after = cut;
            ck_assert_int_eq(embz_plot_write(fig, path_in(name), &err), EMBZ_ERR_IO);
            char *s = read_all(path_in(name), NULL);
            ck_assert_str_eq(s, "old content");
            free(s);
        }
        fig->fail_after = 0;
    }
    ck_assert_int_eq(count_entries(tmpdir), 5);   /* plain, ro, keep.{svg,pdf,png} */
    /* the streaming writer directly */
    ck_assert_int_eq(embz_afile_write_all(path_in("t.txt"), "hello", 5, 3, &err), EMBZ_ERR_IO);
    ck_assert_int_eq(access(path_in("t.txt"), F_OK), -1);
    ck_assert_int_eq(embz_afile_write_all(path_in("t.txt"), "hello", 5, 0, &err), EMBZ_OK);
    char *s = read_all(path_in("t.txt"), NULL);
    ck_assert_str_eq(s, "hello");
    free(s);
    ck_assert_int_eq(count_entries(tmpdir), 6);
    embz_plot_clear(fig);
    chmod(path_in("ro"), 0755);
    remove_tmpdir();
}
END_TEST

/* ------------------------------------------------------------------ escaping */

static char *html_unescape(const char *s)
{
    char *o = malloc(strlen(s) + 1), *q = o;
    static const char *const ent[][2] = { { "&amp;", "&" }, { "&lt;", "<" }, { "&gt;", ">" },
                                          { "&quot;", "\"" }, { "&#39;", "'" } };
    while (*s) {
        int hit = 0;
        for (int k = 0; k < 5 && !hit; k++)
            if (!strncmp(s, ent[k][0], strlen(ent[k][0]))) {
                *q++ = ent[k][1][0];
                s += strlen(ent[k][0]);
                hit = 1;
            }
        if (!hit)
            *q++ = *s++;
    }
    *q = 0;
    return o;
}

START_TEST(test_escape_random)
{
    flint_rand_t st;
    flint_randinit(st);
    const char alphabet[] = "ab<>&\"'\\{}$%#_^~|*`[]()!+ \n1";
    for (int iter = 0; iter < 3000; iter++) {
        char s[40];
        int n = (int) n_randint(st, 38);
        for (int i = 0; i < n; i++)
            s[i] = alphabet[n_randint(st, sizeof(alphabet) - 1)];
        s[n] = 0;
        char *h = embz_html_escape(s);
        ck_assert(strpbrk(h, "<>\"'") == NULL);
        char *u = html_unescape(h);
        ck_assert_str_eq(u, s);
        free(u);
        free(h);
        char *t = embz_latex_escape(s);
        /* after removing the command spellings every special is preceded by a backslash */
        static const char *const cmds[] = { "\\textbackslash{}", "\\textasciitilde{}",
            "\\textasciicircum{}", "\\textless{}", "\\textgreater{}", "\\textbar{}" };
        for (size_t k = 0; k < 6; k++)
            for (char *p; (p = strstr(t, cmds[k])) != NULL; )
                memmove(p, p + strlen(cmds[k]) - 1, strlen(p + strlen(cmds[k]) - 1) + 1),
                    *p = 'X';
        for (const char *p = t; *p; p++) {
            if (strchr("#$%&_{}\\", *p) && *p) {
                ck_assert_msg(*p == '\\' ? strchr("#$%&_{}", p[1]) && p[1] : p > t && p[-1] == '\\',
                              "unescaped %c in %s", *p, t);
                if (*p == '\\')
                    p++;
            }
            ck_assert(*p != '~' && *p != '^' && *p != '<' && *p != '>' && *p != '\n');
        }
        free(t);
        char *m = embz_markdown_escape(s);
        for (const char *p = m; *p; p++)
            if (strchr("<>|*_`[]", *p) && *p) {
                ck_assert(p > m && p[-1] == '\\');
            }
        free(m);
    }
    flint_randclear(st);
}
END_TEST

/* ------------------------------------------------------------------ reports */

static const char *EVIL = "<script>alert(1)</script>";

static void sample_report(embz_report_t r, const embz_plot_struct *fig)
{
    const char *sizes[2] = { "10^6", "10^100" };
    const char *goals[1] = { "1e-3" };
    embz_report_init(r, "Comparison & summary");
    embz_report_set(&r->subtitle, "target: 2 ebits; goal 1e-3");
    embz_report_set(&r->intro, "First paragraph.\n\nSecond paragraph with <b>markup</b>.");
    embz_report_set_sizes(r, 2, sizes);
    embz_report_set_goals(r, 1, goals);
    embz_report_family_struct *f = embz_report_add_family(r, "inverse");
    embz_report_set(&f->weight, "1/i");
    embz_report_set(&f->verdict, "embezzler");
    embz_report_set(&f->law, "C (ln n)^-g");
    embz_report_set(&f->exponent, "g \xe2\x89\x88 1.00 (estimate)");
    embz_report_set(&f->limit_lo, "0");
    embz_report_set(&f->limit_hi, "0.0031");
    embz_report_set(&f->error_at[0], "0.0478318");
    embz_report_set(&f->error_at[1], "0.00300954");
    embz_report_set(&f->need_n[0], "1.234567890e+451");
    embz_report_set(&f->need_qubits[0], "1499");
    embz_report_set(&f->notes, "Universal.\n\nSlow: logarithmic decay (ln n)^-g, within "
                    "x^(-1-0.1) and x^-1; OPT_n at 10^60.");
    f = embz_report_add_family(r, EVIL);
    embz_report_set(&f->weight, "i^a_1 % {x} & $y$ # ~");
    embz_report_set(&f->verdict, "not_embezzler");
    embz_report_set(&f->error_at[0], "0.293107062");
    embz_report_set(&f->notes, EVIL);
    embz_report_add_figure(r, "Figure with <angle> brackets", fig);
    embz_report_set(&r->footer, "Numbers marked (estimate) are not certified.");
}

START_TEST(test_report_html)
{
    embz_plot_t fig;
    embz_report_t r;
    embz_err_t err;
    char *h;
    sample_figure(fig);
    sample_report(r, fig);
    ck_assert_int_eq(embz_report_html(&h, r, &err), EMBZ_OK);
    ck_assert_ptr_null(strstr(h, "<script"));
    ck_assert_ptr_null(strstr(h, "<b>"));
    ck_assert_ptr_nonnull(strstr(h, "&lt;script&gt;alert(1)&lt;/script&gt;"));
    ck_assert_ptr_nonnull(strstr(h, "Comparison &amp; summary"));
    ck_assert_ptr_nonnull(strstr(h, "<svg"));
    const char *nums[] = { "0.0478318", "0.00300954", "1.234567890e+451", "1499", "[0, 0.0031]",
                           "0.293107062", "1e-3",
                           /* the size 10^100 in a column head, as MathML */
                           "<math><msup><mrow><mn>10</mn></mrow><mrow><mn>100</mn></mrow></msup>"
                           "</math>" };
    for (size_t k = 0; k < sizeof(nums) / sizeof(nums[0]); k++)
        ck_assert_msg(strstr(h, nums[k]) != NULL, "%s missing", nums[k]);
    /* the plain notation of the notes as MathML */
    const char *math[] = {
        "<math><msup><mrow><mo>(</mo><mi>ln</mi><mspace width=\"0.25em\"></mspace><mi>n</mi>"
        "<mo>)</mo></mrow><mrow><mo>\xe2\x88\x92</mo><mi>g</mi></mrow></msup></math>",
        "<msup><mrow><mi>x</mi></mrow><mrow><mo>\xe2\x88\x92</mo><mn>1</mn><mo>\xe2\x88\x92"
        "</mo><mn>0.1</mn></mrow></msup>",
        "<msup><mrow><mi>x</mi></mrow><mrow><mo>\xe2\x88\x92</mo><mn>1</mn></mrow></msup>",
        "<msub><mrow><mi>OPT</mi></mrow><mrow><mi>n</mi></mrow></msub>",
        "<msup><mrow><mn>10</mn></mrow><mrow><mn>60</mn></mrow></msup>" };
    for (size_t k = 0; k < sizeof(math) / sizeof(math[0]); k++)
        ck_assert_msg(strstr(h, math[k]) != NULL, "MathML %s missing", math[k]);
    ck_assert_ptr_null(strstr(h, "^-g"));
    /* the document is well-formed enough for an XML parser (void tags aside: none used
     * except meta, which we close here by replacing) */
    make_tmpdir();
    ck_assert_int_eq(embz_report_write(r, path_in("r.html"), EMBZ_REPORT_HTML, &err), EMBZ_OK);
    /* Chromium renders it and takes a screenshot */
    if (access("/usr/bin/chromium", X_OK) == 0) {
        char cmd[2000];
        snprintf(cmd, sizeof(cmd),
                 "timeout 120 /usr/bin/chromium --headless --no-sandbox --disable-gpu "
                 "--disable-quic --no-first-run --disable-background-networking "
                 "--disable-component-update --disable-sync --user-data-dir='%s' "
                 "--screenshot='%s' --window-size=1200,900 'file://%s' >/dev/null 2>&1",
                 path_in("chrome-profile"), path_in("shot.png"), path_in("r.html"));
        ck_assert_int_eq(system(cmd), 0);
        size_t len;
        char *png = read_all(path_in("shot.png"), &len);
        ck_assert(len > 5000 && memcmp(png, "\x89PNG", 4) == 0);
        free(png);
    } else {
        fprintf(stderr, "test_report_html: /usr/bin/chromium absent, screenshot not checked\n");
    }
    remove_tmpdir();
    free(h);
    embz_report_clear(r);
    embz_plot_clear(fig);
}
END_TEST

START_TEST(test_report_md_tex)
{
    embz_plot_t fig;
    embz_report_t r;
    embz_err_t err;
    char *m, *t;
    sample_figure(fig);
    sample_report(r, fig);
    ck_assert_int_eq(embz_report_markdown(&m, r, &err), EMBZ_OK);
    ck_assert_int_eq(embz_report_latex(&t, r, &err), EMBZ_OK);
    const char *nums[] = { "0.0478318", "0.00300954", "1.234567890e+451", "1499", "0.0031",
                           "0.293107062" };
    for (size_t k = 0; k < sizeof(nums) / sizeof(nums[0]); k++) {
        ck_assert_msg(strstr(m, nums[k]) != NULL, "md: %s missing", nums[k]);
        ck_assert_msg(strstr(t, nums[k]) != NULL, "tex: %s missing", nums[k]);
    }
    /* Markdown: three tables (key, classification, errors and sizes), each with one row per
     * family plus head and rule and the same column count in every row */
    int rows = 0, cols = -1, tables = 0;
    const int want_cols[3] = { 1 + 5, 1 + 6, 1 + 1 + 2 + 2 };
    for (char *line = m; line && *line; ) {
        char *e = strchr(line, '\n');
        if (line[0] == '|') {
            int c = 0;
            for (char *p = line; p < (e ? e : line + strlen(line)); p++)
                if (*p == '|' && (p == line || p[-1] != '\\'))
                    c++;
            if (cols < 0)
                cols = c;
            ck_assert_int_eq(c, cols);
            rows++;
        } else if (cols >= 0) {
            ck_assert_int_lt(tables, 3);
            ck_assert_int_eq(rows, 4);
            ck_assert_int_eq(cols, want_cols[tables]);
            tables++;
            rows = 0;
            cols = -1;
        }
        line = e ? e + 1 : NULL;
    }
    ck_assert_int_eq(tables, 3);
    /* the key table links each name to its notes, which carry the anchor */
    ck_assert_ptr_nonnull(strstr(m, "| [inverse](#fam-1) |"));
    ck_assert_ptr_nonnull(strstr(m, "<a id=\"fam-1\"></a>"));
    ck_assert_ptr_nonnull(strstr(m, "\\<script\\>"));
    for (const char *p = m; (p = strchr(p, '<')) != NULL; p++)
        ck_assert(!strncmp(p, "<a id=\"fam-", 11) || (!strncmp(p, "</a>", 4) && p[-1] == '>')
                  || (p > m && p[-1] == '\\'));
    /* LaTeX: booktabs rules, sizes as math, specials escaped */
    ck_assert_ptr_nonnull(strstr(t, "\\toprule"));
    ck_assert_ptr_nonnull(strstr(t, "\\midrule"));
    ck_assert_ptr_nonnull(strstr(t, "\\bottomrule"));
    ck_assert_ptr_nonnull(strstr(t, "$10^{100}$"));
    ck_assert_ptr_nonnull(strstr(t, "i\\textasciicircum{}a\\_1 \\% \\{x\\} \\& \\$y\\$ \\# "
                                    "\\textasciitilde{}"));
    ck_assert_ptr_nonnull(strstr(t, "\\textless{}script\\textgreater{}"));
    /* the key table: 2 rows of 5 columns */
    int amp = 0;
    const char *end = strstr(t, "\\bottomrule");
    for (const char *p = strstr(t, "\\midrule"); p && (p = strchr(p, '&')) != NULL && p < end;
         p++)
        if (p[-1] != '\\')
            amp++;
    ck_assert_int_eq(amp, 2 * 4);
    /* the notes' powers: LaTeX math in LaTeX, Unicode superscripts in Markdown */
    ck_assert_ptr_nonnull(strstr(t, "$(\\ln n)^{-g}$"));
    ck_assert_ptr_nonnull(strstr(t, "$x^{-1-0.1}$"));
    ck_assert_ptr_nonnull(strstr(t, "$x^{-1}$"));
    ck_assert_ptr_nonnull(strstr(t, "$\\mathrm{OPT}_{n}$"));
    ck_assert_ptr_nonnull(strstr(t, "$10^{60}$"));
    ck_assert_ptr_nonnull(strstr(m, "(ln n)\xe2\x81\xbb\xe1\xb5\x8d"));
    ck_assert_ptr_nonnull(strstr(m, "x\xe2\x81\xbb\xc2\xb9;"));
    ck_assert_ptr_nonnull(strstr(m, "OPT\xe2\x82\x99"));
    ck_assert_ptr_nonnull(strstr(m, "10\xe2\x81\xb6\xe2\x81\xb0"));
    ck_assert_ptr_nonnull(strstr(m, "x^(-1-0.1)"));   /* no superscript for '.': as written */
    ck_assert_ptr_nonnull(strstr(t, "\\documentclass"));
    ck_assert_ptr_nonnull(strstr(t, "\\end{document}"));
    ck_assert_ptr_nonnull(strstr(t, "\\hyperref[fam-1]{inverse}"));
    ck_assert_ptr_nonnull(strstr(t, "\\label{fam-1}"));
    free(m);
    free(t);
    embz_report_clear(r);
    embz_plot_clear(fig);
}
END_TEST

START_TEST(test_report_pdf)
{
    embz_plot_t fig;
    embz_report_t r;
    embz_err_t err;
    make_tmpdir();
    sample_figure(fig);
    sample_report(r, fig);
    ck_assert_int_eq(embz_report_write(r, path_in("r.pdf"), EMBZ_REPORT_PDF, &err), EMBZ_OK);
    ck_assert_int_eq(embz_report_write(r, path_in("r.md"), EMBZ_REPORT_MD, &err), EMBZ_OK);
    ck_assert_int_eq(embz_report_write(r, path_in("r.tex"), EMBZ_REPORT_TEX, &err), EMBZ_OK);
    size_t len;
    char *s = read_all(path_in("r.pdf"), &len);
    ck_assert(len > 1000 && memcmp(s, "%PDF-", 5) == 0);
    free(s);
    if (access("/usr/bin/pdftoppm", X_OK) == 0) {
        char cmd[800];
        snprintf(cmd, sizeof(cmd), "pdftoppm -r 50 -png '%s' '%s' 2>'%s'", path_in("r.pdf"),
                 path_in("page"), path_in("pdferr"));
        ck_assert_int_eq(system(cmd), 0);
        char *e = read_all(path_in("pdferr"), &len);
        ck_assert_msg(len == 0, "pdftoppm said: %s", e);
        free(e);
        ck_assert_int_eq(access(path_in("page-1.png"), R_OK), 0);
    }
    /* interrupted writes of every format leave the previous file alone */
    for (int fmt = 0; fmt < 4; fmt++) {
        write_text(path_in("old.doc"), "previous");
        r->fail_after = 100;
        ck_assert_int_eq(embz_report_write(r, path_in("old.doc"), fmt, &err), EMBZ_ERR_IO);
        s = read_all(path_in("old.doc"), NULL);
        ck_assert_str_eq(s, "previous");
        free(s);
    }
    DIR *d = opendir(tmpdir);
    struct dirent *de;
    while ((de = readdir(d)) != NULL)
        ck_assert_msg(strstr(de->d_name, ".part-") == NULL, "left over: %s", de->d_name);
    closedir(d);
    ck_assert_int_eq(embz_report_format_from_name("HTML"), EMBZ_REPORT_HTML);
    ck_assert_int_eq(embz_report_format_from_name("latex"), EMBZ_REPORT_TEX);
    ck_assert_int_eq(embz_report_format_from_name("doc"), -1);
    remove_tmpdir();
    embz_report_clear(r);
    embz_plot_clear(fig);
}
END_TEST

/* cairo keeps font caches for the life of the process; free them after each test so that
 * leak checkers see only our own allocations */
static void release_caches(void)
{
    embz_render_release_caches();
}

static Suite *render_suite(void)
{
    Suite *s = suite_create("render");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 300);
    tcase_add_checked_fixture(tc, NULL, release_caches);
    tcase_add_test(tc, test_ticks_log_wide);
    tcase_add_test(tc, test_ticks_random);
    tcase_add_test(tc, test_ticks_linear_values);
    tcase_add_test(tc, test_palette_cvd);
    tcase_add_test(tc, test_plot_files);
    tcase_add_test(tc, test_svg_inline);
    tcase_add_test(tc, test_atomic);
    tcase_add_test(tc, test_escape_random);
    tcase_add_test(tc, test_report_html);
    tcase_add_test(tc, test_report_md_tex);
    tcase_add_test(tc, test_report_pdf);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    SRunner *sr = srunner_create(render_suite());
    srunner_run_all(sr, CK_NORMAL);
    int failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    flint_cleanup();
    return failed != 0;
}
