/* Canonical text of an expression: minimal parentheses for the grammar of parse.c, so that
 * parsing the text gives back the same tree (see expr.h for the one exception: numbers
 * that have no literal form). */
#include <stdlib.h>
#include <string.h>
#include "expr_impl.h"

typedef struct { char *s; size_t len, cap; } sbuf_t;

static void put(sbuf_t *b, const char *t)
{
    size_t l = strlen(t);
    if (b->len + l + 1 > b->cap) {
        size_t nc = b->cap ? b->cap : 64;
        while (b->len + l + 1 > nc) nc *= 2;
        char *ns = realloc(b->s, nc);
        if (ns == NULL) abort();
        b->s = ns;
        b->cap = nc;
    }
    memcpy(b->s + b->len, t, l + 1);
    b->len += l;
}

static void put_fmpz(sbuf_t *b, const fmpz_t z)
{
    char *t = fmpz_get_str(NULL, 10, z);
    put(b, t);
    flint_free(t);
}

/* Precedence levels: 1 sum, 2 product, 3 unary minus, 4 power, 5 atom. */
static int prec_of(const embz_node_t *nd)
{
    switch (nd->op) {
    case EMBZ_OP_ADD: case EMBZ_OP_SUB: return 1;
    case EMBZ_OP_MUL: case EMBZ_OP_DIV: return 2;
    case EMBZ_OP_NEG: return 3;
    case EMBZ_OP_POW: return 4;
    case EMBZ_OP_NUM:
        /* numbers without a literal form print as "(...)" and are atoms then */
        return 5;
    default: return 5;
    }
}

/* Writes |x| as a decimal literal when its denominator is 2^a 5^b; returns 0 otherwise. */
static int put_decimal(sbuf_t *b, const fmpq_t x)
{
    fmpz_t q, m, t;
    ulong a2 = 0, a5 = 0, k;
    int ok = 0;
    fmpz_init(q); fmpz_init(m); fmpz_init(t);
    fmpz_set(q, fmpq_denref(x));
    /* each factor removed in one step (one at a time was quadratic in the exponent) */
    fmpz_t five;
    fmpz_init_set_ui(five, 5);
    a2 = fmpz_is_zero(q) ? 0 : fmpz_val2(q);
    fmpz_fdiv_q_2exp(q, q, a2);
    a5 = fmpz_remove(q, q, five);
    fmpz_clear(five);
    if (fmpz_is_one(q)) {
        ok = 1;
        k = a2 > a5 ? a2 : a5;
        fmpz_set_ui(t, 10);
        fmpz_pow_ui(t, t, k);
        fmpz_mul(m, fmpq_numref(x), t);
        fmpz_divexact(m, m, fmpq_denref(x));
        fmpz_abs(m, m);
        if (k == 0) {
            /* integer: strip long runs of trailing zeros into an exponent */
            ulong z = 0;
            if (!fmpz_is_zero(m)) {
                fmpz_t ten;
                fmpz_init_set_ui(ten, 10);
                z = fmpz_remove(m, m, ten);
                fmpz_clear(ten);
            }
            if (z > 20 && z <= EMBZ_NUMBER_MAX_EXP) {   /* an exponent the parser reads */
                char buf[32];
                put_fmpz(b, m);
                snprintf(buf, sizeof(buf), "e+%lu", (unsigned long) z);
                put(b, buf);
            } else {
                fmpz_set_ui(t, 10);
                fmpz_pow_ui(t, t, z);
                fmpz_mul(m, m, t);
                put_fmpz(b, m);
            }
        } else if (k > 20 && k <= EMBZ_NUMBER_MAX_EXP) {
            char buf[32];
            put_fmpz(b, m);
            snprintf(buf, sizeof(buf), "e-%lu", (unsigned long) k);
            put(b, buf);
        } else {
            char *d = fmpz_get_str(NULL, 10, m);
            size_t l = strlen(d);
            if (l <= k) {
                put(b, "0.");
                for (size_t z = l; z < k; z++) put(b, "0");
                put(b, d);
            } else {
                char *w = malloc(l + 2);
                if (w == NULL) abort();
                memcpy(w, d, l - k);
                w[l - k] = '.';
                memcpy(w + l - k + 1, d + l - k, k + 1);
                put(b, w);
                free(w);
            }
            flint_free(d);
        }
    }
    fmpz_clear(q); fmpz_clear(m); fmpz_clear(t);
    return ok;
}

static void put_num(sbuf_t *b, const fmpq_t x)
{
    if (fmpq_sgn(x) >= 0) {
        sbuf_t tmp = {NULL, 0, 0};
        if (put_decimal(&tmp, x)) { put(b, tmp.s); free(tmp.s); return; }
        free(tmp.s);
    }
    /* no literal form: parenthesised expression of the same value */
    put(b, "(");
    if (fmpq_sgn(x) < 0) put(b, "-");
    fmpq_t a;
    fmpq_init(a);
    fmpq_abs(a, x);
    if (fmpz_is_one(fmpq_denref(a))) put_fmpz(b, fmpq_numref(a));
    else if (!put_decimal(b, a)) {
        put_fmpz(b, fmpq_numref(a));
        put(b, "/");
        put_fmpz(b, fmpq_denref(a));
    }
    fmpq_clear(a);
    put(b, ")");
}

static void print_node(sbuf_t *b, const embz_expr_struct *e, int k);

static void print_child(sbuf_t *b, const embz_expr_struct *e, int k, int minprec)
{
    int paren = prec_of(e->nodes + k) < minprec;
    if (paren) put(b, "(");
    print_node(b, e, k);
    if (paren) put(b, ")");
}

static void print_node(sbuf_t *b, const embz_expr_struct *e, int k)
{
    const embz_node_t *nd = e->nodes + k;
    switch (nd->op) {
    case EMBZ_OP_NUM: put_num(b, nd->num); return;
    case EMBZ_OP_I: put(b, "i"); return;
    case EMBZ_OP_N: put(b, "n"); return;
    case EMBZ_OP_PARAM:
        put(b, (nd->param >= 0 && nd->param < e->nparams) ? e->params[nd->param] : "?");
        return;
    case EMBZ_OP_NEG:
        put(b, "-");
        print_child(b, e, nd->a, 3);
        return;
    case EMBZ_OP_ADD: case EMBZ_OP_SUB:
        print_child(b, e, nd->a, 1);
        put(b, nd->op == EMBZ_OP_ADD ? " + " : " - ");
        print_child(b, e, nd->b, 2);
        return;
    case EMBZ_OP_MUL: case EMBZ_OP_DIV:
        print_child(b, e, nd->a, 2);
        put(b, nd->op == EMBZ_OP_MUL ? "*" : "/");
        print_child(b, e, nd->b, 3);
        return;
    case EMBZ_OP_POW:
        print_child(b, e, nd->a, 5);
        put(b, "^");
        print_child(b, e, nd->b, 3);
        return;
    default: {
        const char *name = _embz_op_name(nd->op);
        put(b, name != NULL ? name : "?");
        if (_embz_op_arity(nd->op) == 0) return;
        put(b, "(");
        print_node(b, e, nd->a);
        if (nd->b >= 0) { put(b, ", "); print_node(b, e, nd->b); }
        put(b, ")");
        return;
    }
    }
}

char *embz_expr_to_string(const embz_expr_t e)
{
    sbuf_t b = {NULL, 0, 0};
    put(&b, "");
    if (e->root >= 0) print_node(&b, e, e->root);
    return b.s;
}
