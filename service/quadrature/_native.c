/* Certified adaptive Simpson on float64 intervals, compiled.

   The same method as _simpson.py (Taylor enclosures of order 4 per panel, the
   Peano bounds of _peano.py intersected, worst-first bisection), for formulas
   whose certificate fits in float64.  Every operation rounds outward:

   - + - * / and sqrt are correctly rounded by IEEE 754 in round-to-nearest.
     A result is moved one ulp outward unless it is provably exact (TwoSum for
     sums, significand bit counts for products, quotients and roots), so exact
     values such as 1 - x*x at x = 1 stay exact points.
   - elementary functions come from the C library, which is not guaranteed to be
     correctly rounded: each value is widened by GUARD relative plus TINY
     absolute, far beyond the documented error of any mainstream libm, and the
     tests check this layer against python-flint balls.
   - ranges over intervals come from monotonicity, with extrema of sin and cos
     found by rigorous quarter-turn counting.

   The engine never refuses an integral: anything it cannot do (a value it
   cannot enclose, a panel it cannot bound at the depth limit, a tolerance below
   float64's resolution) makes it decline, and the Python engine, with its
   exact limits, arbitrary precision and detailed refusals, takes over.  No
   global state: every call owns its memory. */

#define PY_SSIZE_T_CLEAN
#include <Python.h>
#include <fenv.h>
#include <float.h>
#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#define ORDER 4
#define TERMS (ORDER + 1)
#define MAX_DEPTH 60
#define GUARD 0x1p-46          /* relative widening of every libm value: 64 to 128 ulps */
#define TINY 0x1p-1000         /* absolute widening, covers subnormal results */
#define BIG 1e300              /* magnitudes beyond this are treated as overflow */
#define TRIG_LIMIT 0x1p40      /* quarter-turn counting needs exact integers in float64 */

typedef struct { double lo, hi; } iv;
typedef struct { iv c[TERMS]; int len; } series;

typedef struct {
    const int32_t *code;       /* (opcode, argument) pairs */
    Py_ssize_t ops;
    const iv *consts;
    int stack_size;
    series *stack;
    int fault;
} machine;

enum {
    OP_X = 0, OP_CONST = 1, OP_NEG = 2, OP_ADD = 3, OP_SUB = 4, OP_MUL = 5, OP_DIV = 6, OP_SQR = 7,
    OP_POWI = 8, OP_POWR = 9, OP_MIN = 10, OP_MAX = 11,
    OP_SQRT = 20, OP_EXP, OP_LOG, OP_LOG10, OP_SIN, OP_COS, OP_TAN, OP_ASIN, OP_ACOS, OP_ATAN,
    OP_SINH, OP_COSH, OP_TANH, OP_ERF, OP_ABS
};

/* ---- directed rounding from round-to-nearest ------------------------------------------- */

/* the neighbouring float64 below / above x (nextafter without the library call) */
static inline double dn(double x) {
    if (x != x || x == -INFINITY) return x;
    if (x == 0) return -0x1p-1074;
    uint64_t u;
    memcpy(&u, &x, sizeof u);
    u = x > 0 ? u - 1 : u + 1;
    memcpy(&x, &u, sizeof u);
    return x;
}
static inline double up(double x) { return -dn(-x); }

static inline double add_dn(double x, double y) {
    double s = x + y, bp = s - x, e = (x - (s - bp)) + (y - bp);
    return (e < 0 || e != e) ? dn(s) : s;
}
static inline double add_up(double x, double y) {
    double s = x + y, bp = s - x, e = (x - (s - bp)) + (y - bp);
    return (e > 0 || e != e) ? up(s) : s;
}
/* Significant bits of a normal float64 (53 minus the trailing zeros of its significand). */
static inline int significant_bits(double x) {
    uint64_t u;
    memcpy(&u, &x, sizeof u);
    uint64_t m = (u & ((1ULL << 52) - 1)) | (1ULL << 52);
    return 53 - __builtin_ctzll(m);
}
/* a normal, finite result whose operands' significands fit together in 53 bits is exact */
static inline int normal(double p) { double a = fabs(p); return a >= 0x1p-1000 && a <= DBL_MAX; }

/* Products, quotients and square roots move one ulp outward unless they are provably exact by
   the bit count above (x*1, 1-2^-k squared, halving ...): cheaper than an FMA residual, and
   rigorous for every finite result, subnormal ones included (round-to-nearest is off by at most
   half a spacing). */
static inline int exact_product(double x, double y, double p) {
    return normal(p) && normal(x) && normal(y) && significant_bits(x) + significant_bits(y) <= 53;
}
static inline double mul_dn(double x, double y) {
    if (x == 0 || y == 0) return 0.0;
    double p = x * y;
    return exact_product(x, y, p) ? p : dn(p);
}
static inline double mul_up(double x, double y) {
    if (x == 0 || y == 0) return 0.0;
    double p = x * y;
    return exact_product(x, y, p) ? p : up(p);
}
/* An infinite endpoint stands for "unbounded", so inf/inf may be anything of its sign.  A quotient
   by a power of two is exact in the normal range. */
static inline double div_dn(double x, double y) {
    if (isinf(x) && isinf(y)) return (x > 0) == (y > 0) ? 0.0 : -INFINITY;
    if (x == 0) return 0.0;
    double q = x / y;
    return (normal(q) && normal(x) && normal(y) && significant_bits(y) == 1) ? q : dn(q);
}
static inline double div_up(double x, double y) {
    if (isinf(x) && isinf(y)) return (x > 0) == (y > 0) ? INFINITY : 0.0;
    if (x == 0) return 0.0;
    double q = x / y;
    return (normal(q) && normal(x) && normal(y) && significant_bits(y) == 1) ? q : up(q);
}
static inline int exact_root(double x, double s) {
    return normal(x) && normal(s) && 2 * significant_bits(s) <= 53 && s * s == x;
}
static inline double sqrt_dn(double x) {
    if (x <= 0) return 0.0;
    double s = sqrt(x);
    return exact_root(x, s) ? s : dn(s);
}
static inline double sqrt_up(double x) {
    if (x <= 0) return 0.0;
    double s = sqrt(x);
    return exact_root(x, s) ? s : up(s);
}

/* ---- interval arithmetic ----------------------------------------------------------------- */

/* min and max that propagate NaN (C's fmin/fmax drop it, which could hide an invalid bound) */
static inline double lesser(double a, double b) { return (a != a || b != b) ? NAN : (a < b ? a : b); }
static inline double greater(double a, double b) { return (a != a || b != b) ? NAN : (a > b ? a : b); }

static inline iv point(double x) { iv r = {x, x}; return r; }
static inline iv mk(double lo, double hi) { iv r = {lo, hi}; return r; }
static inline int finite_iv(iv a) { return a.lo >= -BIG && a.hi <= BIG && a.lo <= a.hi; }
/* Intermediate intervals may have infinite endpoints (an overflow means "beyond the float range",
   and 1/[2^1023, inf] is still a true enclosure); only NaN, from inf - inf or inf/inf, is invalid. */
static inline int valid_iv(iv a) { return a.lo <= a.hi; }

static inline iv iv_add(iv a, iv b) { return mk(add_dn(a.lo, b.lo), add_up(a.hi, b.hi)); }
static inline iv iv_sub(iv a, iv b) { return mk(add_dn(a.lo, -b.hi), add_up(a.hi, -b.lo)); }
static inline iv iv_neg(iv a) { return mk(-a.hi, -a.lo); }

static inline iv mul_point(iv a, double k) {   /* k finite, nonzero */
    if (k == 1) return a;
    if (k == -1) return mk(-a.hi, -a.lo);
    return k > 0 ? mk(mul_dn(a.lo, k), mul_up(a.hi, k)) : mk(mul_dn(a.hi, k), mul_up(a.lo, k));
}

static iv iv_mul(iv a, iv b) {
    if (b.lo == b.hi) return b.lo == 0 ? point(0.0) : mul_point(a, b.lo);
    if (a.lo == a.hi) return a.lo == 0 ? point(0.0) : mul_point(b, a.lo);
    if (a.lo >= 0 && b.lo >= 0) return mk(mul_dn(a.lo, b.lo), mul_up(a.hi, b.hi));
    if (a.hi <= 0 && b.hi <= 0) return mk(mul_dn(a.hi, b.hi), mul_up(a.lo, b.lo));
    if (a.lo >= 0 && b.hi <= 0) return mk(mul_dn(a.hi, b.lo), mul_up(a.lo, b.hi));
    if (a.hi <= 0 && b.lo >= 0) return mk(mul_dn(a.lo, b.hi), mul_up(a.hi, b.lo));
    /* mixed signs: rounding to nearest is monotone, so the extreme rounded products bracket the extreme
       exact ones once moved outward (finite operands: a product may overflow to inf, never NaN) */
    double p1 = a.lo * b.lo, p2 = a.lo * b.hi, p3 = a.hi * b.lo, p4 = a.hi * b.hi;
    return mk(dn(lesser(lesser(p1, p2), lesser(p3, p4))), up(greater(greater(p1, p2), greater(p3, p4))));
}

static iv iv_sqr(iv a) {
    if (a.lo >= 0) return mk(mul_dn(a.lo, a.lo), mul_up(a.hi, a.hi));
    if (a.hi <= 0) return mk(mul_dn(a.hi, a.hi), mul_up(a.lo, a.lo));
    return mk(0.0, greater(mul_up(a.lo, a.lo), mul_up(a.hi, a.hi)));
}

static iv iv_div(machine *m, iv a, iv b) {
    if (b.lo <= 0 && b.hi >= 0) { m->fault = 1; return point(0); }
    double l = lesser(lesser(div_dn(a.lo, b.lo), div_dn(a.lo, b.hi)), lesser(div_dn(a.hi, b.lo), div_dn(a.hi, b.hi)));
    double h = greater(greater(div_up(a.lo, b.lo), div_up(a.lo, b.hi)), greater(div_up(a.hi, b.lo), div_up(a.hi, b.hi)));
    return mk(l, h);
}

static inline iv iv_scale(iv a, double k) { return iv_mul(a, point(k)); }   /* k a float, exact */
static inline iv iv_hull(iv a, iv b) { return mk(lesser(a.lo, b.lo), greater(a.hi, b.hi)); }
static inline iv iv_abs(iv a) {
    if (a.lo >= 0) return a;
    if (a.hi <= 0) return iv_neg(a);
    return mk(0.0, greater(-a.lo, a.hi));
}
static inline int iv_sign(iv a) { return a.lo > 0 ? 1 : (a.hi < 0 ? -1 : 0); }
static inline double iv_width(iv a) { return add_up(a.hi, -a.lo); }

/* x^n for x >= 0, rounded down or up (binary powering of nonnegative numbers is monotone) */
static double pos_pow(double x, int n, int upward) {
    double result = 1.0, base = x;
    while (n) {
        if (n & 1) result = upward ? mul_up(result, base) : mul_dn(result, base);
        n >>= 1;
        if (n) base = upward ? mul_up(base, base) : mul_dn(base, base);
    }
    return result;
}

static iv iv_pow_int(machine *m, iv a, int n) {   /* n >= 1 */
    if (n % 2 == 1) {
        double l = a.lo >= 0 ? pos_pow(a.lo, n, 0) : -pos_pow(-a.lo, n, 1);
        double h = a.hi >= 0 ? pos_pow(a.hi, n, 1) : -pos_pow(-a.hi, n, 0);
        return mk(l, h);
    }
    iv b = iv_abs(a);
    (void)m;
    return mk(pos_pow(b.lo, n, 0), pos_pow(b.hi, n, 1));
}

/* ---- guarded elementary functions -------------------------------------------------------- */

/* A library value y widened to a lower / upper bound of the true value.  An overflowed y means a
   true value beyond 2^1023 in magnitude. */
static inline double g_dn(double y) {
    if (y == INFINITY) return 0x1p1023;
    if (y == -INFINITY || y != y) return y;
    return dn(dn(y - fabs(y) * GUARD) - TINY);
}
static inline double g_up(double y) {
    if (y == -INFINITY) return -0x1p1023;
    if (y == INFINITY || y != y) return y;
    return up(up(y + fabs(y) * GUARD) + TINY);
}

/* 2/pi rounded down and up */
static const double TWO_OVER_PI_LO = 0x1.45f306dc9c882p-1;
static const double TWO_OVER_PI_HI = 0x1.45f306dc9c883p-1;

/* rigorous range of x*2/pi for x in a */
static iv quarter_turns(iv a) {
    iv c = mk(TWO_OVER_PI_LO, TWO_OVER_PI_HI);
    return iv_mul(a, c);
}

/* does [t.lo, t.hi] contain an integer congruent to r modulo 4? */
static int has_residue(iv t, int r) {
    double k = ceil(t.lo);
    for (int i = 0; i < 4 && k <= t.hi; i++, k += 1.0) {
        long long ki = (long long)k;
        if ((((ki % 4) + 4) % 4) == r) return 1;
    }
    return 0;
}

/* sin (shift 0) or cos (shift 1): the maximum sits at quarter turns 1 - shift (mod 4),
   the minimum at 3 - shift (mod 4) */
static iv iv_sincos(iv a, int shift) {
    if (!(fabs(a.lo) <= TRIG_LIMIT && fabs(a.hi) <= TRIG_LIMIT)) return mk(-1.0, 1.0);
    iv t = quarter_turns(a);
    if (t.hi - t.lo >= 4.0) return mk(-1.0, 1.0);
    double y1 = shift ? cos(a.lo) : sin(a.lo);
    double y2 = a.lo == a.hi ? y1 : (shift ? cos(a.hi) : sin(a.hi));
    double l = g_dn(lesser(y1, y2)), h = g_up(greater(y1, y2));
    if (a.lo == a.hi && a.lo == 0) return shift ? point(1.0) : point(0.0);
    if (has_residue(t, (1 - shift + 4) % 4)) h = 1.0;
    if (has_residue(t, (3 - shift + 4) % 4)) l = -1.0;
    return mk(greater(l, -1.0), lesser(h, 1.0));
}

static iv iv_tan(machine *m, iv a) {
    if (!(fabs(a.lo) <= TRIG_LIMIT && fabs(a.hi) <= TRIG_LIMIT)) { m->fault = 1; return point(0); }
    iv t = quarter_turns(a);
    if (t.hi - t.lo >= 2.0 || has_residue(t, 1) || has_residue(t, 3)) { m->fault = 1; return point(0); }
    if (a.lo == 0 && a.hi == 0) return point(0.0);
    return mk(g_dn(tan(a.lo)), g_up(tan(a.hi)));
}

typedef double (*real_fn)(double);

static const double HALF_PI_UP = 0x1.921fb54442d19p+0;   /* pi/2 and pi rounded up: clamps only */
static const double PI_UP = 0x1.921fb54442d19p+1;

static inline iv increasing(real_fn f, iv a, double floor_, double ceil_) {
    double l = f(a.lo), h = a.lo == a.hi ? l : f(a.hi);   /* NaN stays NaN and fails the validity check */
    return mk(greater(g_dn(l), floor_), lesser(g_up(h), ceil_));
}

static iv function_value(machine *m, int op, iv a) {
    switch (op) {
    case OP_SQRT:
        if (a.lo < 0) { m->fault = 1; return point(0); }
        return mk(sqrt_dn(a.lo), sqrt_up(a.hi));
    case OP_EXP:
        if (a.lo == 0 && a.hi == 0) return point(1.0);
        return increasing(exp, a, 0.0, INFINITY);
    case OP_LOG:
    case OP_LOG10: {
        if (a.lo <= 0) { m->fault = 1; return point(0); }
        if (a.lo == 1 && a.hi == 1) return point(0.0);
        return increasing(op == OP_LOG ? log : log10, a, -INFINITY, INFINITY);
    }
    case OP_SIN: return iv_sincos(a, 0);
    case OP_COS: return iv_sincos(a, 1);
    case OP_TAN: return iv_tan(m, a);
    case OP_ASIN:
    case OP_ACOS:
        if (a.lo < -1 || a.hi > 1) { m->fault = 1; return point(0); }
        if (op == OP_ASIN) {
            if (a.lo == 0 && a.hi == 0) return point(0.0);
            return increasing(asin, a, -HALF_PI_UP, HALF_PI_UP);
        }
        return mk(greater(g_dn(acos(a.hi)), 0.0), lesser(g_up(acos(a.lo)), PI_UP));
    case OP_ATAN:
        if (a.lo == 0 && a.hi == 0) return point(0.0);
        return increasing(atan, a, -HALF_PI_UP, HALF_PI_UP);
    case OP_SINH:
        if (a.lo == 0 && a.hi == 0) return point(0.0);
        return increasing(sinh, a, -INFINITY, INFINITY);
    case OP_TANH:
        if (a.lo == 0 && a.hi == 0) return point(0.0);
        return increasing(tanh, a, -1.0, 1.0);
    case OP_ERF:
        if (a.lo == 0 && a.hi == 0) return point(0.0);
        return increasing(erf, a, -1.0, 1.0);
    case OP_COSH: {
        if (a.lo == 0 && a.hi == 0) return point(1.0);
        iv b = iv_abs(a);
        return mk(greater(b.lo == 0 ? 1.0 : g_dn(cosh(b.lo)), 1.0), g_up(cosh(b.hi)));
    }
    case OP_ABS: return iv_abs(a);
    }
    m->fault = 1;
    return point(0);
}

/* ---- Taylor series over an interval (the recurrences of derivatives/_series.py) ---------- */

static const double WHOLE[TERMS] = {0, 1, 2, 3, 4};
/* 1/k enclosed: 1/3 is not a float */
static iv inverse(int k) {
    switch (k) {
    case 1: return point(1.0);
    case 2: return point(0.5);
    case 4: return point(0.25);
    default: return mk(div_dn(1.0, (double)k), div_up(1.0, (double)k));
    }
}

static void s_const(series *s, iv c, int len) {
    s->len = len;
    s->c[0] = c;
    for (int k = 1; k < TERMS; k++) s->c[k] = point(0.0);
}

static iv dot(const iv *a, const iv *b, int k) {
    iv total = iv_mul(a[0], b[k]);
    for (int j = 1; j <= k; j++) total = iv_add(total, iv_mul(a[j], b[k - j]));
    return total;
}

static void s_mul(series *out, const series *a, const series *b) {
    int n = a->len < b->len ? a->len : b->len;
    series r;
    r.len = n;
    for (int k = 0; k < n; k++) r.c[k] = dot(a->c, b->c, k);
    *out = r;
}

static void s_square(series *out, const series *a) {
    series r;
    r.len = a->len;
    r.c[0] = iv_sqr(a->c[0]);
    for (int k = 1; k < a->len; k++) {
        iv total = point(0.0);
        for (int j = 0; j < (k + 1) / 2; j++) total = iv_add(total, iv_mul(a->c[j], a->c[k - j]));
        total = iv_scale(total, 2.0);
        if (k % 2 == 0) total = iv_add(total, iv_sqr(a->c[k / 2]));
        r.c[k] = total;
    }
    *out = r;
}

static void s_div(machine *m, series *out, const series *a, const series *b) {
    int n = a->len < b->len ? a->len : b->len;
    series r;
    r.len = n;
    r.c[0] = iv_div(m, a->c[0], b->c[0]);
    for (int k = 1; k < n; k++) {
        iv acc = a->c[k];
        for (int j = 1; j <= k; j++) acc = iv_sub(acc, iv_mul(b->c[j], r.c[k - j]));
        r.c[k] = iv_div(m, acc, b->c[0]);
    }
    *out = r;
}

/* f(u) with f' = g(f): f_k = (1/k) sum_{j=1..k} j u_j g_{k-j}; kind 0: g = f (exp),
   kind 1: g = 1 + f^2 (tan), kind -1: g = 1 - f^2 (tanh) */
static void s_driven(series *out, const series *u, iv value, int kind) {
    series r;
    iv g[TERMS];
    r.len = u->len;
    r.c[0] = value;
    for (int k = 1; k < u->len; k++) {
        int mm = k - 1;
        if (kind == 0) {
            g[mm] = r.c[mm];
        } else {
            iv sq = dot(r.c, r.c, mm);
            if (mm == 0) g[mm] = kind > 0 ? iv_add(point(1.0), sq) : iv_sub(point(1.0), sq);
            else g[mm] = kind > 0 ? sq : iv_neg(sq);
        }
        iv acc = iv_mul(u->c[1], g[k - 1]);
        for (int j = 2; j <= k; j++) acc = iv_add(acc, iv_scale(iv_mul(u->c[j], g[k - j]), WHOLE[j]));
        r.c[k] = iv_mul(acc, inverse(k));
    }
    *out = r;
}

/* sin/cos (sign -1) or sinh/cosh (sign +1) together */
static void s_pair(series *s, series *c, const series *u, iv s0, iv c0, int sign) {
    s->len = c->len = u->len;
    s->c[0] = s0;
    c->c[0] = c0;
    for (int k = 1; k < u->len; k++) {
        iv as = point(0.0), ac = point(0.0);
        for (int j = 1; j <= k; j++) {
            as = iv_add(as, iv_scale(iv_mul(u->c[j], c->c[k - j]), WHOLE[j]));
            ac = iv_add(ac, iv_scale(iv_mul(u->c[j], s->c[k - j]), WHOLE[j]));
        }
        s->c[k] = iv_mul(as, inverse(k));
        c->c[k] = iv_mul(sign > 0 ? ac : iv_neg(ac), inverse(k));
    }
}

/* the series with value `value` whose derivative series is d (length len - 1) */
static void s_integrate(series *out, iv value, const series *d, int len) {
    series r;
    r.len = len;
    r.c[0] = value;
    for (int k = 1; k < len; k++) r.c[k] = iv_mul(d->c[k - 1], inverse(k));
    *out = r;
}

static void s_derivative(series *out, const series *a) {
    series r;
    r.len = a->len - 1;
    for (int k = 1; k < a->len; k++) r.c[k - 1] = iv_scale(a->c[k], WHOLE[k]);
    *out = r;
}

static void s_truncate(series *out, const series *a, int len) {
    *out = *a;
    out->len = len;
}

static void s_sqrt(machine *m, series *out, const series *u) {
    iv s0 = function_value(m, OP_SQRT, u->c[0]);
    series r;
    r.c[0] = s0;
    if (u->len == 1 || iv_sign(s0) <= 0) { r.len = 1; *out = r; return; }
    iv twice = iv_scale(s0, 2.0);
    r.len = u->len;
    for (int k = 1; k < u->len; k++) {
        iv acc = u->c[k];
        for (int j = 1; j < k; j++) acc = iv_sub(acc, iv_mul(r.c[j], r.c[k - j]));
        r.c[k] = iv_div(m, acc, twice);
    }
    *out = r;
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

static void s_asin(machine *m, series *out, const series *u, int op) {
    iv value = function_value(m, op, u->c[0]);
    if (u->len == 1) { s_const(out, value, 1); return; }
    series du, base, sq, root, q;
    s_derivative(&du, u);
    s_truncate(&base, u, u->len - 1);
    s_square(&sq, &base);
    for (int k = 0; k < sq.len; k++) sq.c[k] = iv_neg(sq.c[k]);
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
    series du, base, sq, gauss, slope;
    s_derivative(&du, u);
    s_truncate(&base, u, u->len - 1);
    s_square(&sq, &base);
    for (int k = 0; k < sq.len; k++) sq.c[k] = iv_neg(sq.c[k]);
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
    if (side > 0) { *out = *u; return; }
    if (side < 0) {
        *out = *u;
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
    series result, base = *u;
    if (n == 0) { s_const(out, point(1.0), u->len); return; }
    int have = 0, k = n;
    while (k) {
        if (k & 1) {
            if (have) s_mul(&result, &result, &base);
            else { result = base; have = 1; }
        }
        k >>= 1;
        if (k) s_square(&base, &base);
    }
    iv tight = iv_pow_int(m, u->c[0], n);
    result.c[0] = mk(greater(result.c[0].lo, tight.lo), lesser(result.c[0].hi, tight.hi));
    if (negative) {
        series one;
        s_const(&one, point(1.0), result.len);
        s_div(m, out, &one, &result);
    } else {
        *out = result;
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
            for (int k = 1; k < TERMS; k++) st[top].c[k] = point(k == 1 ? 1.0 : 0.0);
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
    *result = st[0];
    return 0;
}

/* ---- panels and refinement --------------------------------------------------------------- */

typedef struct {
    iv p, m, q, fp, fm, fq;
    iv enclosure;
    double width, centre, rounding;
    int depth, order, resolved;
} panel;

typedef struct {
    machine *vm;
    iv ln10, two_over_root_pi;
    iv c_signed, c_abs[4];     /* -24/2880 and C_k * k! for k = 1..3 */
    panel *panels;
    Py_ssize_t count, capacity;
    Py_ssize_t *heap;          /* indices of live panels, max-heap by width */
    Py_ssize_t heap_size;
    long long nodes;
    int overflow;              /* a Taylor coefficient left the float64 range */
} refiner;

static int node_value(refiner *r, iv x, iv *out) {
    series s;
    if (evaluate(r->vm, x, 0, &s, &r->ln10, &r->two_over_root_pi) || !finite_iv(s.c[0])) return -1;
    *out = s.c[0];
    return 0;
}

static void certify(refiner *r, panel *pn) {
    iv width = iv_sub(pn->q, pn->p);
    iv simpson = iv_div(r->vm, iv_mul(width, iv_add(iv_add(pn->fp, pn->fq), iv_scale(pn->fm, 4.0))), point(6.0));
    pn->rounding = iv_width(simpson);
    pn->resolved = 0;
    pn->width = INFINITY;
    pn->centre = 0;
    pn->order = -1;
    series s;
    if (evaluate(r->vm, mk(pn->p.lo, pn->q.hi), ORDER, &s, &r->ln10, &r->two_over_root_pi)) return;
    for (int k = 0; k < s.len; k++) {
        /* beyond float64's range the bounds lose all their information: the precise engine's
           unbounded exponents do better, so the run declines */
        if (!finite_iv(s.c[k])) { r->overflow = 1; return; }
    }
    iv best = iv_mul(width, s.c[0]), enclosure = best;
    int best_order = 0;
    iv candidates[4];
    int orders[4], n = 0;
    if (s.len == TERMS) {
        iv w5 = iv_pow_int(r->vm, width, 5);
        candidates[n] = iv_add(simpson, iv_mul(iv_mul(w5, r->c_signed), s.c[4]));
        orders[n++] = 4;
    }
    for (int k = 3; k >= 1; k--) {
        if (s.len > k) {
            iv size = iv_abs(s.c[k]);
            iv radius = iv_mul(iv_mul(iv_pow_int(r->vm, width, k + 1), r->c_abs[k]), size);
            candidates[n] = iv_add(simpson, mk(-radius.hi, radius.hi));
            orders[n++] = k;
        }
    }
    for (int i = 0; i < n; i++) {
        if (iv_width(candidates[i]) < iv_width(best)) { best = candidates[i]; best_order = orders[i]; }
        enclosure = mk(greater(enclosure.lo, candidates[i].lo), lesser(enclosure.hi, candidates[i].hi));
    }
    if (r->vm->fault || !finite_iv(enclosure)) return;
    pn->enclosure = enclosure;
    pn->order = best_order;
    pn->width = iv_width(enclosure);
    pn->centre = 0.5 * enclosure.lo + 0.5 * enclosure.hi;
    pn->resolved = 1;
}

static int grow(refiner *r) {
    if (r->count < r->capacity) return 0;
    Py_ssize_t capacity = r->capacity ? 2 * r->capacity : 256;
    panel *p = realloc(r->panels, (size_t)capacity * sizeof(panel));
    if (!p) return -1;
    r->panels = p;
    Py_ssize_t *h = realloc(r->heap, (size_t)capacity * sizeof(Py_ssize_t));
    if (!h) return -1;
    r->heap = h;
    r->capacity = capacity;
    return 0;
}

static inline double key(refiner *r, Py_ssize_t i) { return r->panels[r->heap[i]].width; }

static void heap_push(refiner *r, Py_ssize_t index) {
    Py_ssize_t i = r->heap_size++;
    r->heap[i] = index;
    while (i > 0) {
        Py_ssize_t parent = (i - 1) / 2;
        if (key(r, parent) >= key(r, i)) break;
        Py_ssize_t t = r->heap[parent]; r->heap[parent] = r->heap[i]; r->heap[i] = t;
        i = parent;
    }
}

static Py_ssize_t heap_pop(refiner *r) {
    Py_ssize_t top = r->heap[0];
    r->heap[0] = r->heap[--r->heap_size];
    Py_ssize_t i = 0;
    for (;;) {
        Py_ssize_t l = 2 * i + 1, rr = l + 1, largest = i;
        if (l < r->heap_size && key(r, l) > key(r, largest)) largest = l;
        if (rr < r->heap_size && key(r, rr) > key(r, largest)) largest = rr;
        if (largest == i) break;
        Py_ssize_t t = r->heap[largest]; r->heap[largest] = r->heap[i]; r->heap[i] = t;
        i = largest;
    }
    return top;
}

static double now(void) {
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static double target_of(double tol, double rel, double lo, double hi) {
    if (rel <= 0 || (lo <= 0 && 0 <= hi)) return tol;
    double smaller = lesser(fabs(lo), fabs(hi));
    return greater(tol, rel * smaller);
}

/* status codes shared with _fast.py */
enum { MET = 0, NODE_BUDGET = 1, DEADLINE = 2,
       DECLINE_VALUE = -1, DECLINE_DEPTH = -2, DECLINE_RESOLUTION = -3, DECLINE_UNRESOLVED = -4,
       DECLINE_MEMORY = -5, DECLINE_ROUNDING_MODE = -6, DECLINE_RANGE = -7, DECLINE_STALLED = -8 };

/* a new panel in slot `reuse` (a panel just split, whose slot is free) or at the end */
static int make_panel(refiner *r, iv p, iv q, iv fp, iv fq, int depth, Py_ssize_t reuse, Py_ssize_t *index) {
    if (reuse < 0 && grow(r)) return DECLINE_MEMORY;
    Py_ssize_t slot = reuse < 0 ? r->count : reuse;
    panel *pn = &r->panels[slot];
    pn->p = p; pn->q = q; pn->fp = fp; pn->fq = fq; pn->depth = depth;
    pn->m = mk(0.5 * add_dn(p.lo, q.lo), 0.5 * add_up(p.hi, q.hi));   /* halving is exact above 2^-1021 */
    if (fabs(pn->m.lo) < 0x1p-1000 || fabs(pn->m.hi) < 0x1p-1000) pn->m = mk(dn(pn->m.lo), up(pn->m.hi));
    if (node_value(r, pn->m, &pn->fm)) return DECLINE_VALUE;
    r->nodes++;
    certify(r, pn);
    *index = slot;
    if (reuse < 0) r->count++;
    return r->overflow ? DECLINE_RANGE : 0;
}

static int run(refiner *r, iv a, iv b, double tol, double rel, long long max_nodes, double deadline, iv *total_out) {
    iv fa, fb;
    if (node_value(r, a, &fa) || node_value(r, b, &fb)) return DECLINE_VALUE;
    r->nodes = 2;
    Py_ssize_t first;
    int status = make_panel(r, a, b, fa, fb, 0, -1, &first);
    if (status) return status;
    double width_sum = 0, centre_sum = 0, rounding_sum = 0, next_check = INFINITY;
    double width_at_checkpoint = INFINITY;
    long long unresolved = 0, steps = 0;
    Py_ssize_t checkpoint = 64;
    int stalls = 0;
#define ACCOUNT(i, s) do { panel *pp = &r->panels[i]; rounding_sum += (s) * pp->rounding; \
        if (pp->resolved) { width_sum += (s) * pp->width; centre_sum += (s) * pp->centre; } else unresolved += (s); } while (0)
    heap_push(r, first);
    ACCOUNT(first, 1);
    for (;;) {
        if (!unresolved) {
            double half = width_sum / 2;
            double goal = target_of(tol, rel, centre_sum - half, centre_sum + half);
            if (half <= goal * 1.01 && width_sum < next_check) {
                iv total = point(0.0);
                for (Py_ssize_t i = 0; i < r->heap_size; i++) total = iv_add(total, r->panels[r->heap[i]].enclosure);
                double bound = up(0.5 * iv_width(total));
                if (bound <= target_of(tol, rel, total.lo, total.hi) * (1 - 1e-9)) { *total_out = total; return MET; }
                next_check = width_sum * 0.95;
            }
            if (rounding_sum > 0.25 * goal) return DECLINE_RESOLUTION;   /* float64 cannot get there */
            if (r->heap_size >= checkpoint) {
                /* doubling the panels must shrink the total: if twice in a row it barely moves, the
                   float64 floor has been reached before the tolerance */
                stalls = width_sum > 0.9 * width_at_checkpoint ? stalls + 1 : 0;
                if (stalls >= 2) return DECLINE_STALLED;
                width_at_checkpoint = width_sum;
                checkpoint *= 2;
            }
        }
        if (r->nodes + 2 > max_nodes || ((++steps & 31) == 0 && deadline > 0 && now() > deadline)) {
            if (unresolved) return DECLINE_UNRESOLVED;
            iv total = point(0.0);
            for (Py_ssize_t i = 0; i < r->heap_size; i++) total = iv_add(total, r->panels[r->heap[i]].enclosure);
            *total_out = total;
            return r->nodes + 2 > max_nodes ? NODE_BUDGET : DEADLINE;
        }
        Py_ssize_t worst = r->heap[0];
        if (r->panels[worst].depth >= MAX_DEPTH) return DECLINE_DEPTH;
        heap_pop(r);
        ACCOUNT(worst, -1);
        panel parent = r->panels[worst];
        Py_ssize_t left, right;
        if ((status = make_panel(r, parent.p, parent.m, parent.fp, parent.fm, parent.depth + 1, worst, &left)))
            return status;
        if ((status = make_panel(r, parent.m, parent.q, parent.fm, parent.fq, parent.depth + 1, -1, &right)))
            return status;
        heap_push(r, left);
        ACCOUNT(left, 1);
        heap_push(r, right);
        ACCOUNT(right, 1);
    }
#undef ACCOUNT
}

/* ---- Python entry points ----------------------------------------------------------------- */

static const iv LN10 = {0x1.26bb1bbb55515p+1, 0x1.26bb1bbb55516p+1};                /* ln 10, down and up */
static const iv TWO_OVER_ROOT_PI = {0x1.20dd750429b6dp+0, 0x1.20dd750429b6ep+0};    /* 2/sqrt(pi) */

/* indices in range and a stack that never underflows or overflows and ends with one value */
static int check_program(const machine *vm, Py_ssize_t nconst) {
    static const signed char effect[] = {1, 1, 0, -1, -1, -1, -1, 0, 0, -1, -1, -1};
    int depth = 0;
    for (Py_ssize_t i = 0; i < vm->ops; i++) {
        int op = vm->code[2 * i], arg = vm->code[2 * i + 1], e;
        if (op >= 0 && op <= OP_MAX) e = effect[op];
        else if (op >= OP_SQRT && op <= OP_ABS) e = 0;
        else { PyErr_SetString(PyExc_ValueError, "unknown opcode"); return -1; }
        if (op == OP_CONST && (arg < 0 || arg >= nconst)) { PyErr_SetString(PyExc_ValueError, "bad constant"); return -1; }
        if (op == OP_POWI && (arg < -1024 || arg > 1024)) { PyErr_SetString(PyExc_ValueError, "bad power"); return -1; }
        int needs = e == 1 ? 0 : (e == 0 ? 1 : 2);
        if (depth < needs) { PyErr_SetString(PyExc_ValueError, "stack underflow"); return -1; }
        depth += e;
        if (depth > vm->stack_size) { PyErr_SetString(PyExc_ValueError, "stack overflow"); return -1; }
    }
    if (depth != 1) { PyErr_SetString(PyExc_ValueError, "program leaves no single value"); return -1; }
    return 0;
}

static int read_iv(PyObject *seq, Py_ssize_t i, iv *out) {
    PyObject *pair = PySequence_Fast_GET_ITEM(seq, i);
    if (!PyTuple_Check(pair) || PyTuple_GET_SIZE(pair) != 2) {
        PyErr_SetString(PyExc_TypeError, "constants must be (low, high) tuples");
        return -1;
    }
    out->lo = PyFloat_AsDouble(PyTuple_GET_ITEM(pair, 0));
    out->hi = PyFloat_AsDouble(PyTuple_GET_ITEM(pair, 1));
    if (PyErr_Occurred()) return -1;
    if (!(out->lo <= out->hi) || !isfinite(out->lo) || !isfinite(out->hi)) {
        PyErr_SetString(PyExc_ValueError, "constants must be finite with low <= high");
        return -1;
    }
    return 0;
}

static PyObject *native_integrate(PyObject *self, PyObject *args) {
    (void)self;
    Py_buffer code;
    PyObject *consts_obj;
    int stack_size, want_mesh;
    double a_lo, a_hi, b_lo, b_hi, tol, rel, seconds;
    long long max_nodes;
    if (!PyArg_ParseTuple(args, "y*OidddddddLp:integrate", &code, &consts_obj, &stack_size, &a_lo, &a_hi, &b_lo,
                          &b_hi, &tol, &rel, &seconds, &max_nodes, &want_mesh))
        return NULL;
    PyObject *result = NULL, *consts_seq = NULL;
    iv *consts = NULL;
    series *stack = NULL;
    refiner r;
    memset(&r, 0, sizeof r);
    machine vm;
    memset(&vm, 0, sizeof vm);
    if (code.len % 8 != 0 || stack_size < 1 || stack_size > 1024) {
        PyErr_SetString(PyExc_ValueError, "malformed program");
        goto done;
    }
    consts_seq = PySequence_Fast(consts_obj, "constants must be a sequence");
    if (!consts_seq) goto done;
    Py_ssize_t nconst = PySequence_Fast_GET_SIZE(consts_seq);
    consts = PyMem_Malloc((size_t)(nconst + 1) * sizeof(iv));
    stack = PyMem_Malloc((size_t)stack_size * sizeof(series));
    if (!consts || !stack) { PyErr_NoMemory(); goto done; }
    for (Py_ssize_t i = 0; i < nconst; i++) if (read_iv(consts_seq, i, &consts[i])) goto done;
    vm.code = (const int32_t *)code.buf;
    vm.ops = code.len / 8;
    vm.consts = consts;
    vm.stack_size = stack_size;
    vm.stack = stack;
    if (check_program(&vm, nconst)) goto done;
    int status;
    iv total = point(0.0);
    double started = now();
    if (fegetround() != FE_TONEAREST) {
        status = DECLINE_ROUNDING_MODE;
    } else {
        r.vm = &vm;
        r.ln10 = LN10;
        r.two_over_root_pi = TWO_OVER_ROOT_PI;
        r.c_signed = mk(div_dn(-1.0, 120.0), div_up(-1.0, 120.0));    /* -24/2880 */
        r.c_abs[1] = mk(div_dn(5.0, 36.0), div_up(5.0, 36.0));
        r.c_abs[2] = mk(div_dn(2.0, 81.0), div_up(2.0, 81.0));
        r.c_abs[3] = mk(div_dn(1.0, 96.0), div_up(1.0, 96.0));
        Py_BEGIN_ALLOW_THREADS
        status = run(&r, mk(a_lo, a_hi), mk(b_lo, b_hi), tol, rel, max_nodes,
                     seconds > 0 ? started + seconds : 0.0, &total);
        Py_END_ALLOW_THREADS
    }
    long long counts[5] = {0, 0, 0, 0, 0};
    PyObject *mesh = Py_None;
    Py_INCREF(mesh);
    if (status >= 0) {
        for (Py_ssize_t i = 0; i < r.heap_size; i++) counts[r.panels[r.heap[i]].order]++;
        if (want_mesh) {
            Py_DECREF(mesh);
            mesh = PyList_New(r.heap_size);
            if (!mesh) goto done;
            for (Py_ssize_t i = 0; i < r.heap_size; i++) {
                panel *pn = &r.panels[r.heap[i]];
                PyObject *row = Py_BuildValue("(ddddi)", pn->p.lo, pn->q.hi, pn->enclosure.lo, pn->enclosure.hi,
                                              pn->order);
                if (!row) { Py_DECREF(mesh); goto done; }
                PyList_SET_ITEM(mesh, i, row);
            }
        }
    }
    result = Py_BuildValue("(iddLn(LLLLL)N)", status, total.lo, total.hi, r.nodes, r.heap_size, counts[0],
                           counts[1], counts[2], counts[3], counts[4], mesh);
done:
    PyBuffer_Release(&code);
    Py_XDECREF(consts_seq);
    PyMem_Free(consts);
    PyMem_Free(stack);
    free(r.panels);
    free(r.heap);
    return result;
}

/* the Taylor coefficients f^(k)(X)/k! of a program over X = [lo, hi], for the tests of the recurrences */
static PyObject *native_taylor(PyObject *self, PyObject *args) {
    (void)self;
    Py_buffer code;
    PyObject *consts_obj, *result = NULL, *consts_seq = NULL;
    int stack_size, order;
    double lo, hi;
    if (!PyArg_ParseTuple(args, "y*Oiddi:taylor", &code, &consts_obj, &stack_size, &lo, &hi, &order)) return NULL;
    iv *consts = NULL;
    series *stack = NULL;
    if (order < 0 || order > ORDER || stack_size < 1 || stack_size > 1024 || code.len % 8 || !(lo <= hi)) {
        PyErr_SetString(PyExc_ValueError, "bad arguments");
        goto done;
    }
    consts_seq = PySequence_Fast(consts_obj, "constants must be a sequence");
    if (!consts_seq) goto done;
    Py_ssize_t nconst = PySequence_Fast_GET_SIZE(consts_seq);
    consts = PyMem_Malloc((size_t)(nconst + 1) * sizeof(iv));
    stack = PyMem_Malloc((size_t)stack_size * sizeof(series));
    if (!consts || !stack) { PyErr_NoMemory(); goto done; }
    for (Py_ssize_t i = 0; i < nconst; i++) if (read_iv(consts_seq, i, &consts[i])) goto done;
    machine vm = {(const int32_t *)code.buf, code.len / 8, consts, stack_size, stack, 0};
    if (check_program(&vm, nconst)) goto done;
    iv ln10 = LN10, two = TWO_OVER_ROOT_PI;
    series s;
    if (evaluate(&vm, mk(lo, hi), order, &s, &ln10, &two)) { result = Py_None; Py_INCREF(result); goto done; }
    result = PyList_New(s.len);
    if (!result) goto done;
    for (int k = 0; k < s.len; k++) PyList_SET_ITEM(result, k, Py_BuildValue("(dd)", s.c[k].lo, s.c[k].hi));
done:
    PyBuffer_Release(&code);
    Py_XDECREF(consts_seq);
    PyMem_Free(consts);
    PyMem_Free(stack);
    return result;
}

/* one guarded function over an interval, for the property tests of this layer */
static PyObject *native_enclose(PyObject *self, PyObject *args) {
    (void)self;
    int op;
    double lo, hi;
    if (!PyArg_ParseTuple(args, "idd:enclose", &op, &lo, &hi)) return NULL;
    if (!(op >= OP_SQRT && op <= OP_ABS) || !(lo <= hi)) {
        PyErr_SetString(PyExc_ValueError, "unknown function or empty interval");
        return NULL;
    }
    machine vm;
    memset(&vm, 0, sizeof vm);
    iv r = function_value(&vm, op, mk(lo, hi));
    if (vm.fault || !finite_iv(r)) Py_RETURN_NONE;
    return Py_BuildValue("(dd)", r.lo, r.hi);
}

/* one arithmetic operation on two intervals (0 add, 1 sub, 2 mul, 3 div, 4 sqr, 5 power n) */
static PyObject *native_operate(PyObject *self, PyObject *args) {
    (void)self;
    int op, n = 0;
    double alo, ahi, blo, bhi;
    if (!PyArg_ParseTuple(args, "idddd|i:operate", &op, &alo, &ahi, &blo, &bhi, &n)) return NULL;
    machine vm;
    memset(&vm, 0, sizeof vm);
    iv a = mk(alo, ahi), b = mk(blo, bhi), r;
    switch (op) {
    case 0: r = iv_add(a, b); break;
    case 1: r = iv_sub(a, b); break;
    case 2: r = iv_mul(a, b); break;
    case 3: r = iv_div(&vm, a, b); break;
    case 4: r = iv_sqr(a); break;
    case 5:
        if (n < 1 || n > 1024) { PyErr_SetString(PyExc_ValueError, "power out of range"); return NULL; }
        r = iv_pow_int(&vm, a, n);
        break;
    default: PyErr_SetString(PyExc_ValueError, "unknown operation"); return NULL;
    }
    if (vm.fault) Py_RETURN_NONE;
    return Py_BuildValue("(dd)", r.lo, r.hi);
}

static PyMethodDef methods[] = {
    {"integrate", native_integrate, METH_VARARGS, "Certified adaptive Simpson of a compiled program."},
    {"taylor", native_taylor, METH_VARARGS, "Taylor coefficient enclosures of a compiled program."},
    {"enclose", native_enclose, METH_VARARGS, "Guarded enclosure of one elementary function."},
    {"operate", native_operate, METH_VARARGS, "One outward-rounded interval operation."},
    {NULL, NULL, 0, NULL},
};

static struct PyModuleDef module = {PyModuleDef_HEAD_INIT, "_native", "Compiled float64 interval engine.", -1,
                                    methods, NULL, NULL, NULL, NULL};

PyMODINIT_FUNC PyInit__native(void) { return PyModule_Create(&module); }
