/* Tests of the expression module: parser, printer, binding, and the four evaluators.
 * References: FLINT exact rationals (fmpq) for rational expressions; arb's own elementary
 * functions for transcendental values; closed-form Taylor coefficients; values marked
 * [memory] are standard constants recalled from memory. */
#include <check.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "embz/expr.h"

static const char *PARAMS[] = {"a", "b"};

/* ------------------------------------------------------------------ helpers */

static void parse_ok(embz_expr_t e, const char *text)
{
    embz_err_t err;
    int s = embz_expr_parse(e, text, PARAMS, 2, &err);
    ck_assert_msg(s == EMBZ_OK, "parse of '%s' failed: %s (col %ld)", text, err.text, err.col);
}

/* arb evaluation at integer i, n */
static int eval_at(arb_t r, const embz_expr_t e, slong i, slong n, slong prec)
{
    arb_t ai, an;
    int s;
    arb_init(ai); arb_init(an);
    arb_set_si(ai, i);
    arb_set_si(an, n);
    s = embz_expr_eval_arb(r, e, ai, an, prec);
    arb_clear(ai); arb_clear(an);
    return s;
}

/* ------------------------------------------------------------------ random trees
 * The tests build their own random trees, render them as fully parenthesised text with
 * random blanks, and compare what the parser produces against the tree. */

typedef struct { int op, a, b, param; fmpq_t num; char numtext[48]; } tnode_t;
typedef struct { tnode_t nd[512]; int len; } ttree_t;

typedef struct { flint_rand_t st; } rng_t;

static int tpush(ttree_t *t, int op, int a, int b)
{
    tnode_t *x = t->nd + t->len;
    x->op = op; x->a = a; x->b = b; x->param = -1;
    fmpq_init(x->num);
    x->numtext[0] = '\0';
    return t->len++;
}

static void tclear(ttree_t *t)
{
    for (int k = 0; k < t->len; k++) fmpq_clear(t->nd[k].num);
    t->len = 0;
}

/* a random non-negative number literal with its exact value */
static int tnum(ttree_t *t, flint_rand_t st, int maxint)
{
    int k = tpush(t, EMBZ_OP_NUM, -1, -1);
    tnode_t *x = &t->nd[k];
    fmpq *val = t->nd[k].num;
    ulong m = n_randint(st, (ulong) maxint * 100 + 1);
    int form = (int) n_randint(st, 4);
    fmpz_t d;
    fmpz_init(d);
    if (form == 0) {             /* integer */
        m /= 100;
        snprintf(x->numtext, sizeof(x->numtext), "%lu", (unsigned long) m);
        fmpq_set_si(val, (slong) m, 1);
    } else if (form == 1) {      /* decimal with two places */
        snprintf(x->numtext, sizeof(x->numtext), "%lu.%02lu", (unsigned long) (m / 100),
                 (unsigned long) (m % 100));
        fmpq_set_si(val, (slong) m, 100);
    } else if (form == 2) {      /* mantissa with negative exponent */
        snprintf(x->numtext, sizeof(x->numtext), "%lue-2", (unsigned long) m);
        fmpq_set_si(val, (slong) m, 100);
    } else {                     /* decimal with positive exponent, upper-case E */
        snprintf(x->numtext, sizeof(x->numtext), "%lu.%02luE+1", (unsigned long) (m / 100),
                 (unsigned long) (m % 100));
        fmpq_set_si(val, (slong) m, 10);
    }
    fmpz_clear(d);
    return k;
}

/* Kinds of random trees: 0 any operation, 1 rational only (+ - * / neg, integer powers),
 * 2 smooth functions without abs/floor/min/max. */
static int tgen(ttree_t *t, flint_rand_t st, int depth, int kind)
{
    if (t->len > 480) depth = 0;
    if (depth == 0 || n_randint(st, 4) == 0) {
        int r = (int) n_randint(st, kind == 1 ? 4 : 8);
        switch (r) {
        case 0: case 1: return tpush(t, EMBZ_OP_I, -1, -1);
        case 2: return tpush(t, EMBZ_OP_N, -1, -1);
        case 3: return tnum(t, st, 10);
        case 4: return tpush(t, EMBZ_OP_PI, -1, -1);
        case 5: return tpush(t, EMBZ_OP_E, -1, -1);
        case 6: return tpush(t, EMBZ_OP_GAMMA, -1, -1);
        default: return tnum(t, st, 3);
        }
    }
    static const int rat_ops[] = {EMBZ_OP_ADD, EMBZ_OP_SUB, EMBZ_OP_MUL, EMBZ_OP_DIV,
                                  EMBZ_OP_NEG, EMBZ_OP_POW};
    static const int smooth_ops[] = {EMBZ_OP_ADD, EMBZ_OP_SUB, EMBZ_OP_MUL, EMBZ_OP_DIV,
        EMBZ_OP_NEG, EMBZ_OP_POW, EMBZ_OP_LOG, EMBZ_OP_LOG2, EMBZ_OP_LOG10, EMBZ_OP_EXP,
        EMBZ_OP_SQRT, EMBZ_OP_LGAMMA, EMBZ_OP_ATAN, EMBZ_OP_SIN, EMBZ_OP_COS, EMBZ_OP_ADD,
        EMBZ_OP_MUL};
    int op;
    if (kind == 1) op = rat_ops[n_randint(st, 6)];
    else if (kind == 2) op = smooth_ops[n_randint(st, sizeof(smooth_ops) / sizeof(int))];
    else   /* the operations up to max (ceil and binom: test_steps_binom) */
        op = (int) (EMBZ_OP_NEG + n_randint(st, EMBZ_OP_MAX + 1 - EMBZ_OP_NEG));
    if (op == EMBZ_OP_POW) {
        int a = tgen(t, st, depth - 1, kind);
        int b;
        if (kind == 0 && n_randint(st, 2)) b = tgen(t, st, depth - 1, kind);
        else if (kind != 1 && n_randint(st, 3) == 0) b = tnum(t, st, 2);
        else {
            /* integer exponent -3..4, sometimes written as a negated literal */
            slong k = (slong) n_randint(st, 8) - 3;
            b = tpush(t, EMBZ_OP_NUM, -1, -1);
            fmpq_set_si(t->nd[b].num, k < 0 ? -k : k, 1);
            snprintf(t->nd[b].numtext, sizeof(t->nd[b].numtext), "%ld", (long) (k < 0 ? -k : k));
            if (k < 0) b = tpush(t, EMBZ_OP_NEG, b, -1);
        }
        return tpush(t, EMBZ_OP_POW, a, b);
    }
    int a = tgen(t, st, depth - 1, kind);
    int b = -1;
    if (op == EMBZ_OP_ADD || op == EMBZ_OP_SUB || op == EMBZ_OP_MUL || op == EMBZ_OP_DIV ||
        op == EMBZ_OP_MIN || op == EMBZ_OP_MAX)
        b = tgen(t, st, depth - 1, kind);
    return tpush(t, op, a, b);
}

typedef struct { char *s; size_t len, cap; } tbuf_t;

static void tput(tbuf_t *b, const char *x)
{
    size_t l = strlen(x);
    if (b->len + l + 1 > b->cap) {
        b->cap = 2 * (b->len + l + 1);
        b->s = realloc(b->s, b->cap);
    }
    memcpy(b->s + b->len, x, l + 1);
    b->len += l;
}

static void tblank(tbuf_t *b, flint_rand_t st)
{
    int r = (int) n_randint(st, 6);
    if (r == 0) tput(b, " ");
    else if (r == 1) tput(b, "\t ");
}

static const char *fname(int op)
{
    switch (op) {
    case EMBZ_OP_LOG: return "log"; case EMBZ_OP_LOG2: return "log2";
    case EMBZ_OP_LOG10: return "log10"; case EMBZ_OP_EXP: return "exp";
    case EMBZ_OP_SQRT: return "sqrt"; case EMBZ_OP_ABS: return "abs";
    case EMBZ_OP_LGAMMA: return "lgamma"; case EMBZ_OP_ATAN: return "atan";
    case EMBZ_OP_SIN: return "sin"; case EMBZ_OP_COS: return "cos";
    case EMBZ_OP_FLOOR: return "floor"; case EMBZ_OP_MIN: return "min";
    case EMBZ_OP_MAX: return "max"; case EMBZ_OP_CEIL: return "ceil";
    default: return "?";
    }
}

/* fully parenthesised rendering with random blanks */
static void trender(tbuf_t *b, const ttree_t *t, int k, flint_rand_t st)
{
    const tnode_t *x = t->nd + k;
    tblank(b, st);
    switch (x->op) {
    case EMBZ_OP_NUM: tput(b, x->numtext); break;
    case EMBZ_OP_I: tput(b, "i"); break;
    case EMBZ_OP_N: tput(b, "n"); break;
    case EMBZ_OP_PARAM: tput(b, PARAMS[x->param]); break;
    case EMBZ_OP_PI: tput(b, "pi"); break;
    case EMBZ_OP_E: tput(b, "e"); break;
    case EMBZ_OP_GAMMA: tput(b, "gamma"); break;
    case EMBZ_OP_NEG: tput(b, "(-"); trender(b, t, x->a, st); tput(b, ")"); break;
    case EMBZ_OP_ADD: case EMBZ_OP_SUB: case EMBZ_OP_MUL: case EMBZ_OP_DIV:
    case EMBZ_OP_POW:
        if (x->op == EMBZ_OP_POW && n_randint(st, 4) == 0) {
            tput(b, "pow(");
            trender(b, t, x->a, st);
            tput(b, ",");
            trender(b, t, x->b, st);
            tput(b, ")");
            break;
        }
        tput(b, "(");
        trender(b, t, x->a, st);
        tblank(b, st);
        tput(b, x->op == EMBZ_OP_ADD ? "+" : x->op == EMBZ_OP_SUB ? "-" :
                x->op == EMBZ_OP_MUL ? "*" : x->op == EMBZ_OP_DIV ? "/" : "^");
        trender(b, t, x->b, st);
        tblank(b, st);
        tput(b, ")");
        break;
    default:
        tput(b, fname(x->op));
        tblank(b, st);
        tput(b, "(");
        trender(b, t, x->a, st);
        if (x->b >= 0) { tput(b, ","); trender(b, t, x->b, st); }
        tput(b, ")");
        break;
    }
    tblank(b, st);
}

/* does the parsed expression's subtree at p equal the test tree's subtree at k? */
static int tsame(const embz_expr_t e, int p, const ttree_t *t, int k)
{
    if (p < 0 || k < 0) return p < 0 && k < 0;
    const embz_node_t *y = e->nodes + p;
    const tnode_t *x = t->nd + k;
    if (y->op != x->op) return 0;
    if (x->op == EMBZ_OP_NUM && !fmpq_equal(y->num, x->num)) return 0;
    if (x->op == EMBZ_OP_PARAM && strcmp(e->params[y->param], PARAMS[x->param]) != 0) return 0;
    return tsame(e, y->a, t, x->a) && tsame(e, y->b, t, x->b);
}

/* exact value of a rational test tree; returns 0 when undefined (division by 0, 0^-k) */
static int teval_q(fmpq_t r, const ttree_t *t, int k, slong i, slong n)
{
    const tnode_t *x = t->nd + k;
    fmpq_t u, v;
    int ok = 1;
    switch (x->op) {
    case EMBZ_OP_NUM: fmpq_set(r, x->num); return 1;
    case EMBZ_OP_I: fmpq_set_si(r, i, 1); return 1;
    case EMBZ_OP_N: fmpq_set_si(r, n, 1); return 1;
    default: break;
    }
    fmpq_init(u); fmpq_init(v);
    ok = teval_q(u, t, x->a, i, n);
    if (ok && x->b >= 0) ok = teval_q(v, t, x->b, i, n);
    if (ok) {
        switch (x->op) {
        case EMBZ_OP_NEG: fmpq_neg(r, u); break;
        case EMBZ_OP_ADD: fmpq_add(r, u, v); break;
        case EMBZ_OP_SUB: fmpq_sub(r, u, v); break;
        case EMBZ_OP_MUL: fmpq_mul(r, u, v); break;
        case EMBZ_OP_DIV:
            if (fmpq_is_zero(v)) ok = 0; else fmpq_div(r, u, v);
            break;
        case EMBZ_OP_POW: {
            slong ex = fmpz_get_si(fmpq_numref(v));
            if (fmpq_is_zero(u) && ex < 0) ok = 0;
            else fmpq_pow_si(r, u, ex);
            break;
        }
        default: ok = 0;
        }
    }
    fmpq_clear(u); fmpq_clear(v);
    return ok;
}

static char *render_random(ttree_t *t, int *root, flint_rand_t st, int depth, int kind)
{
    tbuf_t b = {NULL, 0, 0};
    tput(&b, "");
    t->len = 0;
    *root = tgen(t, st, depth, kind);
    trender(&b, t, *root, st);
    return b.s;
}

/* ------------------------------------------------------------------ parser */

START_TEST(test_precedence)
{
    /* expected values by the usual conventions: ^ right-associative and above unary minus,
     * - and / left-associative */
    static const struct { const char *text; slong num, den; } tab[] = {
        {"-i^2", -9, 1}, {"2^3^2", 512, 1}, {"1-2-3", -4, 1}, {"8/4/2", 1, 1},
        {"-2^2", -4, 1}, {"2*-3", -6, 1}, {"2^-1", 1, 2}, {"2^-1^2", 1, 2},
        {"(-2)^2", 4, 1}, {"2+3*4^2", 50, 1}, {"(1+2)*3", 9, 1}, {"10/4", 5, 2},
        {"1e-3", 1, 1000}, {"2.5E+4", 25000, 1}, {"0.7", 7, 10}, {".5", 1, 2},
        {"pow(2,10)", 1024, 1}, {"min(i,2)", 2, 1}, {"max(i , n)", 10, 1},
        {" 1 +\t2 ", 3, 1}, {"--2", 2, 1}, {"+2", 2, 1}, {"n - i", 7, 1},
        {"i/n*2", 3, 5}, {"2^i^2", 512, 1}, {"-i*-i", 9, 1}, {"(i+1)/(i^2+3)", 1, 3},
        {"floor(n/i)", 3, 1}, {"abs(i-n)", 7, 1}, {"0.1+0.2", 3, 10}, {"2^-2*4", 1, 1},
        {"1-2^2-3", -6, 1}, {"i^(1+1)", 9, 1}, {"pow(i,2)^2", 81, 1},
    };
    embz_expr_t e;
    arb_t r;
    fmpq_t q;
    embz_expr_init(e);
    arb_init(r);
    fmpq_init(q);
    for (size_t k = 0; k < sizeof(tab) / sizeof(tab[0]); k++) {
        parse_ok(e, tab[k].text);
        ck_assert_int_eq(eval_at(r, e, 3, 10, 128), EMBZ_OK);
        fmpq_set_si(q, tab[k].num, (ulong) tab[k].den);
        ck_assert_msg(arb_contains_fmpq(r, q), "%s", tab[k].text);
        ck_assert_msg(fabs(embz_expr_eval_d(e, 3, 10) - fmpq_get_d(q)) <= 1e-15 * (1 + fabs(fmpq_get_d(q))),
                      "double %s", tab[k].text);
    }
    /* shapes of the tree, not only values */
    parse_ok(e, "-i^2");
    ck_assert_int_eq(e->nodes[e->root].op, EMBZ_OP_NEG);
    ck_assert_int_eq(e->nodes[e->nodes[e->root].a].op, EMBZ_OP_POW);
    parse_ok(e, "2^-1");
    ck_assert_int_eq(e->nodes[e->root].op, EMBZ_OP_POW);
    ck_assert_int_eq(e->nodes[e->nodes[e->root].b].op, EMBZ_OP_NEG);
    parse_ok(e, "pow(i, 2)");
    ck_assert_int_eq(e->nodes[e->root].op, EMBZ_OP_POW);
    parse_ok(e, "0.7");
    fmpq_set_si(q, 7, 10);
    ck_assert(fmpq_equal(e->nodes[e->root].num, q));      /* kept exact */
    parse_ok(e, "1e-30");
    ck_assert_int_eq(e->nodes[e->root].op, EMBZ_OP_NUM);
    ck_assert(fmpz_is_one(fmpq_numref(e->nodes[e->root].num)));
    ck_assert_int_eq(fmpz_sizeinbase(fmpq_denref(e->nodes[e->root].num), 10), 31);
    /* children precede parents; columns of tokens */
    parse_ok(e, "log(i) + 2*n");
    for (long k = 0; k < e->len; k++) {
        ck_assert(e->nodes[k].a < k);
        ck_assert(e->nodes[k].b < k);
    }
    ck_assert_int_eq(e->nodes[e->root].col, 8);
    fmpq_clear(q);
    arb_clear(r);
    embz_expr_clear(e);
}
END_TEST

START_TEST(test_errors)
{
    static const struct { const char *text; long col; const char *msg; } tab[] = {
        {"x", 1, "unknown name 'x'"},
        {"i + foo*2", 5, "unknown name 'foo'"},
        {"(i+1", 1, "missing ')'"},
        {"log(i", 4, "missing ')'"},
        {"((i)", 1, "missing ')'"},
        {"i+1)", 4, "unmatched ')'"},
        {")", 1, "missing operand before ')'"},
        {"2*", 2, "missing operand after '*'"},
        {"2^", 2, "missing operand after '^'"},
        {"*2", 1, "missing operand before '*'"},
        {"2*/3", 3, "missing operand before '/'"},
        {"i i", 3, "expected an operator before 'i'"},
        {"2 3", 3, "expected an operator before '3'"},
        {"(1)(2)", 4, "expected an operator before '('"},
        {"log(1,2)", 1, "'log' takes 1 argument, not 2"},
        {"min(1)", 1, "'min' takes 2 arguments, not 1"},
        {"  exp()", 3, "'exp' takes 1 argument, not 0"},
        {"", 1, "empty expression"},
        {"   ", 1, "empty expression"},
        {"2 # 3", 3, "unexpected character '#'"},
        {"i;", 2, "unexpected character ';'"},
        {"log", 1, "'log' is a function"},
        {"2i", 1, "malformed number '2i'"},
        {"1.2.3", 1, "malformed number"},
        {"1e999999", 1, "out of range"},
        {"()", 2, "missing operand before ')'"},
        {"exp(2,)", 7, "missing operand before ')'"},
        {"(1,2)", 3, "unexpected ','"},
        {"foo(1)", 1, "unknown name 'foo'"},
        /* a character outside ASCII is one token, shown whole; stray bytes escaped */
        {"1/i+\xc3\xa9", 5, "unexpected character '\xc3\xa9'"},
        {"1/i+\xe9+1", 5, "unexpected character '\\xe9'"},
        {"i\x01", 2, "unexpected character '\\x01'"},
    };
    embz_expr_t e;
    embz_err_t err;
    embz_expr_init(e);
    for (size_t k = 0; k < sizeof(tab) / sizeof(tab[0]); k++) {
        int s = embz_expr_parse(e, tab[k].text, PARAMS, 2, &err);
        ck_assert_msg(s == EMBZ_ERR_INPUT, "'%s' parsed", tab[k].text);
        ck_assert_msg(err.code == EMBZ_ERR_INPUT, "%s", tab[k].text);
        ck_assert_msg(err.col == tab[k].col, "'%s': col %ld, expected %ld (%s)", tab[k].text,
                      err.col, tab[k].col, err.text);
        ck_assert_msg(strstr(err.text, tab[k].msg) != NULL, "'%s': message '%s'", tab[k].text,
                      err.text);
        ck_assert_str_eq(err.source, tab[k].text);
        ck_assert_int_eq(e->root, -1);
    }
    /* reserved or repeated parameter names */
    const char *bad1[] = {"pi"}, *bad2[] = {"a", "a"}, *bad3[] = {"2x"};
    ck_assert_int_eq(embz_expr_parse(e, "1", bad1, 1, &err), EMBZ_ERR_INPUT);
    ck_assert(strstr(err.text, "'pi'") != NULL);
    ck_assert_int_eq(embz_expr_parse(e, "1", bad2, 2, &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(embz_expr_parse(e, "1", bad3, 1, &err), EMBZ_ERR_INPUT);
    /* a parameter unknown when not declared */
    ck_assert_int_eq(embz_expr_parse(e, "a*i", NULL, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(err.col, 1);
    /* NULL err is allowed */
    ck_assert_int_eq(embz_expr_parse(e, "2*", NULL, 0, NULL), EMBZ_ERR_INPUT);
    embz_expr_clear(e);
}
END_TEST

static char *repeat_wrap(const char *open, const char *mid, const char *close, long count)
{
    size_t lo = strlen(open), lm = strlen(mid), lc = strlen(close);
    char *s = malloc((size_t) count * (lo + lc) + lm + 1), *p = s;
    for (long k = 0; k < count; k++) { memcpy(p, open, lo); p += lo; }
    memcpy(p, mid, lm); p += lm;
    for (long k = 0; k < count; k++) { memcpy(p, close, lc); p += lc; }
    *p = '\0';
    return s;
}

START_TEST(test_limits)
{
    embz_expr_t e;
    embz_err_t err;
    char *s;
    char buf[4096];
    embz_expr_init(e);

    /* 100 000 nested parentheses: refused without deep recursion */
    s = repeat_wrap("(", "i", ")", 100000);
    ck_assert_int_eq(embz_expr_parse(e, s, NULL, 0, &err), EMBZ_ERR_INPUT);
    ck_assert(strstr(err.text, "expression too long") != NULL);
    free(s);

    /* within the length limit but deeper than the depth limit: parentheses, signs, powers,
     * calls; the depth is checked before each recursive step */
    s = repeat_wrap("(", "i", ")", 1000);
    ck_assert_int_eq(embz_expr_parse(e, s, NULL, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "expression nested too deeply") != NULL, "%s", err.text);
    ck_assert_int_eq(err.col, EMBZ_EXPR_MAX_DEPTH);
    free(s);
    s = repeat_wrap("-", "i", "", 2000);
    ck_assert_int_eq(embz_expr_parse(e, s, NULL, 0, &err), EMBZ_ERR_INPUT);
    ck_assert(strstr(err.text, "nested too deeply") != NULL);
    free(s);
    s = repeat_wrap("2^", "i", "", 1000);
    ck_assert_int_eq(embz_expr_parse(e, s, NULL, 0, &err), EMBZ_ERR_INPUT);
    ck_assert(strstr(err.text, "nested too deeply") != NULL);
    free(s);
    s = repeat_wrap("exp(", "i", ")", 500);
    ck_assert_int_eq(embz_expr_parse(e, s, NULL, 0, &err), EMBZ_ERR_INPUT);
    ck_assert(strstr(err.text, "nested too deeply") != NULL);
    free(s);
    /* just below the limit is accepted */
    s = repeat_wrap("(", "i", ")", EMBZ_EXPR_MAX_DEPTH - 1);
    ck_assert_int_eq(embz_expr_parse(e, s, NULL, 0, &err), EMBZ_OK);
    free(s);
    /* a long flat sum (no nesting) up to the length limit is fine */
    s = repeat_wrap("i+", "1", "", (EMBZ_EXPR_MAX_LEN - 1) / 2);
    ck_assert_int_le((long) strlen(s), EMBZ_EXPR_MAX_LEN);
    ck_assert_int_eq(embz_expr_parse(e, s, NULL, 0, &err), EMBZ_OK);
    free(s);
    /* an error beyond what err->source can hold names its column in the message */
    s = repeat_wrap("1+", "x", "", 1500);
    ck_assert_int_eq(embz_expr_parse(e, s, NULL, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(err.col, 3001);
    ck_assert(strstr(err.text, "unknown name 'x'") != NULL);
    ck_assert(strstr(err.text, "column 3001") != NULL);
    embz_err_format(buf, sizeof(buf), &err);
    free(s);
    embz_expr_clear(e);
}
END_TEST

START_TEST(test_roundtrip)
{
    flint_rand_t st;
    embz_expr_t e, f;
    embz_err_t err;
    ttree_t *t = malloc(sizeof(ttree_t));
    flint_randinit(st);
    embz_expr_init(e);
    embz_expr_init(f);
    t->len = 0;
    for (int iter = 0; iter < 3000; iter++) {
        int root;
        char *text = render_random(t, &root, st, 1 + (int) n_randint(st, 5), 0);
        /* sometimes a parameter leaf */
        int s = embz_expr_parse(e, text, PARAMS, 2, &err);
        ck_assert_msg(s == EMBZ_OK, "'%s': %s at %ld", text, err.text, err.col);
        ck_assert_msg(tsame(e, e->root, t, root), "tree differs for '%s'", text);
        char *c1 = embz_expr_to_string(e);
        s = embz_expr_parse(f, c1, PARAMS, 2, &err);
        ck_assert_msg(s == EMBZ_OK, "canonical '%s' of '%s': %s", c1, text, err.text);
        ck_assert_msg(embz_expr_equal(e, f), "round trip '%s' -> '%s'", text, c1);
        char *c2 = embz_expr_to_string(f);
        ck_assert_str_eq(c1, c2);
        ck_assert_int_le((long) strlen(c1), (long) strlen(text) + 1);
        free(c1); free(c2); free(text);
        tclear(t);
    }
    /* parameters, constants and a few fixed canonical forms */
    static const struct { const char *in, *out; } tab[] = {
        {"a*i^b", "a*i^b"}, {"(i^2)^3", "(i^2)^3"}, {"i^(2^3)", "i^2^3"},
        {"-(i^2)", "-i^2"}, {"(-i)^2", "(-i)^2"}, {"i-(n-1)", "i - (n - 1)"},
        {"(i-n)-1", "i - n - 1"}, {"i/(n*2)", "i/(n*2)"}, {"2^(-1)", "2^-1"},
        {"1.50", "1.5"}, {"2.5E+4", "25000"}, {"1e-30", "1e-30"}, {"-(-i)", "--i"},
        {"pow(pi, e)*gamma", "pi^e*euler"}, {"euler/i", "euler/i"}, {"min(i,n)+max(1,2)", "min(i, n) + max(1, 2)"},
        {"i*(-n)", "i*-n"}, {"(i*n)*2", "i*n*2"}, {"i*(n*2)", "i*(n*2)"},
        {"-(i*n)", "-(i*n)"}, {"(-i)*n", "-i*n"}, {"2^-(i+1)", "2^-(i + 1)"},
    };
    for (size_t k = 0; k < sizeof(tab) / sizeof(tab[0]); k++) {
        parse_ok(e, tab[k].in);
        char *c = embz_expr_to_string(e);
        ck_assert_str_eq(c, tab[k].out);
        parse_ok(f, c);
        ck_assert(embz_expr_equal(e, f));
        free(c);
    }
    /* equality notices differences */
    parse_ok(e, "i+1");
    parse_ok(f, "i+2");
    ck_assert(!embz_expr_equal(e, f));
    parse_ok(f, "1+i");
    ck_assert(!embz_expr_equal(e, f));
    free(t);
    embz_expr_clear(e);
    embz_expr_clear(f);
    flint_randclear(st);
}
END_TEST

START_TEST(test_bind_square_uses)
{
    embz_expr_t e, f;
    fmpq vals[2];
    arb_t r;
    fmpq_t q;
    embz_expr_init(e);
    embz_expr_init(f);
    arb_init(r);
    fmpq_init(q);
    fmpq_init(vals + 0);
    fmpq_init(vals + 1);

    parse_ok(e, "a*i + b");
    ck_assert_int_eq(embz_expr_uses(e), EMBZ_USES_I | EMBZ_USES_PARAM);
    ck_assert_int_eq(eval_at(r, e, 3, 10, 64), EMBZ_ERR_INPUT);   /* unbound */
    ck_assert(isnan(embz_expr_eval_d(e, 3, 10)));
    fmpq_set_si(vals + 0, 1, 3);
    fmpq_set_si(vals + 1, -2, 1);
    embz_expr_bind(e, vals);
    ck_assert_int_eq(embz_expr_uses(e), EMBZ_USES_I);
    ck_assert_int_eq(eval_at(r, e, 3, 10, 64), EMBZ_OK);
    fmpq_set_si(q, -1, 1);
    ck_assert(arb_contains_fmpq(r, q));
    /* printing a bound expression: numbers without literal form keep their value */
    char *c = embz_expr_to_string(e);
    ck_assert_str_eq(c, "(1/3)*i + (-2)");
    parse_ok(f, c);
    ck_assert_int_eq(eval_at(r, f, 3, 10, 64), EMBZ_OK);
    ck_assert(arb_contains_fmpq(r, q));
    free(c);

    embz_expr_square(e);
    ck_assert_int_eq(eval_at(r, e, 9, 10, 64), EMBZ_OK);
    fmpq_set_si(q, 1, 1);                       /* (9/3 - 2)^2 */
    ck_assert(arb_contains_fmpq(r, q));
    ck_assert(mag_cmp_2exp_si(arb_radref(r), -50) < 0);
    c = embz_expr_to_string(e);
    ck_assert_str_eq(c, "((1/3)*i + (-2))^2");
    free(c);

    embz_expr_set(f, e);
    ck_assert(embz_expr_equal(e, f));
    ck_assert_int_eq(eval_at(r, f, 12, 10, 64), EMBZ_OK);
    ck_assert(arb_contains_si(r, 4));

    /* squaring an amplitude keeps no dead nodes (the evaluators walk every node): the
     * square of 1/sqrt(i) is as small as 1/i itself, and prints the same */
    parse_ok(e, "1/sqrt(i)");
    embz_expr_square(e);
    parse_ok(f, "1/i");
    ck_assert_int_eq(e->len, f->len);
    ck_assert_int_eq(e->root, e->len - 1);
    c = embz_expr_to_string(e);
    ck_assert_str_eq(c, "1/i");
    free(c);

    parse_ok(e, "n*floor(i)");
    ck_assert_int_eq(embz_expr_uses(e), EMBZ_USES_I | EMBZ_USES_N | EMBZ_USES_NONSMOOTH);
    parse_ok(e, "max(pi, 2)");
    ck_assert_int_eq(embz_expr_uses(e), EMBZ_USES_NONSMOOTH);
    parse_ok(e, "abs(a)");
    ck_assert_int_eq(embz_expr_uses(e), EMBZ_USES_PARAM | EMBZ_USES_NONSMOOTH);
    parse_ok(e, "log(n)");
    ck_assert_int_eq(embz_expr_uses(e), EMBZ_USES_N);

    fmpq_clear(vals + 0);
    fmpq_clear(vals + 1);
    fmpq_clear(q);
    arb_clear(r);
    embz_expr_clear(e);
    embz_expr_clear(f);
}
END_TEST

START_TEST(test_number_parse)
{
    static const struct { const char *s; slong p; ulong q; } ok[] = {
        {"1", 1, 1}, {"-0.75", -3, 4}, {"1e-3", 1, 1000}, {"2.5E+4", 25000, 1},
        {"+3", 3, 1}, {" 7/21 ", 1, 3}, {"-3/6", -1, 2}, {".5", 1, 2}, {"0", 0, 1},
        {"12.500e-1", 5, 4}, {"0.1", 1, 10},
    };
    static const char *bad[] = {"", " ", "abc", "1/0", "1/2/3", "1.5/2", "2/1.5", "1e",
                                "--1", "1 2", "1/", "/2", "1/-2", "0x10", "1e999999", "."};
    fmpq_t x, y;
    fmpq_init(x); fmpq_init(y);
    for (size_t k = 0; k < sizeof(ok) / sizeof(ok[0]); k++) {
        ck_assert_msg(embz_number_parse(x, ok[k].s) == EMBZ_OK, "%s", ok[k].s);
        fmpq_set_si(y, ok[k].p, ok[k].q);
        ck_assert_msg(fmpq_equal(x, y), "%s", ok[k].s);
    }
    for (size_t k = 0; k < sizeof(bad) / sizeof(bad[0]); k++)
        ck_assert_msg(embz_number_parse(x, bad[k]) == EMBZ_ERR_INPUT, "'%s' accepted", bad[k]);
    /* of those, only the well-formed one with a huge exponent is "out of range" */
    for (size_t k = 0; k < sizeof(bad) / sizeof(bad[0]); k++)
        ck_assert_msg(embz_number_out_of_range(bad[k]) == (strcmp(bad[k], "1e999999") == 0),
                      "'%s'", bad[k]);
    ck_assert(embz_number_out_of_range(" -2.5E-100001 "));
    ck_assert(embz_number_out_of_range("1e+100001"));
    ck_assert(!embz_number_out_of_range("1e100000"));
    ck_assert(!embz_number_out_of_range("1e999999x"));
    ck_assert(!embz_number_out_of_range("0.5"));
    /* long exact decimal */
    ck_assert_int_eq(embz_number_parse(x, "3.14159265358979323846264338327950288"), EMBZ_OK);
    {
        fmpq_t z;
        fmpq_init(z);
        fmpz_set_str(fmpq_numref(z), "314159265358979323846264338327950288", 10);
        fmpz_set_ui(fmpq_denref(z), 10);
        fmpz_pow_ui(fmpq_denref(z), fmpq_denref(z), 35);
        fmpq_canonicalise(z);
        ck_assert(fmpq_equal(x, z));
        fmpq_clear(z);
    }
    fmpq_clear(x); fmpq_clear(y);
}
END_TEST

/* ------------------------------------------------------------------ arb evaluation */

START_TEST(test_arb_values)
{
    embz_expr_t e;
    arb_t r, ref;
    embz_expr_init(e);
    arb_init(r); arb_init(ref);

    /* exact rational (i+1)/(i^2+3) against fmpq */
    parse_ok(e, "(i+1)/(i^2+3)");
    for (slong i = -30; i <= 60; i++) {
        fmpq_t q;
        fmpq_init(q);
        fmpq_set_si(q, i + 1, (ulong) (i * i + 3));
        ck_assert_int_eq(eval_at(r, e, i, 1, 80), EMBZ_OK);
        ck_assert(arb_contains_fmpq(r, q));
        fmpq_clear(q);
    }

    /* transcendental values against arb's own functions or known identities */
    parse_ok(e, "4*atan(1) - pi");
    ck_assert_int_eq(eval_at(r, e, 1, 1, 128), EMBZ_OK);
    ck_assert(arb_contains_zero(r));
    ck_assert(mag_cmp_2exp_si(arb_radref(r), -120) < 0);
    parse_ok(e, "lgamma(i)");                     /* log((i-1)!) */
    ck_assert_int_eq(eval_at(r, e, 11, 1, 128), EMBZ_OK);
    arb_set_ui(ref, 3628800);
    arb_log(ref, ref, 128);
    ck_assert(arb_overlaps(r, ref));
    parse_ok(e, "log2(8) + log10(1000) + log(e^2)");
    ck_assert_int_eq(eval_at(r, e, 1, 1, 128), EMBZ_OK);
    ck_assert(arb_contains_si(r, 8));
    parse_ok(e, "sin(pi/6)^2 + cos(pi/3)");        /* 1/4 + 1/2 */
    ck_assert_int_eq(eval_at(r, e, 1, 1, 128), EMBZ_OK);
    arb_set_d(ref, 0.75);
    ck_assert(arb_overlaps(r, ref));
    parse_ok(e, "gamma");                           /* 0.5772156649015328606 [memory] */
    ck_assert_int_eq(eval_at(r, e, 1, 1, 128), EMBZ_OK);
    ck_assert(fabs(arf_get_d(arb_midref(r), ARF_RND_NEAR) - 0.5772156649015328606) < 1e-16);
    ck_assert_int_eq(e->notes, EMBZ_EXPR_NOTE_OLD_GAMMA);   /* the old name, noted */
    parse_ok(e, "euler");                           /* the same constant under its name */
    ck_assert_int_eq(eval_at(r, e, 1, 1, 128), EMBZ_OK);
    ck_assert(fabs(arf_get_d(arb_midref(r), ARF_RND_NEAR) - 0.5772156649015328606) < 1e-16);
    ck_assert_int_eq(e->notes, 0);
    {
        embz_err_t pe;
        ck_assert_int_eq(embz_expr_parse(e, "2*gamma (i)", NULL, 0, &pe), EMBZ_ERR_INPUT);
        ck_assert_int_eq(pe.col, 3);
        ck_assert(strstr(pe.text, "exp(lgamma(x))") != NULL);
    }
    parse_ok(e, "sqrt(i)*sqrt(i) - i + exp(log(n)) - n");
    ck_assert_int_eq(eval_at(r, e, 7, 13, 128), EMBZ_OK);
    ck_assert(arb_contains_zero(r));
    parse_ok(e, "floor(i/3) + floor(-i/3) + min(i, -n) + max(i, -n)");
    ck_assert_int_eq(eval_at(r, e, 7, 13, 128), EMBZ_OK);   /* 2 - 3 - 13 + 7 */
    ck_assert(arb_equal_si(r, -7));
    parse_ok(e, "(-2)^3 + (-2)^-2 + 0^0 + 0^0.5");  /* -8 + 1/4 + 1 + 0 */
    ck_assert_int_eq(eval_at(r, e, 1, 1, 64), EMBZ_OK);
    arb_set_d(ref, -6.75);
    ck_assert(arb_equal(r, ref));
    parse_ok(e, "i^n");                             /* 3^200 exactly */
    ck_assert_int_eq(eval_at(r, e, 3, 200, 400), EMBZ_OK);
    {
        fmpz_t z;
        fmpz_init(z);
        fmpz_ui_pow_ui(z, 3, 200);
        ck_assert(arb_is_exact(r));
        arb_set_fmpz(ref, z);
        ck_assert(arb_equal(r, ref));
        fmpz_clear(z);
    }

    /* domain errors (double gives NaN there too) */
    static const char *undefined[] = {
        "log(i-3)", "log(-i)", "sqrt(-i)", "(-8)^(1/3)", "0^-1", "(i-3)^-2", "lgamma(i-3)",
        "1/(i-i)", "log10(0)", "(-i)^0.5", "0^(-0.5)", "exp(exp(exp(10)))", "log(sin(pi))",
        "a",
    };
    for (size_t k = 0; k < sizeof(undefined) / sizeof(undefined[0]); k++) {
        parse_ok(e, undefined[k]);
        int s = eval_at(r, e, 3, 5, 128);
        ck_assert_msg(s == EMBZ_ERR_DOMAIN || (s == EMBZ_ERR_INPUT && k + 1 == sizeof(undefined) / sizeof(undefined[0])),
                      "%s: %d", undefined[k], s);
        ck_assert(!arb_is_finite(r));
        if (strcmp(undefined[k], "log(sin(pi))") != 0)   /* double sin(pi) is 1.2e-16 > 0 */
            ck_assert_msg(isnan(embz_expr_eval_d(e, 3, 5)), "double %s", undefined[k]);
    }
    /* a ball straddling 0 under log is undecided: DOMAIN */
    {
        arb_t i, n;
        arb_init(i); arb_init(n);
        arb_set_si(i, 3);
        mag_set_ui_2exp_si(arb_radref(i), 1, -1);   /* exactly 1/2 */
        arb_one(n);
        parse_ok(e, "log(i-3)");
        ck_assert_int_eq(embz_expr_eval_arb(r, e, i, n, 64), EMBZ_ERR_DOMAIN);
        parse_ok(e, "sqrt(i-2.5)");                  /* [0, 1]: fine */
        ck_assert_int_eq(embz_expr_eval_arb(r, e, i, n, 64), EMBZ_OK);
        ck_assert(arb_contains_si(r, 0) && arb_contains_si(r, 1));
        parse_ok(e, "(i-2.5)^1.5");
        ck_assert_int_eq(embz_expr_eval_arb(r, e, i, n, 64), EMBZ_OK);
        ck_assert(arb_contains_si(r, 0) && arb_contains_si(r, 1));
        parse_ok(e, "floor(i)");
        ck_assert_int_eq(embz_expr_eval_arb(r, e, i, n, 64), EMBZ_OK);
        ck_assert(arb_contains_si(r, 2) && arb_contains_si(r, 3));
        arb_clear(i); arb_clear(n);
    }
    arb_clear(r); arb_clear(ref);
    embz_expr_clear(e);
}
END_TEST

START_TEST(test_exact_rational_random)
{
    flint_rand_t st;
    embz_expr_t e;
    ttree_t *t = malloc(sizeof(ttree_t));
    arb_t r;
    fmpq_t q;
    int defined = 0;
    flint_randinit(st);
    embz_expr_init(e);
    arb_init(r);
    fmpq_init(q);
    t->len = 0;
    for (int iter = 0; iter < 1500; iter++) {
        int root;
        char *text = render_random(t, &root, st, 1 + (int) n_randint(st, 5), 1);
        slong i = (slong) n_randint(st, 40) - 10, n = 1 + (slong) n_randint(st, 50);
        parse_ok(e, text);
        int s = eval_at(r, e, i, n, 200);
        if (teval_q(q, t, root, i, n)) {
            if (s == EMBZ_OK) {
                defined++;
                ck_assert_msg(arb_contains_fmpq(r, q), "'%s' at i=%ld n=%ld", text, (long) i, (long) n);
            } else {
                /* only an intermediate division by an exact zero may fail: none here */
                ck_assert_msg(0, "'%s' at i=%ld: status %d but exact value exists", text, (long) i, s);
            }
        } else {
            ck_assert_msg(s == EMBZ_ERR_DOMAIN, "'%s' at i=%ld: undefined but status %d", text, (long) i, s);
            ck_assert_msg(isnan(embz_expr_eval_d(e, (double) i, (double) n)), "'%s' at i=%ld n=%ld", text, (long) i, (long) n);
        }
        free(text);
        tclear(t);
    }
    ck_assert_int_gt(defined, 1000);
    fmpq_clear(q);
    arb_clear(r);
    embz_expr_clear(e);
    free(t);
    flint_randclear(st);
}
END_TEST

START_TEST(test_double_vs_arb)
{
    flint_rand_t st;
    embz_expr_t e;
    ttree_t *t = malloc(sizeof(ttree_t));
    arb_t r, dd;
    int agree = 0, both_undef = 0, odd = 0, ill = 0;
    flint_randinit(st);
    embz_expr_init(e);
    arb_init(r); arb_init(dd);
    t->len = 0;
    for (int iter = 0; iter < 3000; iter++) {
        int root;
        char *text = render_random(t, &root, st, 1 + (int) n_randint(st, 4), 0);
        slong i = 1 + (slong) n_randint(st, 30), n = 1 + (slong) n_randint(st, 30);
        parse_ok(e, text);
        double d = embz_expr_eval_d(e, (double) i, (double) n);
        int s = eval_at(r, e, i, n, 256);
        if (s == EMBZ_OK && !isnan(d)) {
            /* double within the ball widened by a relative 2^-30 (rounding of ~100 ops) */
            arb_set_d(dd, d);
            if (!arf_is_zero(arb_midref(r)))
                arb_add_error_2exp_si(r, -30 + (slong) arf_abs_bound_lt_2exp_si(arb_midref(r)));
            arb_add_error_2exp_si(r, -30);
            if (!arb_overlaps(r, dd)) {
                /* ill-conditioned: the rounding of double arithmetic acts like a relative
                 * perturbation of the data; evaluate with i, n widened by 2^-40 relative */
                arb_t pi, pn;
                arb_init(pi); arb_init(pn);
                arb_set_si(pi, i);
                arb_set_si(pn, n);
                arb_add_error_2exp_si(pi, -40 + 5);
                arb_add_error_2exp_si(pn, -40 + 5);
                int s2 = embz_expr_eval_arb(r, e, pi, pn, 256);
                ck_assert_msg(s2 != EMBZ_OK || arb_overlaps(r, dd), "'%s' at i=%ld n=%ld: double %.17g",
                              text, (long) i, (long) n, d);
                ill++;
                arb_clear(pi); arb_clear(pn);
            }
            agree++;
        } else if (s != EMBZ_OK && isnan(d)) {
            both_undef++;
        } else {
            /* boundary cases: an exact zero or integer in one arithmetic but not the other,
             * or double overflow; must stay rare */
            odd++;
            if (getenv("EXPR_TEST_STATS")) fprintf(stderr, "odd: %s at %ld %ld: d=%g s=%d\n", text, (long) i, (long) n, d, s);
        }
        free(text);
        tclear(t);
    }
    if (getenv("EXPR_TEST_STATS")) fprintf(stderr, "agree %d undef %d odd %d ill %d\n", agree, both_undef, odd, ill);
    ck_assert_int_gt(agree, 1500);
    ck_assert_int_gt(both_undef, 50);
    ck_assert_msg(odd < 60, "odd cases %d", odd);
    ck_assert_msg(ill < 60, "ill-conditioned cases %d", ill);
    arb_clear(r); arb_clear(dd);
    embz_expr_clear(e);
    free(t);
    flint_randclear(st);
}
END_TEST

/* ------------------------------------------------------------------ series */

/* x(t) = c + t */
static void lin_series(arb_ptr x, slong len, const arb_t c)
{
    _arb_vec_zero(x, len);
    arb_set(x, c);
    if (len > 1) arb_one(x + 1);
}

/* The closed forms used for linear arguments (log, exp, sqrt, powers, division) against
 * arb's general series routines on the same input, for random centres and slopes. */
START_TEST(test_series_linear_forms)
{
    const slong len = 12, prec = 160;
    embz_expr_t e;
    arb_ptr x = _arb_vec_init(len), s = _arb_vec_init(len), ref = _arb_vec_init(len);
    arb_ptr p = _arb_vec_init(len);
    arb_t n, one;
    flint_rand_t st;
    flint_randinit(st);
    embz_expr_init(e);
    arb_init(n); arb_init(one);
    arb_one(one);
    arb_set_si(n, 10);
    for (int it = 0; it < 40; it++) {
        _arb_vec_zero(x, len);
        arb_set_ui(x, 1 + n_randint(st, 1000000));
        arb_mul_2exp_si(x, x, (slong) n_randint(st, 40) - 10);   /* centre 2^-10 .. 2^50 */
        arb_set_si(x + 1, (slong) n_randint(st, 7) - 3);            /* slope -3 .. 3 */
        static const char *const forms[] = { "log(i)", "exp(i/2^40)", "sqrt(i)", "i^0.3",
                                             "i^-1.5", "i^-2", "3/i", "i/(i+1)" };
        for (int f = 0; f < 8; f++) {
            parse_ok(e, forms[f]);
            ck_assert_int_eq(embz_expr_eval_series(s, e, x, n, len, prec), EMBZ_OK);
            switch (f) {
            case 0: _arb_poly_log_series(ref, x, len, len, prec); break;
            case 1:
                _arb_vec_scalar_mul_2exp_si(p, x, len, -40);
                _arb_poly_exp_series(ref, p, len, len, prec);
                break;
            case 2: _arb_poly_sqrt_series(ref, x, len, len, prec); break;
            case 3: case 4: {
                arb_t a;
                arb_init(a);
                arb_set_si(a, f == 3 ? 3 : -15);
                arb_div_ui(a, a, 10, prec);             /* the exact decimals 0.3, -1.5 */
                _arb_poly_pow_arb_series(ref, x, len, a, len, prec);
                arb_clear(a);
                break;
            }
            case 5:
                _arb_poly_inv_series(p, x, len, len, prec);
                _arb_poly_mullow(ref, p, len, p, len, len, prec);
                break;
            case 6:
                _arb_poly_inv_series(ref, x, len, len, prec);
                for (slong k = 0; k < len; k++) arb_mul_ui(ref + k, ref + k, 3, prec);
                break;
            default:
                _arb_vec_set(p, x, len);
                arb_add_ui(p, p, 1, prec);
                _arb_poly_div_series(ref, x, len, p, len, len, prec);
                break;
            }
            for (slong k = 0; k < len; k++)
                ck_assert_msg(arb_overlaps(s + k, ref + k), "%s: coefficient %ld", forms[f],
                              (long) k);
        }
    }
    embz_expr_clear(e);
    _arb_vec_clear(x, len); _arb_vec_clear(s, len); _arb_vec_clear(ref, len);
    _arb_vec_clear(p, len);
    arb_clear(n); arb_clear(one);
    flint_randclear(st);
}
END_TEST

START_TEST(test_series_known)
{
    const slong len = 8;
    embz_expr_t e;
    arb_ptr x = _arb_vec_init(len), s = _arb_vec_init(len);
    arb_t c, n, ref;
    fmpq_t q;
    embz_expr_init(e);
    arb_init(c); arb_init(n); arb_init(ref);
    fmpq_init(q);
    arb_set_si(n, 10);

    for (slong a = 1; a <= 5; a++) {
        arb_set_si(c, a);
        lin_series(x, len, c);
        /* log(a + t) = log a + sum (-1)^(k+1) t^k / (k a^k) */
        parse_ok(e, "log(i)");
        ck_assert_int_eq(embz_expr_eval_series(s, e, x, n, len, 128), EMBZ_OK);
        for (slong k = 1; k < len; k++) {
            fmpz_t den;
            fmpz_init(den);
            fmpz_set_si(den, a);
            fmpz_pow_ui(den, den, (ulong) k);
            fmpz_mul_si(den, den, k);
            fmpq_set_si(q, (k % 2) ? 1 : -1, 1);
            fmpq_div_fmpz(q, q, den);
            ck_assert(arb_contains_fmpq(s + k, q));
            fmpz_clear(den);
        }
        /* 1/(a+t) = sum (-1)^k t^k / a^(k+1), by division and by a negative power */
        const char *inv[] = {"1/i", "i^-1", "pow(i,-2)*i"};
        for (int v = 0; v < 3; v++) {
            parse_ok(e, inv[v]);
            ck_assert_int_eq(embz_expr_eval_series(s, e, x, n, len, 128), EMBZ_OK);
            for (slong k = 0; k < len; k++) {
                fmpz_t den;
                fmpz_init(den);
                fmpz_set_si(den, a);
                fmpz_pow_ui(den, den, (ulong) k + 1);
                fmpq_set_si(q, (k % 2) ? -1 : 1, 1);
                fmpq_div_fmpz(q, q, den);
                ck_assert_msg(arb_contains_fmpq(s + k, q), "%s k=%ld", inv[v], (long) k);
                fmpz_clear(den);
            }
        }
        /* exp(a + t) = e^a sum t^k / k! */
        parse_ok(e, "exp(i)");
        ck_assert_int_eq(embz_expr_eval_series(s, e, x, n, len, 128), EMBZ_OK);
        for (slong k = 0; k < len; k++) {
            arb_set_si(ref, a);
            arb_exp(ref, ref, 128);
            for (slong j = 2; j <= k; j++) arb_div_si(ref, ref, j, 128);
            ck_assert(arb_overlaps(s + k, ref));
        }
        /* (a + t)^3 exactly, and n*i^2 with n constant */
        parse_ok(e, "i^3 + n*i^2");
        ck_assert_int_eq(embz_expr_eval_series(s, e, x, n, len, 64), EMBZ_OK);
        ck_assert(arb_equal_si(s + 0, a * a * a + 10 * a * a));
        ck_assert(arb_equal_si(s + 1, 3 * a * a + 20 * a));
        ck_assert(arb_equal_si(s + 2, 3 * a + 10));
        ck_assert(arb_equal_si(s + 3, 1));
        for (slong k = 4; k < len; k++) ck_assert(arb_is_zero(s + k));
        /* sqrt(a + t): binomial(1/2, k) a^(1/2 - k); check a = 4 exactly-rational */
        if (a == 4) {
            parse_ok(e, "sqrt(i)");
            ck_assert_int_eq(embz_expr_eval_series(s, e, x, n, len, 128), EMBZ_OK);
            fmpq_t bin;
            fmpq_init(bin);
            fmpq_set_si(bin, 1, 1);
            for (slong k = 0; k < len; k++) {
                /* q = 4^(1/2) * bin / 4^k */
                fmpq_set_si(q, 2, 1);
                fmpq_mul(q, q, bin);
                fmpz_mul_2exp(fmpq_denref(q), fmpq_denref(q), (ulong) (2 * k));
                fmpq_canonicalise(q);
                ck_assert_msg(arb_contains_fmpq(s + k, q), "sqrt k=%ld", (long) k);
                /* bin <- bin * (1/2 - k) / (k + 1) */
                fmpq_t f;
                fmpq_init(f);
                fmpq_set_si(f, 1 - 2 * k, (ulong) (2 * (k + 1)));
                fmpq_mul(bin, bin, f);
                fmpq_clear(f);
            }
            fmpq_clear(bin);
        }
    }
    /* expressions without i are constant series */
    parse_ok(e, "log(n) + pi");
    arb_set_si(c, 2);
    lin_series(x, len, c);
    ck_assert_int_eq(embz_expr_eval_series(s, e, x, n, len, 64), EMBZ_OK);
    for (slong k = 1; k < len; k++) ck_assert(arb_is_zero(s + k));

    /* non-smooth operations decided by the constant term, or refused */
    arb_set_si(c, 5);
    lin_series(x, len, c);
    parse_ok(e, "abs(3-i)");
    ck_assert_int_eq(embz_expr_eval_series(s, e, x, n, len, 64), EMBZ_OK);
    ck_assert(arb_equal_si(s + 0, 2) && arb_equal_si(s + 1, 1));
    parse_ok(e, "floor(i/2)*i");
    ck_assert_int_eq(embz_expr_eval_series(s, e, x, n, len, 64), EMBZ_OK);
    ck_assert(arb_equal_si(s + 0, 10) && arb_equal_si(s + 1, 2) && arb_is_zero(s + 2));
    parse_ok(e, "min(i, 2*i - 3) + max(i^2, 30)");    /* 5 + 30 */
    ck_assert_int_eq(embz_expr_eval_series(s, e, x, n, len, 64), EMBZ_OK);
    ck_assert(arb_equal_si(s + 0, 35) && arb_equal_si(s + 1, 1));
    const char *nonsmooth[] = {"abs(i-5)", "floor(i)", "min(i, 10-i)", "max(i, 5)"};
    for (int v = 0; v < 4; v++) {
        parse_ok(e, nonsmooth[v]);
        ck_assert_int_eq(embz_expr_eval_series(s, e, x, n, len, 64), EMBZ_ERR_NONSMOOTH);
        /* with one coefficient the scalar rules apply */
        ck_assert_int_eq(embz_expr_eval_series(s, e, x, n, 1, 64), EMBZ_OK);
    }
    const char *dom[] = {"log(i-5)", "sqrt(i-5)", "(i-5)^0.5", "1/(i-5)", "(i-5)^-1",
                         "lgamma(5-i)"};
    for (int v = 0; v < 6; v++) {
        parse_ok(e, dom[v]);
        ck_assert_int_eq(embz_expr_eval_series(s, e, x, n, len, 64), EMBZ_ERR_DOMAIN);
    }
    parse_ok(e, "(i-5)^2");                         /* t^2: smooth */
    ck_assert_int_eq(embz_expr_eval_series(s, e, x, n, len, 64), EMBZ_OK);
    ck_assert(arb_is_zero(s + 0) && arb_is_zero(s + 1) && arb_is_one(s + 2));

    fmpq_clear(q);
    arb_clear(c); arb_clear(n); arb_clear(ref);
    _arb_vec_clear(x, len);
    _arb_vec_clear(s, len);
    embz_expr_clear(e);
}
END_TEST

START_TEST(test_series_random)
{
    const slong len = 4;
    flint_rand_t st;
    embz_expr_t e;
    ttree_t *t = malloc(sizeof(ttree_t));
    arb_ptr x = _arb_vec_init(len), s = _arb_vec_init(len), w = _arb_vec_init(len),
            p = _arb_vec_init(len);
    arb_t c, n, v, vp, vm, h, fd;
    int checked = 0, wide_checked = 0;
    flint_randinit(st);
    embz_expr_init(e);
    arb_init(c); arb_init(n); arb_init(v); arb_init(vp); arb_init(vm); arb_init(h); arb_init(fd);
    t->len = 0;
    for (int iter = 0; iter < 1500; iter++) {
        int root;
        char *text = render_random(t, &root, st, 1 + (int) n_randint(st, 4), 2);
        parse_ok(e, text);
        /* point c = integer + 1/3 (an inexact ball), n integer */
        arb_set_si(c, 1 + (slong) n_randint(st, 20));
        arb_set_d(h, 1.0 / 3);
        arb_add(c, c, h, 128);
        arb_set_si(n, 1 + (slong) n_randint(st, 20));
        lin_series(x, len, c);
        int ss = embz_expr_eval_series(s, e, x, n, len, 128);
        int sv = embz_expr_eval_arb(v, e, c, n, 128);
        if (ss == EMBZ_OK) {
            /* coefficient 0 is the value */
            ck_assert_msg(sv == EMBZ_OK, "'%s': series ok, value %d", text, sv);
            ck_assert_msg(arb_overlaps(s, v), "'%s': coefficient 0", text);
            /* coefficient 1 against a central difference with step 2^-40 at 256 bits:
             * the error is about h^2 |f'''| / 6 */
            arb_one(h);
            arb_mul_2exp_si(h, h, -40);
            arb_add(vp, c, h, 256);
            arb_sub(vm, c, h, 256);
            if (embz_expr_eval_arb(vp, e, vp, n, 256) == EMBZ_OK &&
                embz_expr_eval_arb(vm, e, vm, n, 256) == EMBZ_OK &&
                arf_cmpabs_2exp_si(arb_midref(s + 3), 20) < 0 &&
                arf_cmpabs_2exp_si(arb_midref(s + 1), 40) < 0) {
                arb_sub(fd, vp, vm, 256);
                arb_mul_2exp_si(fd, fd, 39);
                arb_add_error_2exp_si(fd, -50);
                ck_assert_msg(arb_overlaps(fd, s + 1), "'%s': derivative", text);
                checked++;
            }
            /* a wide input ball contains the series at points inside it */
            arb_set(w, c);
            mag_set_d(arb_radref(w), 0.01);
            lin_series(x, len, w);
            arb_set(w, x);
            if (embz_expr_eval_series(w, e, x, n, len, 128) == EMBZ_OK) {
                for (int pt = 0; pt < 3; pt++) {
                    arb_set_d(h, -0.009 + 0.009 * pt);
                    arb_add(h, h, c, 128);
                    lin_series(x, len, h);
                    if (embz_expr_eval_series(p, e, x, n, len, 128) == EMBZ_OK)
                        for (slong k = 0; k < len; k++)
                            ck_assert_msg(arb_contains(w + k, p + k) || arb_overlaps(w + k, p + k),
                                          "'%s': wide k=%ld", text, (long) k);
                }
                wide_checked++;
            }
        } else if (ss == EMBZ_ERR_DOMAIN) {
            /* the series domain is stricter than the value's (x^y at 0); never wider */
        } else {
            ck_assert_msg(0, "'%s': status %d", text, ss);
        }
        free(text);
        tclear(t);
    }
    if (getenv("EXPR_TEST_STATS")) fprintf(stderr, "series checked %d wide %d\n", checked, wide_checked);
    ck_assert_int_gt(checked, 500);
    ck_assert_int_gt(wide_checked, 500);
    arb_clear(c); arb_clear(n); arb_clear(v); arb_clear(vp); arb_clear(vm); arb_clear(h); arb_clear(fd);
    _arb_vec_clear(x, len); _arb_vec_clear(s, len); _arb_vec_clear(w, len); _arb_vec_clear(p, len);
    embz_expr_clear(e);
    free(t);
    flint_randclear(st);
}
END_TEST

/* ------------------------------------------------------------------ log substitution */

/* w(e^u) = core(u) e^(rate u) = phi(u) e^-u: both substitutions against the plain value at
 * points u, for random expressions (an identity of the substitution itself, no reference
 * needed), and the split of three known weights */
START_TEST(test_log_split)
{
    flint_rand_t st;
    embz_expr_t e, core, rate, phi;
    ttree_t *t = malloc(sizeof(ttree_t));
    arb_t u, x, n, a, b, r;
    int checked = 0;
    flint_randinit(st);
    embz_expr_init(e); embz_expr_init(core); embz_expr_init(rate); embz_expr_init(phi);
    arb_init(u); arb_init(x); arb_init(n); arb_init(a); arb_init(b); arb_init(r);
    for (int iter = 0; iter < 1500; iter++) {
        int root;
        char *text = render_random(t, &root, st, 1 + (int) n_randint(st, 4), 2);
        parse_ok(e, text);
        ck_assert_int_eq(embz_expr_log_split(core, rate, e), EMBZ_OK);
        ck_assert_int_eq(embz_expr_log_substitute(phi, e), EMBZ_OK);
        ck_assert_msg(!(embz_expr_uses(rate) & EMBZ_USES_I), "'%s': rate uses i", text);
        arb_set_si(n, 1 + (slong) n_randint(st, 20));
        for (int pt = 0; pt < 3; pt++) {
            /* u = k/3 + 1/7 for k in [0, 60) */
            arb_set_si(u, (slong) n_randint(st, 60));
            arb_div_ui(u, u, 3, 128);
            arb_set_ui(a, 1);
            arb_div_ui(a, a, 7, 128);
            arb_add(u, u, a, 128);
            arb_exp(x, u, 128);
            if (embz_expr_eval_arb(a, e, x, n, 128) != EMBZ_OK) continue;
            if (embz_expr_eval_arb(r, rate, u, n, 128) == EMBZ_OK
                && embz_expr_eval_arb(b, core, u, n, 128) == EMBZ_OK) {
                arb_mul(r, r, u, 128);
                arb_exp(r, r, 128);
                arb_mul(b, b, r, 128);
                ck_assert_msg(arb_overlaps(a, b), "'%s': core e^(rate u) at u = %s", text,
                              arb_get_str(u, 10, 0));
                checked++;
            }
            if (embz_expr_eval_arb(b, phi, u, n, 128) == EMBZ_OK) {
                arb_mul(a, a, x, 128);
                ck_assert_msg(arb_overlaps(a, b), "'%s': phi at u = %s", text,
                              arb_get_str(u, 10, 0));
            }
        }
        free(text);
        tclear(t);
    }
    ck_assert_int_gt(checked, 1000);
    /* known splits */
    {
        const char *w[] = { "1/(i*log(i+1)^0.5)", "i^(-1 + 1/log(n+1))", "3*i^2*exp(-i)" };
        const char *rref[] = { "-1", "-1 + 1/log(n+1)", "2" };
        for (int k = 0; k < 3; k++) {
            parse_ok(e, w[k]);
            ck_assert_int_eq(embz_expr_log_split(core, rate, e), EMBZ_OK);
            embz_expr_t ref;
            embz_expr_init(ref);
            parse_ok(ref, rref[k]);
            arb_set_ui(n, 1000);
            arb_one(u);
            ck_assert_int_eq(embz_expr_eval_arb(a, rate, u, n, 128), EMBZ_OK);
            ck_assert_int_eq(embz_expr_eval_arb(b, ref, u, n, 128), EMBZ_OK);
            ck_assert_msg(arb_overlaps(a, b), "%s: rate", w[k]);
            embz_expr_clear(ref);
        }
    }
    arb_clear(u); arb_clear(x); arb_clear(n); arb_clear(a); arb_clear(b); arb_clear(r);
    embz_expr_clear(e); embz_expr_clear(core); embz_expr_clear(rate); embz_expr_clear(phi);
    free(t);
    flint_randclear(st);
}
END_TEST

/* ------------------------------------------------------------------ acb */

START_TEST(test_acb)
{
    flint_rand_t st;
    embz_expr_t e;
    ttree_t *t = malloc(sizeof(ttree_t));
    acb_t zi, zn, z;
    arb_t ai, an, r;
    int checked = 0;
    flint_randinit(st);
    embz_expr_init(e);
    acb_init(zi); acb_init(zn); acb_init(z);
    arb_init(ai); arb_init(an); arb_init(r);
    t->len = 0;
    for (int iter = 0; iter < 1500; iter++) {
        int root;
        char *text = render_random(t, &root, st, 1 + (int) n_randint(st, 4), iter % 2 ? 2 : 0);
        parse_ok(e, text);
        arb_set_si(ai, 1 + (slong) n_randint(st, 20));
        arb_set_si(an, 1 + (slong) n_randint(st, 20));
        acb_set_arb(zi, ai);
        acb_set_arb(zn, an);
        int sr = embz_expr_eval_arb(r, e, ai, an, 128);
        for (int analytic = 0; analytic <= 1; analytic++) {
            int sz = embz_expr_eval_acb(z, e, zi, zn, analytic, 128);
            ck_assert(sz == EMBZ_OK || sz == EMBZ_ERR_DOMAIN);
            if (sr == EMBZ_OK && sz == EMBZ_OK && acb_is_finite(z)) {
                ck_assert_msg(arb_overlaps(acb_realref(z), r), "'%s' analytic=%d", text, analytic);
                ck_assert(arb_contains_zero(acb_imagref(z)));
                checked++;
            }
            if (!analytic && sr == EMBZ_OK)
                ck_assert_msg(sz == EMBZ_OK && acb_is_finite(z), "'%s': acb failed", text);
            if (sz == EMBZ_ERR_DOMAIN) ck_assert_msg(sr != EMBZ_OK, "'%s'", text);
        }
        free(text);
        tclear(t);
    }
    if (getenv("EXPR_TEST_STATS")) fprintf(stderr, "acb checked %d\n", checked);
    ck_assert_int_gt(checked, 1000);

    /* branch cuts and non-smooth pieces */
    acb_set_d_d(zi, -1, 0.5);                 /* box around -1: crosses log's cut */
    mag_set_d(arb_radref(acb_imagref(zi)), 1.0);
    acb_one(zn);
    parse_ok(e, "log(i)");
    ck_assert_int_eq(embz_expr_eval_acb(z, e, zi, zn, 1, 64), EMBZ_OK);
    ck_assert(!acb_is_finite(z));
    parse_ok(e, "abs(i)");                    /* Re < 0: holomorphic piece -z */
    ck_assert_int_eq(embz_expr_eval_acb(z, e, zi, zn, 1, 64), EMBZ_OK);
    ck_assert(acb_is_finite(z));
    ck_assert(arb_contains_si(acb_realref(z), 1));
    acb_set_d_d(zi, 2.5, 0);
    mag_set_d(arb_radref(acb_imagref(zi)), 0.2);
    parse_ok(e, "floor(i) + i^2 + sqrt(i) + lgamma(i)");
    ck_assert_int_eq(embz_expr_eval_acb(z, e, zi, zn, 1, 64), EMBZ_OK);
    ck_assert(acb_is_finite(z));
    parse_ok(e, "floor(i - 0.5)");           /* straddles 2 */
    ck_assert_int_eq(embz_expr_eval_acb(z, e, zi, zn, 1, 64), EMBZ_OK);
    ck_assert(!acb_is_finite(z));
    acb_set_si(zi, -2);
    parse_ok(e, "log(i)");
    ck_assert_int_eq(embz_expr_eval_acb(z, e, zi, zn, 0, 64), EMBZ_ERR_DOMAIN);
    parse_ok(e, "abs(i) + floor(i/3)");     /* real point: real operations, 2 - 1 */
    ck_assert_int_eq(embz_expr_eval_acb(z, e, zi, zn, 0, 64), EMBZ_OK);
    ck_assert(arb_equal_si(acb_realref(z), 1));

    acb_clear(zi); acb_clear(zn); acb_clear(z);
    arb_clear(ai); arb_clear(an); arb_clear(r);
    embz_expr_clear(e);
    free(t);
    flint_randclear(st);
}
END_TEST

/* Constant folding (embz_expr_fold, also done by embz_expr_bind): a subtree whose value is an exact rational independent of i and n becomes
 * one number (exact rational arithmetic, FLINT's fmpq, as the reference); irrational or
 * undefined constants stay for the evaluators. */
/* Exact evaluation (FLINT's rationals as the reference): rational where the value is, refused
 * where it is not */
START_TEST(test_eval_fmpq)
{
    static const struct { const char *text; long i, n; const char *value; } tab[] = {
        { "1/i", 3, 10, "1/3" }, { "(n-i)^2/n", 4, 10, "18/5" }, { "i^-2 + abs(1-i)", 2, 5, "5/4" },
        { "floor(n/i)*min(i, 2)", 3, 10, "6" }, { "max(0.5, 1/i)", 4, 4, "1/2" },
    };
    for (size_t k = 0; k < sizeof(tab) / sizeof(tab[0]); k++) {
        embz_expr_t e;
        fmpq_t v, want;
        fmpz_t i, n;
        embz_expr_init(e);
        fmpq_init(v); fmpq_init(want);
        fmpz_init_set_si(i, tab[k].i); fmpz_init_set_si(n, tab[k].n);
        parse_ok(e, tab[k].text);
        ck_assert_int_eq(embz_expr_eval_fmpq(v, e, i, n), EMBZ_OK);
        ck_assert_int_eq(fmpq_set_str(want, tab[k].value, 10), 0);
        ck_assert_msg(fmpq_equal(v, want), "%s", tab[k].text);
        fmpq_clear(v); fmpq_clear(want);
        fmpz_clear(i); fmpz_clear(n);
        embz_expr_clear(e);
    }
    static const struct { const char *text; int st; } no[] = {
        { "log(i)", EMBZ_ERR_UNSUPPORTED }, { "i^0.5", EMBZ_ERR_UNSUPPORTED },
        { "1/(i-2)", EMBZ_ERR_DOMAIN }, { "pi*i", EMBZ_ERR_UNSUPPORTED },
    };
    for (size_t k = 0; k < sizeof(no) / sizeof(no[0]); k++) {
        embz_expr_t e;
        fmpq_t v;
        fmpz_t i;
        embz_expr_init(e);
        fmpq_init(v);
        fmpz_init_set_si(i, 2);
        parse_ok(e, no[k].text);
        ck_assert_int_eq(embz_expr_eval_fmpq(v, e, i, i), no[k].st);
        fmpq_clear(v);
        fmpz_clear(i);
        embz_expr_clear(e);
    }
}
END_TEST

/* ceil, binom, and floor/ceil of a ball that straddles an integer: decided exactly where the
 * argument is rational at the point, else with more precision, never guessed. References:
 * FLINT's exact rationals and binomials (fmpq, fmpz_bin_uiui). */
START_TEST(test_steps_binom)
{
    static const struct { const char *text; long i, n; const char *value; } tab[] = {
        { "ceil(7/2) + ceil(-i/2)", 7, 1, "1" }, { "binom(n, i)", 3, 10, "120" },
        { "binom(n, i)", 12, 10, "0" }, { "binom(5/2, i)", 2, 1, "15/8" },
        { "binom(n, i - 4)", 3, 10, "0" }, { "log2(i) + log2(1/n)", 8, 4, "1" },
        { "log10(n)", 1, 1000, "3" }, { "sqrt(i/n)", 9, 4, "3/2" }, { "exp(i - i)", 5, 5, "1" },
        { "2^(-ceil(log2(i)))", 64, 1, "1/64" }, { "2^(-ceil(log2(i)))", 65, 1, "1/128" },
    };
    for (size_t k = 0; k < sizeof(tab) / sizeof(tab[0]); k++) {
        embz_expr_t e;
        fmpq_t v, want;
        fmpz_t i, n;
        arb_t b;
        embz_expr_init(e);
        fmpq_init(v); fmpq_init(want);
        arb_init(b);
        fmpz_init_set_si(i, tab[k].i); fmpz_init_set_si(n, tab[k].n);
        parse_ok(e, tab[k].text);
        ck_assert_int_eq(fmpq_set_str(want, tab[k].value, 10), 0);
        ck_assert_msg(embz_expr_eval_fmpq(v, e, i, n) == EMBZ_OK, "%s", tab[k].text);
        ck_assert_msg(fmpq_equal(v, want), "%s", tab[k].text);
        /* the ball evaluator agrees, and is exact where floor/ceil met an integer */
        ck_assert_int_eq(eval_at(b, e, tab[k].i, tab[k].n, 64), EMBZ_OK);
        ck_assert_msg(arb_contains_fmpq(b, want), "%s (arb)", tab[k].text);
        ck_assert(mag_cmp_2exp_si(arb_radref(b), -50) < 0);
        ck_assert(fabs(embz_expr_eval_d(e, (double) tab[k].i, (double) tab[k].n)
                       - fmpq_get_d(want)) <= 1e-12 * fabs(fmpq_get_d(want)) + 1e-300);
        arb_clear(b);
        fmpq_clear(v); fmpq_clear(want);
        fmpz_clear(i); fmpz_clear(n);
        embz_expr_clear(e);
    }
    /* a k that is not an integer is outside binom's domain */
    {
        embz_expr_t e;
        fmpq_t v;
        fmpz_t i;
        arb_t b;
        embz_expr_init(e);
        fmpq_init(v);
        fmpz_init_set_si(i, 3);
        arb_init(b);
        parse_ok(e, "binom(i, 1/2)");
        ck_assert_int_eq(embz_expr_eval_fmpq(v, e, i, i), EMBZ_ERR_DOMAIN);
        ck_assert_int_eq(eval_at(b, e, 3, 3, 64), EMBZ_ERR_DOMAIN);
        ck_assert(isnan(embz_expr_eval_d(e, 3, 3)));
        arb_clear(b);
        fmpq_clear(v);
        fmpz_clear(i);
        embz_expr_clear(e);
    }
    /* ceil(log2(i)) at powers of two and their neighbours: log2 of an exact power is an exact
     * integer, so the ball straddles it; the exact value decides */
    for (slong k = 1; k <= 200; k++) {
        embz_expr_t e;
        arb_t b, r;
        fmpz_t i, n;
        embz_expr_init(e);
        arb_init(b); arb_init(r);
        fmpz_init(i); fmpz_init_set_ui(n, 1);
        parse_ok(e, "ceil(log2(i)) - floor(log2(i))");
        for (int d = -1; d <= 1; d++) {
            fmpz_one(i);
            fmpz_mul_2exp(i, i, (ulong) k);
            fmpz_add_si(i, i, d);
            arb_set_fmpz(b, i);
            arb_t an;
            arb_init(an);
            arb_one(an);
            ck_assert_int_eq(embz_expr_eval_arb(r, e, b, an, 64), EMBZ_OK);
            ck_assert_msg(arb_is_exact(r), "k = %ld, d = %d", (long) k, d);
            int pow2 = d == 0 || (k == 1 && d == -1);   /* i = 2^k, or i = 1 = 2^0 */
            ck_assert_msg(arb_equal_si(r, pow2 ? 0 : 1), "k = %ld, d = %d", (long) k, d);
            arb_clear(an);
        }
        fmpz_clear(i); fmpz_clear(n);
        arb_clear(b); arb_clear(r);
        embz_expr_clear(e);
    }
    /* an integer argument that no exact rule reaches stays a certified ball over both sides
     * (log(exp(3)) = 3: floor is 3, but the ball cannot tell 3 from just below it) */
    {
        embz_expr_t e;
        arb_t r;
        embz_expr_init(e);
        arb_init(r);
        parse_ok(e, "floor(log(exp(i)))");
        ck_assert_int_eq(eval_at(r, e, 3, 1, 64), EMBZ_OK);
        ck_assert(arb_contains_si(r, 3));
        ck_assert(arb_is_finite(r));
        arb_clear(r);
        embz_expr_clear(e);
    }
    /* binom against FLINT's exact binomials, in all three evaluators */
    {
        flint_rand_t rs;
        flint_randinit(rs);
        embz_expr_t e;
        arb_t r;
        fmpz_t c;
        embz_expr_init(e);
        arb_init(r);
        fmpz_init(c);
        parse_ok(e, "binom(n, i)");
        for (int it = 0; it < 300; it++) {
            ulong n = n_randint(rs, 300), k = n_randint(rs, n + 4);
            fmpz_bin_uiui(c, n, k);
            ck_assert_int_eq(eval_at(r, e, (slong) k, (slong) n, 128), EMBZ_OK);
            ck_assert(arb_contains_fmpz(r, c));
            if (fmpz_bits(c) < 100) ck_assert(arb_is_exact(r) || arb_rel_accuracy_bits(r) > 100);
            double d = embz_expr_eval_d(e, (double) k, (double) n);
            ck_assert(fabs(d - fmpz_get_d(c)) <= 1e-9 * fmpz_get_d(c));
        }
        fmpz_clear(c);
        arb_clear(r);
        embz_expr_clear(e);
        flint_randclear(rs);
    }
    /* round trip through the printer */
    {
        embz_expr_t e, g;
        embz_expr_init(e);
        embz_expr_init(g);
        parse_ok(e, "ceil(i/2) + binom(n, i)");
        char *s = embz_expr_to_string(e);
        parse_ok(g, s);
        char *t = embz_expr_to_string(g);
        ck_assert_str_eq(s, t);
        ck_assert(strstr(s, "ceil(") != NULL && strstr(s, "binom(") != NULL);
        free(s); free(t);
        embz_expr_clear(e);
        embz_expr_clear(g);
    }
}
END_TEST

START_TEST(test_fold_constants)
{
    static const struct { const char *text, *value; } tab[] = {
        { "floor(10)", "10" }, { "(3-1)^-2", "1/4" }, { "min(1/3, 1/2) + abs(-2)", "7/3" },
        { "-(2/6)", "-1/3" }, { "max(0.5, 0.25) * 4", "2" }, { "floor(-7/2)", "-4" },
        { "2^63", "9223372036854775808" },
    };
    for (size_t k = 0; k < sizeof(tab) / sizeof(tab[0]); k++) {
        embz_expr_t e;
        fmpq_t want;
        embz_expr_init(e);
        fmpq_init(want);
        parse_ok(e, tab[k].text);
        embz_expr_fold(e);
        ck_assert_int_eq(fmpq_set_str(want, tab[k].value, 10), 0);
        ck_assert_msg(e->root >= 0 && e->nodes[e->root].op == EMBZ_OP_NUM && e->len == 1,
                      "'%s' not folded to one number", tab[k].text);
        ck_assert_msg(fmpq_equal(e->nodes[e->root].num, want), "'%s' folded to the wrong value",
                      tab[k].text);
        fmpq_clear(want);
        embz_expr_clear(e);
    }
    /* not folded: irrational, undefined, too large a power; parameters until bound */
    static const char *keep[] = { "log(2)", "1/0", "2^64", "sqrt(2)", "a + 1" };
    for (size_t k = 0; k < sizeof(keep) / sizeof(keep[0]); k++) {
        embz_expr_t e;
        embz_expr_init(e);
        parse_ok(e, keep[k]);
        embz_expr_fold(e);
        ck_assert_msg(e->nodes[e->root].op != EMBZ_OP_NUM, "'%s' folded", keep[k]);
        embz_expr_clear(e);
    }
    /* floor of a constant inside a weight: no FLOOR node left, same values as the plain form */
    embz_expr_t e, g;
    arb_t x, y;
    embz_expr_init(e); embz_expr_init(g);
    arb_init(x); arb_init(y);
    parse_ok(e, "1/(i*log(i+1))*floor(10)");
    embz_expr_fold(e);
    parse_ok(g, "10/(i*log(i+1))");
    for (long k = 0; k < e->len; k++) ck_assert_int_ne(e->nodes[k].op, EMBZ_OP_FLOOR);
    for (slong i = 1; i < 50; i += 7) {
        ck_assert_int_eq(eval_at(x, e, i, 100, 128), EMBZ_OK);
        ck_assert_int_eq(eval_at(y, g, i, 100, 128), EMBZ_OK);
        ck_assert(arb_overlaps(x, y));
    }
    /* after binding a = 1/2: a + 1 is the number 3/2 */
    embz_expr_t b;
    fmpq vals[2];
    embz_expr_init(b);
    fmpq_init(vals); fmpq_init(vals + 1);
    fmpq_set_si(vals, 1, 2);
    parse_ok(b, "i^(a + 1)");
    embz_expr_bind(b, vals);
    ck_assert_int_eq(b->nodes[b->nodes[b->root].b].op, EMBZ_OP_NUM);
    fmpq_set_si(vals + 1, 3, 2);
    ck_assert(fmpq_equal(b->nodes[b->nodes[b->root].b].num, vals + 1));
    fmpq_clear(vals); fmpq_clear(vals + 1);
    embz_expr_clear(b);
    embz_expr_clear(e); embz_expr_clear(g);
    arb_clear(x); arb_clear(y);
}
END_TEST


/* embz_expr_affine and embz_expr_geomean: w(a i + b) against w evaluated at a i + b, and
 * sqrt(x y) against the root of the product of the two values (arb's own sqrt), at many
 * points, including expressions where the root cannot be pushed inside (odd halves, negative
 * factors: the composed expression must then be undefined, never a different value). The
 * substitution x = e^u of the composed inverse weight must leave no cancelling exponentials
 * (the form the large-n engine integrates). */
START_TEST(test_compose)
{
    static const char *ws[] = { "1/i", "1/(i*log(i+1)^2)", "0.9^i", "i^(-1/2)*exp(-i/50)",
                                "1/(i*log(i+1)*log(log(i+2)))", "(i - 3)^2 + 1", "i^3/(1+i)^2",
                                "(i - 30)^2", "2 - i/10", "(5 - i)^3", "sqrt(i) + 4/i" };
    embz_expr_t w, x, y, g, phi;
    fmpq_t a, b;
    arb_t v, u, t, pt, nn;
    embz_expr_init(w); embz_expr_init(x); embz_expr_init(y); embz_expr_init(g);
    embz_expr_init(phi);
    fmpq_init(a); fmpq_init(b);
    arb_init(v); arb_init(u); arb_init(t); arb_init(pt); arb_init(nn);
    arb_set_si(nn, 1000);
    for (size_t k = 0; k < sizeof(ws) / sizeof(ws[0]); k++) {
        parse_ok(w, ws[k]);
        for (slong dd = 1; dd <= 4; dd++) {
            for (slong bb = -3; bb <= 2; bb++) {
                fmpq_set_si(a, dd, 1);
                fmpq_set_si(b, bb, 2);
                ck_assert_int_eq(embz_expr_affine(x, w, a, b), EMBZ_OK);
                fmpq_set_si(b, bb + 1, 1);
                fmpq_one(a);
                ck_assert_int_eq(embz_expr_affine(y, w, a, b), EMBZ_OK);
                ck_assert_int_eq(embz_expr_geomean(g, x, y), EMBZ_OK);
                for (slong i = 1; i <= 60; i += 7) {
                    /* x(i) = w(dd i + bb/2) */
                    arb_set_si(pt, 2 * dd * i + bb);
                    arb_mul_2exp_si(pt, pt, -1);
                    int s1 = embz_expr_eval_arb(v, w, pt, nn, 128);
                    arb_set_si(pt, i);
                    int s2 = embz_expr_eval_arb(u, x, pt, nn, 128);
                    ck_assert_int_eq(s1, s2);
                    if (s1 == EMBZ_OK)
                        ck_assert_msg(arb_overlaps(u, v) && arb_rel_accuracy_bits(u) > 100,
                                      "%s: affine at %ld", ws[k], i);
                    /* g(i) = sqrt(x(i) y(i)) wherever g is defined */
                    int s3 = embz_expr_eval_arb(t, y, pt, nn, 128);
                    int s4 = embz_expr_eval_arb(v, g, pt, nn, 128);
                    if (s4 == EMBZ_OK) {
                        ck_assert(s2 == EMBZ_OK && s3 == EMBZ_OK);
                        arb_mul(u, u, t, 128);
                        ck_assert(!arb_is_negative(u));
                        arb_sqrtpos(u, u, 128);
                        ck_assert_msg(arb_overlaps(u, v), "%s: geomean at %ld", ws[k], i);
                        ck_assert(arb_is_nonnegative(v));
                    } else if (s2 == EMBZ_OK && s3 == EMBZ_OK) {
                        /* undefined only where a factor is negative */
                        ck_assert_msg(!arb_is_positive(u) || !arb_is_positive(t),
                                      "%s: geomean undefined at %ld", ws[k], i);
                    }
                }
            }
        }
    }
    /* sqrt(1/(2i - 1) * 1/i): u-form 1/sqrt(2 - e^-u) with no e^u left to cancel */
    parse_ok(w, "1/i");
    fmpq_set_si(a, 2, 1);
    fmpq_set_si(b, -1, 1);
    embz_expr_affine(x, w, a, b);
    fmpq_one(a);
    fmpq_zero(b);
    embz_expr_affine(y, w, a, b);
    embz_expr_geomean(g, x, y);
    ck_assert_int_eq(embz_expr_log_substitute(phi, g), EMBZ_OK);
    char *txt = embz_expr_to_string(phi);
    ck_assert_msg(strstr(txt, "exp(i)") == NULL, "phi = %s", txt);
    free(txt);
    /* log(i + 1) under i -> 2 i - 1 reads log(2 i) */
    parse_ok(w, "log(i + 1)");
    fmpq_set_si(a, 2, 1);
    fmpq_set_si(b, -1, 1);
    embz_expr_affine(x, w, a, b);
    txt = embz_expr_to_string(x);
    ck_assert_str_eq(txt, "log(2*i)");
    free(txt);
    embz_expr_clear(w); embz_expr_clear(x); embz_expr_clear(y); embz_expr_clear(g);
    embz_expr_clear(phi);
    fmpq_clear(a); fmpq_clear(b);
    arb_clear(v); arb_clear(u); arb_clear(t); arb_clear(pt); arb_clear(nn);
}
END_TEST

static Suite *expr_suite(void)
{
    Suite *s = suite_create("expr");
    TCase *tc = tcase_create("core");
    tcase_add_test(tc, test_precedence);
    tcase_add_test(tc, test_errors);
    tcase_add_test(tc, test_limits);
    tcase_add_test(tc, test_roundtrip);
    tcase_add_test(tc, test_bind_square_uses);
    tcase_add_test(tc, test_number_parse);
    tcase_add_test(tc, test_arb_values);
    tcase_add_test(tc, test_exact_rational_random);
    tcase_add_test(tc, test_double_vs_arb);
    tcase_add_test(tc, test_series_known);
    tcase_add_test(tc, test_series_linear_forms);
    tcase_add_test(tc, test_series_random);
    tcase_add_test(tc, test_acb);
    tcase_add_test(tc, test_log_split);
    tcase_add_test(tc, test_fold_constants);
    tcase_add_test(tc, test_eval_fmpq);
    tcase_add_test(tc, test_steps_binom);
    tcase_add_test(tc, test_compose);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    SRunner *sr = srunner_create(expr_suite());
    srunner_run_all(sr, CK_NORMAL);
    int failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    flint_cleanup();
    return failed != 0;
}
