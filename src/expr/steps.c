/* The step structure of an expression: the outermost floor and ceil nodes that carry i
 * (see embz_expr_step_nodes in embz/expr.h). */
#include "expr_impl.h"

/* 1 when i occurs in the subtree at node outside every floor and ceil; the outermost
 * floor/ceil nodes whose argument holds i are appended to nodes (count in *len). */
static int walk(long *nodes, slong max, slong *len, const embz_expr_t e, long node)
{
    const embz_node_t *nd = e->nodes + node;
    if (nd->op == EMBZ_OP_I) return 1;
    if (nd->op == EMBZ_OP_FLOOR || nd->op == EMBZ_OP_CEIL) {
        slong inner = 0;
        long scratch[1];
        /* does the argument hold i at all (inside or outside nested steps)? */
        int bare = walk(scratch, 0, &inner, e, nd->a);
        if (bare || inner > 0) {
            if (*len < max) nodes[*len] = node;
            (*len)++;
        }
        return 0;
    }
    int arity = _embz_op_arity(nd->op);
    int bad = 0;
    if (arity >= 1 && nd->a >= 0) bad |= walk(nodes, max, len, e, nd->a);
    if (arity >= 2 && nd->b >= 0) bad |= walk(nodes, max, len, e, nd->b);
    return bad;
}

slong embz_expr_step_nodes(long *nodes, slong max, const embz_expr_t e)
{
    if (e->root < 0) return 0;
    slong len = 0;
    if (walk(nodes, max, &len, e, e->root)) return -1;
    return len > max ? max + 1 : len;
}
