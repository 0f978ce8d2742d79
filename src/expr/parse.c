/* Lexer and recursive-descent parser for weight expressions, and exact number parsing.
 *
 * Grammar (lowest precedence first):
 *   expr    := term   (('+' | '-') term)*
 *   term    := unary  (('*' | '/') unary)*
 *   unary   := ('-' | '+') unary | power
 *   power   := primary ('^' unary)?          right-associative; "2^-1" allowed
 *   primary := number | name | name '(' expr (',' expr)* ')' | '(' expr ')'
 * Every recursion step that can nest (parentheses, call arguments, unary signs, exponents)
 * passes through enter(), which refuses to go deeper than EMBZ_EXPR_MAX_DEPTH before the
 * recursive call is made, so the C stack stays bounded whatever the input. */
#include <ctype.h>
#include <stdlib.h>
#include <string.h>
#include "expr_impl.h"

enum { T_END, T_NUM, T_IDENT, T_PLUS, T_MINUS, T_STAR, T_SLASH, T_CARET,
       T_LPAREN, T_RPAREN, T_COMMA, T_BAD, T_BADNUM, T_BIGNUM };

typedef struct {
    int kind;
    long start, end;          /* byte offsets [start, end) */
} token_t;

typedef struct {
    const char *s;
    long len, pos;
    token_t tok, prev;        /* current token and the one consumed before it */
    int have_prev;
    embz_expr_struct *e;
    const char *const *params;
    long nparams;
    embz_err_t *err;
    int depth;
    int failed;
    fmpq_t numval;            /* value of the current T_NUM token */
} parser_t;

/* ------------------------------------------------------------------ numbers */

int _embz_number_scan(fmpq_t val, long *end, const char *s)
{
    long p = 0, digits_start, ndig = 0, nfrac = 0;
    while (isdigit((unsigned char) s[p])) { p++; ndig++; }
    if (s[p] == '.' && isdigit((unsigned char) s[p + 1])) {
        p++;
        while (isdigit((unsigned char) s[p])) { p++; nfrac++; }
    }
    if (ndig + nfrac == 0) return 1;
    long mant_end = p;
    long ex = 0;
    if ((s[p] == 'e' || s[p] == 'E')) {
        long q = p + 1;
        int neg = 0;
        if (s[q] == '+' || s[q] == '-') { neg = (s[q] == '-'); q++; }
        if (isdigit((unsigned char) s[q])) {
            int big = 0;
            while (isdigit((unsigned char) s[q])) {
                if (!big) {
                    ex = 10 * ex + (s[q] - '0');
                    if (ex > EMBZ_NUMBER_MAX_EXP) big = 1;
                }
                q++;
            }
            if (big) { *end = q; return 2; }
            if (neg) ex = -ex;
            p = q;
        }
    }
    /* mantissa digits without the point */
    char *buf = malloc((size_t) (ndig + nfrac + 1));
    if (buf == NULL) abort();
    long b = 0;
    digits_start = 0;
    for (long k = digits_start; k < mant_end; k++)
        if (s[k] != '.') buf[b++] = s[k];
    buf[b] = '\0';
    fmpz_t m, t;
    fmpz_init(m); fmpz_init(t);
    fmpz_set_str(m, buf, 10);
    free(buf);
    ex -= nfrac;
    fmpz_set_ui(t, 10);
    if (ex >= 0) {
        fmpz_pow_ui(t, t, (ulong) ex);
        fmpz_mul(m, m, t);
        fmpz_swap(fmpq_numref(val), m);
        fmpz_one(fmpq_denref(val));
    } else {
        fmpz_pow_ui(t, t, (ulong) (-ex));
        fmpq_set_fmpz_frac(val, m, t);   /* canonicalises */
    }
    fmpz_clear(m); fmpz_clear(t);
    *end = p;
    return 0;
}

int embz_number_parse(fmpq_t res, const char *s)
{
    long p = 0, end;
    int neg = 0;
    fmpq_t v, w;
    while (isspace((unsigned char) s[p])) p++;
    if (s[p] == '+' || s[p] == '-') { neg = (s[p] == '-'); p++; }
    fmpq_init(v); fmpq_init(w);
    if (_embz_number_scan(v, &end, s + p) != 0) goto fail;
    p += end;
    if (s[p] == '/') {
        /* p/q form: both parts plain non-negative integers, q > 0 */
        if (!fmpz_is_one(fmpq_denref(v))) goto fail;
        for (long k = 0; k < end; k++)
            if (!isdigit((unsigned char) s[p - end + k])) goto fail;
        p++;
        long q0 = p;
        while (isdigit((unsigned char) s[p])) p++;
        if (p == q0 || p - q0 > 100000) goto fail;
        if (_embz_number_scan(w, &end, s + q0) != 0 || end != p - q0) goto fail;
        if (fmpq_is_zero(w)) goto fail;
        fmpq_div(v, v, w);
    }
    while (isspace((unsigned char) s[p])) p++;
    if (s[p] != '\0') goto fail;
    if (neg) fmpq_neg(v, v);
    fmpq_set(res, v);
    fmpq_clear(v); fmpq_clear(w);
    return EMBZ_OK;
fail:
    fmpq_clear(v); fmpq_clear(w);
    return EMBZ_ERR_INPUT;
}

int embz_number_out_of_range(const char *s)
{
    long p = 0, end;
    fmpq_t v;
    while (isspace((unsigned char) s[p])) p++;
    if (s[p] == '+' || s[p] == '-') p++;
    fmpq_init(v);
    int r = _embz_number_scan(v, &end, s + p);
    fmpq_clear(v);
    if (r != 2) return 0;
    p += end;
    while (isspace((unsigned char) s[p])) p++;
    return s[p] == '\0';
}

/* ------------------------------------------------------------------ lexer */

static int is_ident_start(int c) { return isalpha(c) || c == '_'; }
static int is_ident_char(int c) { return isalnum(c) || c == '_'; }

static void next(parser_t *P)
{
    const char *s = P->s;
    long p = P->pos;
    P->prev = P->tok;
    P->have_prev = 1;
    while (p < P->len && isspace((unsigned char) s[p])) p++;
    P->tok.start = p;
    if (p >= P->len) { P->tok.kind = T_END; P->tok.end = p; P->pos = p; return; }
    int c = (unsigned char) s[p];
    if (isdigit(c) || (c == '.' && isdigit((unsigned char) s[p + 1]))) {
        long end;
        int r = _embz_number_scan(P->numval, &end, s + p);
        p += end;
        if (r == 2) P->tok.kind = T_BIGNUM;
        else if (p < P->len && (is_ident_char((unsigned char) s[p]) || s[p] == '.')) {
            while (p < P->len && (is_ident_char((unsigned char) s[p]) || s[p] == '.')) p++;
            P->tok.kind = T_BADNUM;
        } else P->tok.kind = T_NUM;
    } else if (is_ident_start(c)) {
        while (p < P->len && is_ident_char((unsigned char) s[p])) p++;
        P->tok.kind = T_IDENT;
    } else {
        /* an unexpected character is one token however many bytes it takes in UTF-8 */
        int l = c >= 0x80 ? embz_utf8_len(s + p) : 1;
        p += l > 1 ? l : 1;
        switch (c) {
        case '+': P->tok.kind = T_PLUS; break;
        case '-': P->tok.kind = T_MINUS; break;
        case '*': P->tok.kind = T_STAR; break;
        case '/': P->tok.kind = T_SLASH; break;
        case '^': P->tok.kind = T_CARET; break;
        case '(': P->tok.kind = T_LPAREN; break;
        case ')': P->tok.kind = T_RPAREN; break;
        case ',': P->tok.kind = T_COMMA; break;
        default: P->tok.kind = T_BAD; break;
        }
    }
    P->tok.end = p;
    P->pos = p;
}

/* ------------------------------------------------------------------ errors */

static int fail(parser_t *P, long col, const char *fmt, const char *arg)
{
    if (P->failed) return -1;
    P->failed = 1;
    if (P->err != NULL) {
        P->err->col = col;
        embz_err_set(P->err, EMBZ_ERR_INPUT, fmt, arg);
    }
    return -1;
}

/* Printable copy of a token's text (at most 40 bytes of it; control bytes and bytes
 * outside well-formed UTF-8 escaped). */
static void tok_text(char *buf, size_t cap, const parser_t *P, const token_t *t)
{
    long l = t->end - t->start;
    if (t->kind == T_END) { snprintf(buf, cap, "end of input"); return; }
    char *piece = malloc((size_t) l + 1);
    if (piece == NULL) abort();
    memcpy(piece, P->s + t->start, (size_t) l);
    piece[l] = '\0';
    embz_err_quote(buf, cap, piece, 40);
    free(piece);
}

static int fail_tok(parser_t *P, const token_t *t, const char *fmt)
{
    char buf[200];
    tok_text(buf, sizeof(buf), P, t);
    return fail(P, t->start + 1, fmt, buf);
}

/* Error for a token that cannot start an operand. */
static int fail_operand(parser_t *P)
{
    switch (P->tok.kind) {
    case T_END:
        if (P->have_prev) return fail_tok(P, &P->prev, "missing operand after '%s'");
        return fail(P, 1, "empty expression%s", "");
    case T_BAD: return fail_tok(P, &P->tok, "unexpected character '%s'");
    case T_BADNUM: return fail_tok(P, &P->tok, "malformed number '%s'");
    case T_BIGNUM: return fail_tok(P, &P->tok, "number '%s' is out of range");
    default: return fail_tok(P, &P->tok, "missing operand before '%s'");
    }
}

/* Error for a token that follows a complete operand but cannot continue the expression.
 * open_col: column of the innermost unclosed '(' (0 at top level). */
static int fail_after_operand(parser_t *P, long open_col)
{
    switch (P->tok.kind) {
    case T_END: return fail(P, open_col, "missing ')' for this '('%s", "");
    case T_RPAREN: return fail_tok(P, &P->tok, "unmatched '%s'");
    case T_COMMA: return fail_tok(P, &P->tok, "unexpected '%s'");
    case T_BAD: return fail_tok(P, &P->tok, "unexpected character '%s'");
    case T_BADNUM: return fail_tok(P, &P->tok, "malformed number '%s'");
    default: return fail_tok(P, &P->tok, "expected an operator before '%s'");
    }
}

static int enter(parser_t *P)
{
    if (P->depth >= EMBZ_EXPR_MAX_DEPTH) {
        char buf[32];
        snprintf(buf, sizeof(buf), "%d", EMBZ_EXPR_MAX_DEPTH);
        fail(P, P->tok.start + 1, "expression nested too deeply (limit %s levels)", buf);
        return 0;
    }
    P->depth++;
    return 1;
}

static int node(parser_t *P, int op, int a, int b, long col)
{
    int k = _embz_expr_push(P->e, op, a, b, col);
    if (k < 0) {
        if (!P->failed && P->err != NULL) {
            P->err->col = 0;
            embz_err_set(P->err, EMBZ_ERR_NOMEM, "out of memory");
        }
        P->failed = 1;
    }
    return k;
}

/* ------------------------------------------------------------------ grammar */

static int parse_expr(parser_t *P);
static int parse_unary(parser_t *P);

static const struct { const char *name; int op; int nargs; } functions[] = {
    {"log", EMBZ_OP_LOG, 1}, {"log2", EMBZ_OP_LOG2, 1}, {"log10", EMBZ_OP_LOG10, 1},
    {"exp", EMBZ_OP_EXP, 1}, {"sqrt", EMBZ_OP_SQRT, 1}, {"abs", EMBZ_OP_ABS, 1},
    {"lgamma", EMBZ_OP_LGAMMA, 1}, {"atan", EMBZ_OP_ATAN, 1}, {"sin", EMBZ_OP_SIN, 1},
    {"cos", EMBZ_OP_COS, 1}, {"floor", EMBZ_OP_FLOOR, 1}, {"min", EMBZ_OP_MIN, 2},
    {"max", EMBZ_OP_MAX, 2}, {"pow", EMBZ_OP_POW, 2}, {"ceil", EMBZ_OP_CEIL, 1},
    {"binom", EMBZ_OP_BINOM, 2},
};
static const struct { const char *name; int op; } names[] = {
    {"i", EMBZ_OP_I}, {"n", EMBZ_OP_N}, {"pi", EMBZ_OP_PI}, {"e", EMBZ_OP_E},
    {"euler", EMBZ_OP_GAMMA}, {"gamma", EMBZ_OP_GAMMA},
};

static int tok_is(const parser_t *P, const char *w)
{
    long l = P->tok.end - P->tok.start;
    return (long) strlen(w) == l && strncmp(P->s + P->tok.start, w, (size_t) l) == 0;
}

static int reserved_name(const char *w)
{
    for (size_t k = 0; k < sizeof(functions) / sizeof(functions[0]); k++)
        if (strcmp(w, functions[k].name) == 0) return 1;
    for (size_t k = 0; k < sizeof(names) / sizeof(names[0]); k++)
        if (strcmp(w, names[k].name) == 0) return 1;
    return 0;
}

static int parse_call(parser_t *P, int fi, token_t name)
{
    int args[3] = {-1, -1, -1};
    int nargs = 0;
    token_t open;
    next(P);               /* '(' */
    open = P->tok;
    next(P);
    if (P->tok.kind == T_RPAREN) {
        nargs = 0;
    } else {
        for (;;) {
            if (!enter(P)) return -1;
            int a = parse_expr(P);
            P->depth--;
            if (a < 0) return -1;
            if (nargs < 3) args[nargs] = a;
            nargs++;
            if (P->tok.kind == T_COMMA) { next(P); continue; }
            if (P->tok.kind == T_RPAREN) break;
            return fail_after_operand(P, open.start + 1);
        }
    }
    if (nargs != functions[fi].nargs) {
        char buf[80];
        snprintf(buf, sizeof(buf), "'%s' takes %d argument%s, not %d", functions[fi].name,
                 functions[fi].nargs, functions[fi].nargs == 1 ? "" : "s", nargs);
        return fail(P, name.start + 1, "%s", buf);
    }
    next(P);               /* ')' */
    return node(P, functions[fi].op, args[0], args[1], name.start + 1);
}

static int parse_primary(parser_t *P)
{
    token_t t = P->tok;
    if (t.kind == T_NUM) {
        int k = node(P, EMBZ_OP_NUM, -1, -1, t.start + 1);
        if (k < 0) return -1;
        fmpq_set(P->e->nodes[k].num, P->numval);
        next(P);
        return k;
    }
    if (t.kind == T_LPAREN) {
        if (!enter(P)) return -1;
        next(P);
        int a = parse_expr(P);
        P->depth--;
        if (a < 0) return -1;
        if (P->tok.kind != T_RPAREN) return fail_after_operand(P, t.start + 1);
        next(P);
        return a;
    }
    if (t.kind == T_IDENT) {
        /* function? */
        for (size_t f = 0; f < sizeof(functions) / sizeof(functions[0]); f++) {
            if (tok_is(P, functions[f].name)) {
                long p = t.end;
                while (p < P->len && isspace((unsigned char) P->s[p])) p++;
                if (p >= P->len || P->s[p] != '(') {
                    char buf[64];
                    snprintf(buf, sizeof(buf), "'%s' is a function: write %s(...)",
                             functions[f].name, functions[f].name);
                    return fail(P, t.start + 1, "%s", buf);
                }
                return parse_call(P, (int) f, t);
            }
        }
        for (size_t v = 0; v < sizeof(names) / sizeof(names[0]); v++) {
            if (tok_is(P, names[v].name)) {
                if (tok_is(P, "gamma")) {
                    /* Euler's constant under its old name; never the Gamma function */
                    long p = t.end;
                    while (p < P->len && isspace((unsigned char) P->s[p])) p++;
                    if (p < P->len && P->s[p] == '(')
                        return fail(P, t.start + 1, "%s", "'gamma' is not a function here: for "
                                    "the Gamma function write exp(lgamma(x)); Euler's "
                                    "constant is 'euler'");
                    P->e->notes |= EMBZ_EXPR_NOTE_OLD_GAMMA;
                }
                next(P);
                return node(P, names[v].op, -1, -1, t.start + 1);
            }
        }
        for (long k = 0; k < P->nparams; k++) {
            if (tok_is(P, P->params[k])) {
                next(P);
                int j = node(P, EMBZ_OP_PARAM, -1, -1, t.start + 1);
                if (j >= 0) P->e->nodes[j].param = (int) k;
                return j;
            }
        }
        return fail_tok(P, &t, "unknown name '%s'");
    }
    return fail_operand(P);
}

static int parse_power(parser_t *P)
{
    int a = parse_primary(P);
    if (a < 0) return -1;
    if (P->tok.kind != T_CARET) return a;
    long col = P->tok.start + 1;
    if (!enter(P)) return -1;
    next(P);
    int b = parse_unary(P);
    P->depth--;
    if (b < 0) return -1;
    return node(P, EMBZ_OP_POW, a, b, col);
}

static int parse_unary(parser_t *P)
{
    if (P->tok.kind == T_MINUS || P->tok.kind == T_PLUS) {
        token_t t = P->tok;
        if (!enter(P)) return -1;
        next(P);
        int a = parse_unary(P);
        P->depth--;
        if (a < 0) return -1;
        if (t.kind == T_PLUS) return a;
        return node(P, EMBZ_OP_NEG, a, -1, t.start + 1);
    }
    return parse_power(P);
}

static int parse_term(parser_t *P)
{
    int a = parse_unary(P);
    while (a >= 0 && (P->tok.kind == T_STAR || P->tok.kind == T_SLASH)) {
        int op = P->tok.kind == T_STAR ? EMBZ_OP_MUL : EMBZ_OP_DIV;
        long col = P->tok.start + 1;
        next(P);
        int b = parse_unary(P);
        if (b < 0) return -1;
        a = node(P, op, a, b, col);
    }
    return a;
}

static int parse_expr(parser_t *P)
{
    int a = parse_term(P);
    while (a >= 0 && (P->tok.kind == T_PLUS || P->tok.kind == T_MINUS)) {
        int op = P->tok.kind == T_PLUS ? EMBZ_OP_ADD : EMBZ_OP_SUB;
        long col = P->tok.start + 1;
        next(P);
        int b = parse_term(P);
        if (b < 0) return -1;
        a = node(P, op, a, b, col);
    }
    return a;
}

static int valid_param_name(const char *w)
{
    if (w == NULL || !is_ident_start((unsigned char) w[0])) return 0;
    for (const char *c = w; *c; c++)
        if (!is_ident_char((unsigned char) *c)) return 0;
    return !reserved_name(w);
}

int embz_expr_parse(embz_expr_t e, const char *text,
                    const char *const *params, long nparams, embz_err_t *err)
{
    parser_t P;
    size_t tl;

    embz_expr_clear(e);
    if (text == NULL) {
        if (err != NULL) {
            embz_err_clear(err);
            embz_err_set(err, EMBZ_ERR_INPUT, "no expression given");
        }
        return EMBZ_ERR_INPUT;
    }
    tl = strlen(text);
    if (err != NULL) {
        embz_err_clear(err);
        if (tl < sizeof(err->source)) memcpy(err->source, text, tl + 1);
    }
    if (tl > EMBZ_EXPR_MAX_LEN) {
        if (err != NULL) {
            err->source[0] = '\0';
            err->col = 0;
            embz_err_set(err, EMBZ_ERR_INPUT,
                         "expression too long (%zu characters; the limit is %d)",
                         tl, EMBZ_EXPR_MAX_LEN);
        }
        return EMBZ_ERR_INPUT;
    }
    for (long k = 0; k < nparams; k++) {
        int dup = 0;
        for (long j = 0; j < k; j++)
            if (strcmp(params[j], params[k]) == 0) dup = 1;
        if (!valid_param_name(params[k]) || dup) {
            if (err != NULL) {
                err->col = 0;
                embz_err_set(err, EMBZ_ERR_INPUT, "%s parameter name '%s'",
                             dup ? "duplicate" : "invalid", params[k] ? params[k] : "(null)");
            }
            return EMBZ_ERR_INPUT;
        }
    }

    memset(&P, 0, sizeof(P));
    P.s = text;
    P.len = (long) tl;
    P.e = e;
    P.params = params;
    P.nparams = nparams;
    P.err = err;
    fmpq_init(P.numval);
    P.tok.kind = T_END;
    P.tok.end = 0;
    next(&P);
    P.have_prev = 0;

    int root = -1;
    if (enter(&P)) {
        root = parse_expr(&P);
        P.depth--;
    }
    if (root >= 0 && P.tok.kind != T_END)
        root = fail_after_operand(&P, 0);
    fmpq_clear(P.numval);

    if (root < 0) {
        int code = (err != NULL) ? err->code : EMBZ_ERR_INPUT;
        if (err != NULL && err->col > 0 && (size_t) err->col > sizeof(err->source) - 1) {
            /* the caret display needs the whole line; keep the column in the message */
            char msg[sizeof(err->text)];
            snprintf(msg, sizeof(msg), "%s", err->text);
            err->source[0] = '\0';
            embz_err_set(err, code, "%.400s (at column %ld)", msg, err->col);
        }
        embz_expr_clear(e);
        return code == EMBZ_OK ? EMBZ_ERR_INPUT : code;
    }
    e->root = root;
    if (nparams > 0) {
        e->params = malloc((size_t) nparams * sizeof(char *));
        if (e->params == NULL) abort();
        for (long k = 0; k < nparams; k++) {
            size_t l = strlen(params[k]) + 1;
            e->params[k] = malloc(l);
            if (e->params[k] == NULL) abort();
            memcpy(e->params[k], params[k], l);
        }
        e->nparams = nparams;
    }
    if (err != NULL) err->source[0] = '\0';
    return EMBZ_OK;
}
