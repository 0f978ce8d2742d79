/* Math in report text: the plain notation of the notes and laws ("x^-1", "(ln n)^-g",
 * "10^60", "x^(-1-0.1)", "OPT_n") found by one scanner and written as MathML (HTML), as
 * LaTeX math, or with Unicode super- and subscripts (PDF, drawn as plain text). Everything
 * outside a power or an index stays text, escaped for its format. */
#include <ctype.h>
#include <stdlib.h>
#include <string.h>
#include "render_impl.h"

static int word_char(char c)
{
    return isalnum((unsigned char) c) || c == '.';
}

/* The closing parenthesis matching s[open] == '(' (index), or -1. */
static long match_close(const char *s, long open)
{
    int depth = 0;
    for (long k = open; s[k]; k++) {
        depth += s[k] == '(';
        depth -= s[k] == ')';
        if (depth == 0)
            return k;
    }
    return -1;
}

/* The opening parenthesis matching s[close] == ')', or -1. */
static long match_open(const char *s, long close)
{
    int depth = 0;
    for (long k = close; k >= 0; k--) {
        depth += s[k] == ')';
        depth -= s[k] == '(';
        if (depth == 0)
            return k;
    }
    return -1;
}

int _embz_math_next(embz_math_span_t *m, const char *s, long from)
{
    for (long i = from; s[i]; i++) {
        char op = s[i];
        if (op != '^' && op != '_')
            continue;
        if (i == from || s[i + 1] == 0)
            continue;
        /* the base */
        long b0, b1 = i;
        if (s[i - 1] == ')') {
            b0 = match_open(s, i - 1);
            if (b0 < from)
                continue;
            while (b0 > from && isalpha((unsigned char) s[b0 - 1]))
                b0--;   /* a function name before its argument: log(i+1)^b */
        } else {
            b0 = i;
            while (b0 > from && word_char(s[b0 - 1]))
                b0--;
        }
        if (b0 == b1 || (op == '_' && !isalnum((unsigned char) s[i - 1])))
            continue;
        /* the exponent or index, parentheses dropped */
        long e0 = i + 1, e1, end;
        if (s[e0] == '(' && op == '^') {
            long c = match_close(s, e0);
            if (c < 0)
                continue;
            e0++;
            e1 = c;
            end = c + 1;
        } else {
            e1 = e0;
            if (op == '^' && (s[e1] == '-' || s[e1] == '+'))
                e1++;
            while (word_char(s[e1]))
                e1++;
            while (e1 > e0 && s[e1 - 1] == '.')
                e1--;   /* the full stop of a sentence */
            end = e1;
        }
        if (e1 == e0 || (e1 == e0 + 1 && (s[e0] == '-' || s[e0] == '+')))
            continue;
        if (op == '_' && !isalnum((unsigned char) s[e0]))
            continue;
        m->base0 = b0;
        m->base1 = b1;
        m->exp0 = e0;
        m->exp1 = e1;
        m->end = end;
        m->sub = op == '_';
        return 1;
    }
    return 0;
}

/* Writes s: the text between spans through escape, each span through span. */
static void write_spans(embz_buf_t *out, const char *s, char *(*escape)(const char *),
                        void (*span)(embz_buf_t *, const char *, const embz_math_span_t *))
{
    if (s == NULL)
        return;
    embz_math_span_t m;
    long at = 0;
    while (_embz_math_next(&m, s, at)) {
        char *pre = malloc(m.base0 - at + 1);
        memcpy(pre, s + at, m.base0 - at);
        pre[m.base0 - at] = 0;
        char *e = escape(pre);
        embz_buf_printf(out, "%s", e);
        free(e);
        free(pre);
        span(out, s, &m);
        at = m.end;
    }
    char *e = escape(s + at);
    embz_buf_printf(out, "%s", e);
    free(e);
}

/* ------------------------------------------------------------------ MathML */

/* Tokens of s[a..b) as MathML: names <mi>, numbers <mn>, the rest <mo>; spaces dropped. */
static void mathml_tokens(embz_buf_t *out, const char *s, long a, long b)
{
    embz_buf_printf(out, "<mrow>");
    for (long k = a; k < b;) {
        if (s[k] == ' ') {
            /* a space between two names stays a space: ln n */
            if (k > a && isalnum((unsigned char) s[k - 1]) && k + 1 < b
                && isalnum((unsigned char) s[k + 1]))
                embz_buf_printf(out, "<mspace width=\"0.25em\"></mspace>");
            k++;
            continue;
        }
        long j = k;
        if (isalpha((unsigned char) s[k])) {
            while (j < b && isalnum((unsigned char) s[j]))
                j++;
            embz_buf_printf(out, "<mi>%.*s</mi>", (int) (j - k), s + k);
        } else if (isdigit((unsigned char) s[k]) || s[k] == '.') {
            while (j < b && (isdigit((unsigned char) s[j]) || s[j] == '.'))
                j++;
            embz_buf_printf(out, "<mn>%.*s</mn>", (int) (j - k), s + k);
        } else if ((unsigned char) s[k] >= 0x80) {
            j = k + 1;
            while (j < b && ((unsigned char) s[j] & 0xc0) == 0x80)
                j++;
            embz_buf_printf(out, "<mi>%.*s</mi>", (int) (j - k), s + k);
        } else {
            j = k + 1;
            char one[2] = { s[k], 0 };
            char *e = embz_html_escape(one);
            if (s[k] == '-')
                embz_buf_printf(out, "<mo>\xe2\x88\x92</mo>");
            else if (s[k] == '*')
                embz_buf_printf(out, "<mo>\xc2\xb7</mo>");
            else
                embz_buf_printf(out, "<mo>%s</mo>", e);
            free(e);
        }
        k = j;
    }
    embz_buf_printf(out, "</mrow>");
}

static void mathml_span(embz_buf_t *out, const char *s, const embz_math_span_t *m)
{
    embz_buf_printf(out, "<math><%s>", m->sub ? "msub" : "msup");
    mathml_tokens(out, s, m->base0, m->base1);
    mathml_tokens(out, s, m->exp0, m->exp1);
    embz_buf_printf(out, "</%s></math>", m->sub ? "msub" : "msup");
}

void _embz_math_html(embz_buf_t *out, const char *s)
{
    write_spans(out, s, embz_html_escape, mathml_span);
}

/* ------------------------------------------------------------------ LaTeX */

static void tex_tokens(embz_buf_t *out, const char *s, long a, long b)
{
    for (long k = a; k < b;) {
        long j = k;
        if (isalpha((unsigned char) s[k])) {
            while (j < b && isalnum((unsigned char) s[j]))
                j++;
            int l = (int) (j - k);
            if ((l == 2 && !strncmp(s + k, "ln", 2)) || (l == 3 && !strncmp(s + k, "log", 3))
                || (l == 3 && !strncmp(s + k, "exp", 3)))
                embz_buf_printf(out, "\\%.*s%s", l, s + k,
                                j < b && isalnum((unsigned char) s[j]) ? " " : "");
            else if (l > 1)
                embz_buf_printf(out, "\\mathrm{%.*s}", l, s + k);
            else
                embz_buf_printf(out, "%c", s[k]);
        } else if ((unsigned char) s[k] >= 0x80) {
            j = k + 1;
            while (j < b && ((unsigned char) s[j] & 0xc0) == 0x80)
                j++;
            if (!strncmp(s + k, "\xcf\x88", 2))
                embz_buf_printf(out, "\\psi ");
            else if (!strncmp(s + k, "\xce\xb5", 2))
                embz_buf_printf(out, "\\varepsilon ");
            else if (!strncmp(s + k, "\xe2\x88\x92", 3))
                embz_buf_printf(out, "-");
            else
                embz_buf_printf(out, "?");
        } else {
            j = k + 1;
            switch (s[k]) {
            case '*': embz_buf_printf(out, "\\cdot "); break;
            case '{': case '}': case '#': case '$': case '%': case '&': case '_':
                embz_buf_printf(out, "\\%c", s[k]);
                break;
            case '\\': case '^': case '~': break;
            default: embz_buf_printf(out, "%c", s[k]);
            }
        }
        k = j;
    }
}

static void tex_span(embz_buf_t *out, const char *s, const embz_math_span_t *m)
{
    embz_buf_printf(out, "$");
    tex_tokens(out, s, m->base0, m->base1);
    embz_buf_printf(out, "%c{", m->sub ? '_' : '^');
    tex_tokens(out, s, m->exp0, m->exp1);
    embz_buf_printf(out, "}$");
}

void _embz_math_tex(embz_buf_t *out, const char *s)
{
    write_spans(out, s, embz_latex_escape, tex_span);
}

/* ------------------------------------------------------------------ Unicode */

/* Superscript and subscript forms of the characters that have one in Unicode (and in DejaVu
 * Sans); NULL when a character has none. */
static const char *sup_char(char c)
{
    static const char *const digits[10] = {
        "\xe2\x81\xb0", "\xc2\xb9", "\xc2\xb2", "\xc2\xb3", "\xe2\x81\xb4",
        "\xe2\x81\xb5", "\xe2\x81\xb6", "\xe2\x81\xb7", "\xe2\x81\xb8", "\xe2\x81\xb9" };
    if (c >= '0' && c <= '9')
        return digits[c - '0'];
    switch (c) {
    case '-': return "\xe2\x81\xbb";
    case '+': return "\xe2\x81\xba";
    case '(': return "\xe2\x81\xbd";
    case ')': return "\xe2\x81\xbe";
    case 'n': return "\xe2\x81\xbf";
    case 'i': return "\xe2\x81\xb1";
    case 'a': return "\xe1\xb5\x83";
    case 'b': return "\xe1\xb5\x87";
    case 'g': return "\xe1\xb5\x8d";
    case 'p': return "\xe1\xb5\x96";
    case 'k': return "\xe1\xb5\x8f";
    case 'j': return "\xca\xb2";
    case 'x': return "\xcb\xa3";
    case 'r': return "\xca\xb3";
    case ' ': return "";
    default: return NULL;
    }
}

static const char *sub_char(char c)
{
    static const char *const digits[10] = {
        "\xe2\x82\x80", "\xe2\x82\x81", "\xe2\x82\x82", "\xe2\x82\x83", "\xe2\x82\x84",
        "\xe2\x82\x85", "\xe2\x82\x86", "\xe2\x82\x87", "\xe2\x82\x88", "\xe2\x82\x89" };
    if (c >= '0' && c <= '9')
        return digits[c - '0'];
    switch (c) {
    case 'n': return "\xe2\x82\x99";
    case 'd': return NULL;
    case 'i': return "\xe1\xb5\xa2";
    case 'j': return "\xe2\xb1\xbc";
    case 'k': return "\xe2\x82\x96";
    case 'm': return "\xe2\x82\x98";
    default: return NULL;
    }
}

char *_embz_math_unicode(const char *s)
{
    embz_buf_t out;
    embz_buf_init(&out);
    if (s == NULL)
        return out.s;
    embz_math_span_t m;
    long at = 0;
    while (_embz_math_next(&m, s, at)) {
        int ok = 1;
        for (long k = m.exp0; k < m.exp1 && ok; k++)
            ok = (m.sub ? sub_char(s[k]) : sup_char(s[k])) != NULL;
        if (!ok) {   /* keep the plain notation, which stays readable */
            embz_buf_printf(&out, "%.*s", (int) (m.end - at), s + at);
            at = m.end;
            continue;
        }
        embz_buf_printf(&out, "%.*s", (int) (m.base1 - at), s + at);
        for (long k = m.exp0; k < m.exp1; k++)
            embz_buf_printf(&out, "%s", m.sub ? sub_char(s[k]) : sup_char(s[k]));
        at = m.end;
    }
    embz_buf_printf(&out, "%s", s + at);
    return out.s;
}
