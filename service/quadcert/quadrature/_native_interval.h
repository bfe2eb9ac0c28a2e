/* Outward-rounded float64 interval arithmetic and the guarded elementary functions of the
   compiled engine (see _native.c for the rounding argument).  Included once, by _native.c. */

#ifndef QUADCERT_NATIVE_INTERVAL_H
#define QUADCERT_NATIVE_INTERVAL_H

#define PY_SSIZE_T_CLEAN
#include <Python.h>
#include <fenv.h>
#include <float.h>
#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#define ORDER 20          /* the most Taylor terms a series holds: 10-point Gauss–Legendre panels need f^(20) */
#define SIMPSON_ORDER 4   /* what Simpson's bounds use */
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
    int tight;                 /* values at points from the tight tier (_native_tight.h) where it covers them */
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
    /* the extremes of a/b sit at known corners once the signs are known: two divisions, not eight */
    if (b.lo > 0) {
        if (a.lo >= 0) return mk(div_dn(a.lo, b.hi), div_up(a.hi, b.lo));
        if (a.hi <= 0) return mk(div_dn(a.lo, b.lo), div_up(a.hi, b.hi));
        return mk(div_dn(a.lo, b.lo), div_up(a.hi, b.lo));
    }
    if (a.lo >= 0) return mk(div_dn(a.hi, b.hi), div_up(a.lo, b.lo));
    if (a.hi <= 0) return mk(div_dn(a.hi, b.lo), div_up(a.lo, b.hi));
    return mk(div_dn(a.hi, b.hi), div_up(a.lo, b.hi));
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

static iv iv_pow_int(iv a, int n) {   /* n >= 1 */
    if (n % 2 == 1) {
        double l = a.lo >= 0 ? pos_pow(a.lo, n, 0) : -pos_pow(-a.lo, n, 1);
        double h = a.hi >= 0 ? pos_pow(a.hi, n, 1) : -pos_pow(-a.hi, n, 0);
        return mk(l, h);
    }
    iv b = iv_abs(a);
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

#include "_native_tight.h"

typedef double (*real_fn)(double);

static const double HALF_PI_UP = 0x1.921fb54442d19p+0;   /* pi/2 and pi rounded up: clamps only */
static const double PI_UP = 0x1.921fb54442d19p+1;

static inline iv increasing(real_fn f, iv a, double floor_, double ceil_) {
    double l = f(a.lo), h = a.lo == a.hi ? l : f(a.hi);   /* NaN stays NaN and fails the validity check */
    return mk(greater(g_dn(l), floor_), lesser(g_up(h), ceil_));
}

static iv function_value(machine *m, int op, iv a) {
    iv tight;
    if (m->tight && tight_value(op, a, &tight) == 0) return tight;
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

#endif
