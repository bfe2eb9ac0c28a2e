/* Taylor-mode automatic differentiation on float64 intervals: the recurrences of
   derivatives/_series.py, and the stack machine that runs a compiled formula.  Included once, by
   _native.c. */

#ifndef QUADCERT_NATIVE_SERIES_H
#define QUADCERT_NATIVE_SERIES_H

#include "_native_interval.h"

/* ---- Taylor series over an interval (the recurrences of derivatives/_series.py) ---------- */

static const double WHOLE[TERMS] = {0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18, 19, 20};
/* a / k for an integer k >= 1: each end divided and rounded outward (exact where it can be) */
static inline iv over(iv a, int k) { return mk(div_dn(a.lo, (double)k), div_up(a.hi, (double)k)); }

/* 1 + the index of a series' last term that is not an exact 0 (1 for a constant, 2 for a x + b): the
   convolutions skip the exact zeros past it, whose products are exact zeros */
static inline int extent(const series *a) {
    int e = a->len;
    while (e > 1 && a->c[e - 1].lo == 0 && a->c[e - 1].hi == 0) e--;
    return e;
}

/* a series copied by its used terms only (a whole struct is 21 intervals; most runs use 5 or 11) */
static inline void s_copy(series *out, const series *a) {
    if (out == a) return;
    out->len = a->len;
    memcpy(out->c, a->c, (size_t)a->len * sizeof(iv));
}

static void s_const(series *s, iv c, int len) {
    s->len = len;
    s->c[0] = c;
    for (int k = 1; k < len; k++) s->c[k] = point(0.0);   /* terms past len are never read */
}

/* ---- sums of products in midpoint-radius form --------------------------------------------
   The convolutions below are most of a series' cost.  Each interval enters them once as a midpoint and
   a radius, and a sum of products is then branch-free float arithmetic whose rounding is bounded at the
   end (docs/compiled-tiers.md, section 7):
   - the midpoints' sum s is within gamma_n * sum |x y| <= 2(n+1)u * size of the exact sum of their
     products (n products, n - 1 additions; size, the computed sum of |x y|, is within (1 - nu) of it);
   - the radius adds |x| r_y + |y| r_x + r_x r_y per term, an upper bound of |XY - xy| over the intervals;
   - rad and size are sums of nonnegative rounded terms, at most 6n roundings (n <= 21), so MR_SLACK
     covers them; MR_TINY covers every underflowed product.
   An infinite or invalid operand makes the result [-inf, inf], which the caller reads as an overflow. */
#define MR_SLACK (1 + 0x1p-40)
#define MR_TINY 0x1p-1060

typedef struct { double m, r; } mr;   /* [m - r, m + r] */

static inline mr to_mr(iv a) {
    mr x;
    if (!(a.lo >= -DBL_MAX && a.hi <= DBL_MAX)) { x.m = 0.0; x.r = INFINITY; return x; }
    x.m = 0.5 * a.lo + 0.5 * a.hi;   /* any float between the ends will do: r is measured from it */
    x.r = greater(add_up(x.m, -a.lo), add_up(a.hi, -x.m));
    return x;
}

static inline void to_mr_all(mr *out, const iv *a, int n) { for (int j = 0; j < n; j++) out[j] = to_mr(a[j]); }

/* an enclosure of the sum over j = from..to of a[j] * b[k - j] */
static iv mr_dot(const mr *a, const mr *b, int from, int to, int k) {
    double s = 0.0, size = 0.0, rad = 0.0;
    int products = 0;   /* nonzero products: without any, and with no radius, the sum is an exact 0 */
    for (int j = from; j <= to; j++) {
        double x = a[j].m, y = b[k - j].m, p = x * y;
        s += p;
        size += fabs(p);
        rad += fabs(x) * b[k - j].r + fabs(y) * a[j].r + a[j].r * b[k - j].r;
        products += x != 0 && y != 0;
    }
    int n = to - from + 1;
    if (n <= 0 || (products == 0 && rad == 0)) return point(0.0);
    double e = (rad + size * (double)(n + 1) * 0x1p-52) * MR_SLACK + MR_TINY;
    if (!(e <= DBL_MAX) || s != s || !(fabs(s) <= DBL_MAX)) return mk(-INFINITY, INFINITY);
    return mk(add_dn(s, -e), add_up(s, e));
}

static void s_mul(series *out, const series *a, const series *b) {
    int n = a->len < b->len ? a->len : b->len;
    int ea = extent(a), eb = extent(b);
    series r;
    r.len = n;
    if (ea == 1 || eb == 1) {   /* a constant factor: each term once */
        iv k = ea == 1 ? a->c[0] : b->c[0];
        const series *other = ea == 1 ? b : a;
        for (int j = 0; j < n; j++) r.c[j] = iv_mul(other->c[j], k);
    } else {
        mr am[TERMS], bm[TERMS];
        to_mr_all(am, a->c, ea < n ? ea : n);
        to_mr_all(bm, b->c, eb < n ? eb : n);
        r.c[0] = iv_mul(a->c[0], b->c[0]);
        for (int k = 1; k < n; k++) {
            int from = k - eb + 1 > 0 ? k - eb + 1 : 0, to = k < ea - 1 ? k : ea - 1;
            r.c[k] = mr_dot(am, bm, from, to, k);
        }
    }
    s_copy(out, &r);
}

static void s_square(series *out, const series *a) {
    mr am[TERMS];
    to_mr_all(am, a->c, a->len);
    series r;
    r.len = a->len;
    r.c[0] = iv_sqr(a->c[0]);
    for (int k = 1; k < a->len; k++) {
        iv total = iv_scale(mr_dot(am, am, 0, (k - 1) / 2, k), 2.0);
        if (k % 2 == 0) total = iv_add(total, iv_sqr(a->c[k / 2]));
        r.c[k] = total;
    }
    s_copy(out, &r);
}

static void s_div(machine *m, series *out, const series *a, const series *b) {
    int n = a->len < b->len ? a->len : b->len;
    mr bm[TERMS], rm[TERMS];
    to_mr_all(bm, b->c, n);
    series r;
    r.len = n;
    r.c[0] = iv_div(m, a->c[0], b->c[0]);
    rm[0] = to_mr(r.c[0]);
    for (int k = 1; k < n; k++) {
        r.c[k] = iv_div(m, iv_sub(a->c[k], mr_dot(bm, rm, 1, k, k)), b->c[0]);
        rm[k] = to_mr(r.c[k]);
    }
    s_copy(out, &r);
}

/* j u_j for j = 1..len-1, as midpoints and radii (the recurrences below all weigh u_j by j) */
static void weighted_slopes(mr *out, const series *u) {
    for (int j = 1; j < u->len; j++) out[j] = to_mr(iv_scale(u->c[j], WHOLE[j]));
}

/* f(u) with f' = g(f): f_k = (1/k) sum_{j=1..k} j u_j g_{k-j}; kind 0: g = f (exp),
   kind 1: g = 1 + f^2 (tan), kind -1: g = 1 - f^2 (tanh) */
static void s_driven(series *out, const series *u, iv value, int kind) {
    series r;
    mr du[TERMS], g[TERMS], rm[TERMS];
    weighted_slopes(du, u);
    int span = extent(u) - 1;   /* j u_j is an exact 0 past it */
    r.len = u->len;
    r.c[0] = value;
    rm[0] = to_mr(value);
    for (int k = 1; k < u->len; k++) {
        int mm = k - 1;
        if (kind == 0) {
            g[mm] = rm[mm];
        } else {
            iv sq = mm == 0 ? iv_sqr(r.c[0]) : mr_dot(rm, rm, 0, mm, mm);
            if (mm == 0) g[mm] = to_mr(kind > 0 ? iv_add(point(1.0), sq) : iv_sub(point(1.0), sq));
            else g[mm] = to_mr(kind > 0 ? sq : iv_neg(sq));
        }
        r.c[k] = over(mr_dot(du, g, 1, k < span ? k : span, k), k);
        rm[k] = to_mr(r.c[k]);
    }
    s_copy(out, &r);
}

/* sin/cos (sign -1) or sinh/cosh (sign +1) together */
static void s_pair(series *s, series *c, const series *u, iv s0, iv c0, int sign) {
    mr du[TERMS], sm[TERMS], cm[TERMS];
    weighted_slopes(du, u);
    int span = extent(u) - 1;   /* j u_j is an exact 0 past it */
    s->len = c->len = u->len;
    s->c[0] = s0;
    c->c[0] = c0;
    sm[0] = to_mr(s0);
    cm[0] = to_mr(c0);
    for (int k = 1; k < u->len; k++) {
        int to = k < span ? k : span;
        iv as = mr_dot(du, cm, 1, to, k), ac = mr_dot(du, sm, 1, to, k);
        s->c[k] = over(as, k);
        c->c[k] = over(sign > 0 ? ac : iv_neg(ac), k);
        sm[k] = to_mr(s->c[k]);
        cm[k] = to_mr(c->c[k]);
    }
}

/* the series with value `value` whose derivative series is d (length len - 1) */
static void s_integrate(series *out, iv value, const series *d, int len) {
    series r;
    r.len = len;
    r.c[0] = value;
    for (int k = 1; k < len; k++) r.c[k] = over(d->c[k - 1], k);
    s_copy(out, &r);
}

static void s_derivative(series *out, const series *a) {
    series r;
    r.len = a->len - 1;
    for (int k = 1; k < a->len; k++) r.c[k - 1] = iv_scale(a->c[k], WHOLE[k]);
    s_copy(out, &r);
}

static void s_truncate(series *out, const series *a, int len) {
    s_copy(out, a);
    out->len = len;
}

static void s_sqrt(machine *m, series *out, const series *u) {
    iv s0 = function_value(m, OP_SQRT, u->c[0]);
    series r;
    r.c[0] = s0;
    if (u->len == 1 || iv_sign(s0) <= 0) { r.len = 1; s_copy(out, &r); return; }
    iv twice = iv_scale(s0, 2.0);
    r.len = u->len;
    mr rm[TERMS];
    for (int k = 1; k < u->len; k++) {
        iv acc = k > 1 ? iv_sub(u->c[k], mr_dot(rm, rm, 1, k - 1, k)) : u->c[k];
        r.c[k] = iv_div(m, acc, twice);
        rm[k] = to_mr(r.c[k]);
    }
    s_copy(out, &r);
}

/* log, log10 (scale = ln 10) and atan: value plus the integral of u'/denominator */
static void s_log(machine *m, series *out, const series *u, int op, const iv *ln10) {
    iv value = function_value(m, op, u->c[0]);
    if (u->len == 1) { s_const(out, value, 1); return; }
    series du, base, q;
    s_derivative(&du, u);
    s_truncate(&base, u, u->len - 1);
    if (op == OP_LOG10) for (int k = 0; k < base.len; k++) base.c[k] = iv_mul(base.c[k], *ln10);
    s_div(m, &q, &du, &base);
    s_integrate(out, value, &q, u->len);
}

static void s_atan(machine *m, series *out, const series *u) {
    iv value = function_value(m, OP_ATAN, u->c[0]);
    if (u->len == 1) { s_const(out, value, 1); return; }
    series du, base, den, q;
    s_derivative(&du, u);
    s_truncate(&base, u, u->len - 1);
    s_square(&den, &base);
    den.c[0] = iv_add(den.c[0], point(1.0));
    s_div(m, &q, &du, &den);
    s_integrate(out, value, &q, u->len);
}

/* u' and -(u without its last term)^2: the shared start of asin/acos (1 - u^2 under a root) and
   erf (exp of -u^2) */
static void s_slope_and_minus_square(series *du, series *minus_sq, const series *u) {
    series base;
    s_derivative(du, u);
    s_truncate(&base, u, u->len - 1);
    s_square(minus_sq, &base);
    for (int k = 0; k < minus_sq->len; k++) minus_sq->c[k] = iv_neg(minus_sq->c[k]);
}

static void s_asin(machine *m, series *out, const series *u, int op) {
    iv value = function_value(m, op, u->c[0]);
    if (u->len == 1) { s_const(out, value, 1); return; }
    series du, sq, root, q;
    s_slope_and_minus_square(&du, &sq, u);
    sq.c[0] = iv_add(sq.c[0], point(1.0));
    s_sqrt(m, &root, &sq);
    if (root.len < u->len - 1) { s_const(out, value, 1); return; }
    s_div(m, &q, &du, &root);
    if (op == OP_ACOS) for (int k = 0; k < q.len; k++) q.c[k] = iv_neg(q.c[k]);
    s_integrate(out, value, &q, u->len);
}

static void s_erf(machine *m, series *out, const series *u, const iv *two_over_root_pi) {
    iv value = function_value(m, OP_ERF, u->c[0]);
    if (u->len == 1) { s_const(out, value, 1); return; }
    series du, sq, gauss, slope;
    s_slope_and_minus_square(&du, &sq, u);
    s_driven(&gauss, &sq, function_value(m, OP_EXP, sq.c[0]), 0);
    s_mul(&slope, &gauss, &du);
    for (int k = 0; k < slope.len; k++) slope.c[k] = iv_mul(slope.c[k], *two_over_root_pi);
    s_integrate(out, value, &slope, u->len);
}

/* value plus an almost-everywhere slope enclosure, for kinks of abs, min and max */
static void s_lipschitz(series *out, iv value, const iv *slopes, int count, int len) {
    out->c[0] = value;
    if (len == 1 || count == 0) { out->len = 1; return; }
    iv slope = slopes[0];
    for (int i = 1; i < count; i++) slope = iv_hull(slope, slopes[i]);
    out->c[1] = slope;
    out->len = 2;
}

static void s_abs(series *out, const series *u) {
    int side = iv_sign(u->c[0]);
    if (side > 0) { s_copy(out, u); return; }
    if (side < 0) {
        s_copy(out, u);
        for (int k = 0; k < u->len; k++) out->c[k] = iv_neg(u->c[k]);
        return;
    }
    iv slopes[2];
    int count = 0;
    if (u->len > 1) { slopes[0] = u->c[1]; slopes[1] = iv_neg(u->c[1]); count = 2; }
    s_lipschitz(out, iv_abs(u->c[0]), slopes, count, u->len < 2 ? u->len : 2);
}

static void s_extremum(series *out, const series *a, const series *b, int largest) {
    iv gap = iv_sub(b->c[0], a->c[0]);
    int side = iv_sign(gap);
    if (side != 0) { *out = ((side > 0) == largest) ? *b : *a; return; }
    int len = a->len < b->len ? a->len : b->len;
    if (len > 2) len = 2;
    iv value = largest ? mk(greater(a->c[0].lo, b->c[0].lo), greater(a->c[0].hi, b->c[0].hi))
                       : mk(lesser(a->c[0].lo, b->c[0].lo), lesser(a->c[0].hi, b->c[0].hi));
    iv slopes[2];
    int count = 0;
    if (len > 1) { slopes[0] = a->c[1]; slopes[1] = b->c[1]; count = 2; }
    s_lipschitz(out, value, slopes, count, len);
}

static void s_pow_int(machine *m, series *out, const series *u, int n) {
    int negative = n < 0;
    if (negative) n = -n;
    series result, base;
    s_copy(&base, u);
    if (n == 0) { s_const(out, point(1.0), u->len); return; }
    int have = 0, k = n;
    while (k) {
        if (k & 1) {
            if (have) s_mul(&result, &result, &base);
            else { s_copy(&result, &base); have = 1; }
        }
        k >>= 1;
        if (k) s_square(&base, &base);
    }
    iv tight = iv_pow_int(u->c[0], n);
    result.c[0] = mk(greater(result.c[0].lo, tight.lo), lesser(result.c[0].hi, tight.hi));
    if (negative) {
        series one;
        s_const(&one, point(1.0), result.len);
        s_div(m, out, &one, &result);
    } else {
        s_copy(out, &result);
    }
}

/* u^v: exp(v log u) for u > 0; with u reaching 0 only the value, for v > 0 */
static void s_pow_real(machine *m, series *out, const series *u, const series *v) {
    if (iv_sign(u->c[0]) > 0) {
        series lg, prod;
        s_log(m, &lg, u, OP_LOG, NULL);
        s_mul(&prod, v, &lg);
        s_driven(out, &prod, function_value(m, OP_EXP, prod.c[0]), 0);
        return;
    }
    iv a = u->c[0], b = v->c[0];
    if (a.lo < 0 || b.lo <= 0) { m->fault = 1; s_const(out, point(0), 1); return; }
    /* x^y is increasing in x for y > 0 and monotone in y for fixed x: the range sits at corners */
    double l = INFINITY, h = -INFINITY;
    double xs[2] = {a.lo, a.hi}, ys[2] = {b.lo, b.hi};
    for (int i = 0; i < 2; i++) {
        for (int j = 0; j < 2; j++) {
            iv corner;
            if (xs[i] == 0) corner = point(0.0);
            else corner = function_value(m, OP_EXP, iv_mul(point(ys[j]), function_value(m, OP_LOG, point(xs[i]))));
            l = lesser(l, corner.lo);
            h = greater(h, corner.hi);
        }
    }
    s_const(out, mk(l, h), 1);
}

/* run the program on x = [X, 1, 0, ...] of length order + 1; returns 0 or sets m->fault */
static int evaluate(machine *m, iv x, int order, series *result, const iv *ln10, const iv *two_over_root_pi) {
    int top = 0;
    series *st = m->stack;
    m->fault = 0;
    for (Py_ssize_t i = 0; i < m->ops; i++) {
        int op = m->code[2 * i], arg = m->code[2 * i + 1];
        series *a = top >= 1 ? &st[top - 1] : NULL, *b = top >= 2 ? &st[top - 2] : NULL;
        switch (op) {
        case OP_X:
            st[top].len = order + 1;
            st[top].c[0] = x;
            for (int k = 1; k <= order; k++) st[top].c[k] = point(k == 1 ? 1.0 : 0.0);
            top++;
            break;
        case OP_CONST: s_const(&st[top++], m->consts[arg], order + 1); break;
        case OP_NEG: for (int k = 0; k < a->len; k++) a->c[k] = iv_neg(a->c[k]); break;
        case OP_ADD:
        case OP_SUB: {   /* b op a, b is below */
            int n = a->len < b->len ? a->len : b->len;
            for (int k = 0; k < n; k++) b->c[k] = op == OP_ADD ? iv_add(b->c[k], a->c[k]) : iv_sub(b->c[k], a->c[k]);
            b->len = n;
            top--;
            break;
        }
        case OP_MUL: s_mul(b, b, a); top--; break;
        case OP_DIV: s_div(m, b, b, a); top--; break;
        case OP_SQR: s_square(a, a); break;
        case OP_POWI: s_pow_int(m, a, a, arg); break;
        case OP_POWR: s_pow_real(m, b, b, a); top--; break;
        case OP_MIN:
        case OP_MAX: s_extremum(b, b, a, op == OP_MAX); top--; break;
        case OP_SQRT: s_sqrt(m, a, a); break;
        case OP_EXP: s_driven(a, a, function_value(m, OP_EXP, a->c[0]), 0); break;
        case OP_TAN: s_driven(a, a, function_value(m, OP_TAN, a->c[0]), 1); break;
        case OP_TANH: s_driven(a, a, function_value(m, OP_TANH, a->c[0]), -1); break;
        case OP_LOG:
        case OP_LOG10: s_log(m, a, a, op, ln10); break;
        case OP_ATAN: s_atan(m, a, a); break;
        case OP_ASIN:
        case OP_ACOS: s_asin(m, a, a, op); break;
        case OP_ERF: s_erf(m, a, a, two_over_root_pi); break;
        case OP_ABS: s_abs(a, a); break;
        case OP_SIN:
        case OP_COS:
        case OP_SINH:
        case OP_COSH: {
            if (a->len == 1) {   /* a value only (nodes): the partner function is not needed */
                s_const(a, function_value(m, op, a->c[0]), 1);
                break;
            }
            series s, c;
            int hyperbolic = op == OP_SINH || op == OP_COSH;
            iv s0 = function_value(m, hyperbolic ? OP_SINH : OP_SIN, a->c[0]);
            iv c0 = function_value(m, hyperbolic ? OP_COSH : OP_COS, a->c[0]);
            s_pair(&s, &c, a, s0, c0, hyperbolic ? 1 : -1);
            *a = (op == OP_SIN || op == OP_SINH) ? s : c;
            break;
        }
        default: m->fault = 1; return -1;
        }
        if (m->fault) return -1;
        series *t = &st[top - 1];
        for (int k = 0; k < t->len; k++) if (!valid_iv(t->c[k])) { m->fault = 1; return -1; }
    }
    if (top != 1) { m->fault = 1; return -1; }
    s_copy(result, &st[0]);
    return 0;
}

#endif
