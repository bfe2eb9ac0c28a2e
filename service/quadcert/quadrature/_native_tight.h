/* The compiled engine's tight tier: elementary functions at float64 points, enclosed in double-word
   intervals and rounded outward to the neighbouring floats.  docs/compiled-tiers.md gives the error
   analysis; the library's own results are used only as starting guesses, never trusted.
   Included once, by _native.c, after _native_interval.h. */

#ifndef QUADCERT_NATIVE_TIGHT_H
#define QUADCERT_NATIVE_TIGHT_H

/* The value h + l.  Every operation returns it normalised (|l| <= ulp(h)/2, and l = 0 when h = 0). */
typedef struct { double h, l; } dw;
/* Midpoint and radius: every value within r of m.  r >= 0 is a float, m a double word. */
typedef struct { dw m; double r; } ball;

#define DW_REL 0x1p-99      /* relative error bound per operation: 128 u^2, against at most 6.1 u^2 */
#define DW_ABS 0x1p-1000    /* absolute error bound per operation: covers every underflowed rounding */
#define DW_RANGE 0x1p900    /* magnitudes the tier accepts; beyond, the guarded layer answers */
/* A radius is a formula of at most 10 float operations on nonnegative floats, rounded to nearest, and uses
   |h| for |h + l| <= (1 + u)|h|; multiplied by SLACK (1 + 128 u), itself rounded, it bounds the exact
   formula from above (docs/compiled-tiers.md, section 4). */
#define SLACK (1 + 0x1p-46)

/* ---- error-free transformations and operations with an error bound --------------------------- */

static inline dw two_sum(double a, double b) {   /* exact: a + b = s + e (no overflow) */
    double s = a + b, bp = s - a, e = (a - (s - bp)) + (b - bp);
    dw r = {s, e};
    return r;
}

/* a + b for normalised a, b: within 3.1 u^2 (|a.h| + |b.h|) + eta of the exact sum
   (docs/compiled-tiers.md, section 3) */
static inline dw dw_add(dw a, dw b) {
    dw s = two_sum(a.h, b.h);
    double v = a.l + b.l;
    double w = s.l + v;
    return two_sum(s.h, w);
}

/* a * b for normalised a, b: within 6.1 u^2 |a.h b.h| + 2.5 eta of the exact product (the FMA makes
   a.h b.h exact to eta/2) */
static inline dw dw_mul(dw a, dw b) {
    double ch = a.h * b.h;
    double cl1 = fma(a.h, b.h, -ch);
    double tl0 = a.l * b.l;
    double tl1 = fma(a.h, b.l, tl0);
    double cl2 = fma(a.l, b.h, tl1);
    double cl3 = cl1 + cl2;
    return two_sum(ch, cl3);
}

static inline dw dw_point(double x) { dw r = {x, 0.0}; return r; }
static inline ball b_make(dw m, double r) { ball b = {m, r}; return b; }
static inline ball b_point(double x) { return b_make(dw_point(x), 0.0); }
static inline ball b_neg(ball a) { dw m = {-a.m.h, -a.m.l}; return b_make(m, a.r); }
static inline int b_ok(ball a) { return fabs(a.m.h) <= DW_RANGE && a.r <= DW_RANGE; }   /* false for NaN too */

static inline ball b_add(ball a, ball b) {
    double r = (a.r + b.r + (fabs(a.m.h) + fabs(b.m.h)) * DW_REL + DW_ABS) * SLACK;
    return b_make(dw_add(a.m, b.m), r);
}
static inline ball b_sub(ball a, ball b) { return b_add(a, b_neg(b)); }

/* |a b - a.m b.m| <= |a.m| b.r + |b.m| a.r + a.r b.r, plus dw_mul's own error */
static inline ball b_mul(ball a, ball b) {
    double x = fabs(a.m.h), y = fabs(b.m.h);
    double r = (x * b.r + y * a.r + a.r * b.r + x * y * DW_REL + DW_ABS) * SLACK;
    return b_make(dw_mul(a.m, b.m), r);
}

/* a constant v = h + l rounded to nearest in 107 bits: within 2^-106 |h| of the value; radius 2^-104 |h| */
static inline ball b_constant(dw v) { return b_make(v, fabs(v.h) * 0x1p-104 + DW_ABS); }

/* an upper bound of |v| over the ball */
static inline double b_magnitude(ball a) { return (fabs(a.m.h) * (1 + 0x1p-52) + a.r) * SLACK; }

/* the balls' ends as floats, outward: at or below m - r, at or above m + r */
static inline double b_floor(ball a) {
    dw low = two_sum(a.m.h, add_dn(a.m.l, -a.r));
    return low.l >= 0 ? low.h : dn(low.h);
}
static inline double b_ceil(ball a) {
    dw high = two_sum(a.m.h, add_up(a.m.l, a.r));
    return high.l <= 0 ? high.h : up(high.h);
}

/* 1/v for every v in a ball of positive values: with f = 1/m.h in floats and e = 1 - v f (tiny),
   1/v = f (1 + e + e^2/(1 - e)), and 0 <= e^2/(1 - e) <= em^2/(1 - em) for |e| <= em < 1 */
static int b_reciprocal(ball a, ball *out) {
    if (!(a.m.h >= 0x1p-900 && a.m.h <= DW_RANGE)) return -1;
    double f = 1.0 / a.m.h;
    ball e = b_sub(b_point(1.0), b_mul(a, b_point(f)));
    double em = b_magnitude(e);
    if (!(em <= 0x1p-40)) return -1;
    double tail = em * em * 1.01;   /* >= em^2/(1 - em), rounding included */
    ball factor = b_add(b_add(b_point(1.0), e), b_make(dw_point(0.5 * tail), 0.5 * tail));
    *out = b_mul(b_point(f), factor);
    return 0;
}

/* ---- constants (rounded to nearest in 107 bits; tests/quadrature/test_tight.py checks each) ------ */

static const dw LN2_DW = {0x1.62e42fefa39efp-1, 0x1.abc9e3b39803fp-56};
static const dw HALF_PI_DW = {0x1.921fb54442d18p+0, 0x1.1a62633145c07p-54};
static const dw INV_LN10_DW = {0x1.bcb7b1526e50ep-2, 0x1.95355baaafad3p-57};
#define FACTORIALS 31
static const dw INVERSE_FACTORIAL[FACTORIALS] = {
    {0x1.0000000000000p+0, 0x0.0p+0},  {0x1.0000000000000p+0, 0x0.0p+0},
    {0x1.0000000000000p-1, 0x0.0p+0},  {0x1.5555555555555p-3, 0x1.5555555555555p-57},
    {0x1.5555555555555p-5, 0x1.5555555555555p-59},  {0x1.1111111111111p-7, 0x1.1111111111111p-63},
    {0x1.6c16c16c16c17p-10, -0x1.f49f49f49f49fp-65},  {0x1.a01a01a01a01ap-13, 0x1.a01a01a01a01ap-73},
    {0x1.a01a01a01a01ap-16, 0x1.a01a01a01a01ap-76},  {0x1.71de3a556c734p-19, -0x1.c154f8ddc6c00p-73},
    {0x1.27e4fb7789f5cp-22, 0x1.cbbc05b4fa99ap-76},  {0x1.ae64567f544e4p-26, -0x1.c062e06d1f209p-80},
    {0x1.1eed8eff8d898p-29, -0x1.2aec959e14c06p-83},  {0x1.6124613a86d09p-33, 0x1.f28e0cc748ebep-87},
    {0x1.93974a8c07c9dp-37, 0x1.05d6f8a2efd1fp-92},  {0x1.ae7f3e733b81fp-41, 0x1.1d8656b0ee8cbp-97},
    {0x1.ae7f3e733b81fp-45, 0x1.1d8656b0ee8cbp-101},  {0x1.952c77030ad4ap-49, 0x1.ac981465ddc6cp-103},
    {0x1.6827863b97d97p-53, 0x1.eec01221a8b0bp-107},  {0x1.2f49b46814157p-57, 0x1.2650f61dbdcb4p-112},
    {0x1.e542ba4020225p-62, 0x1.ea72b4afe3c2fp-120},  {0x1.71b8ef6dcf572p-66, -0x1.d043ae40c4647p-120},
    {0x1.0ce396db7f853p-70, -0x1.aebcdbd20331cp-124},  {0x1.761b41316381ap-75, -0x1.3423c7d91404fp-130},
    {0x1.f2cf01972f578p-80, -0x1.9ada5fcc1ab14p-135},  {0x1.3f3ccdd165fa9p-84, -0x1.58ddadf344487p-139},
    {0x1.88e85fc6a4e5ap-89, -0x1.71c37ebd16540p-143},  {0x1.d1ab1c2dccea3p-94, 0x1.054d0c78aea14p-149},
    {0x1.0a18a2635085dp-98, 0x1.b9e2e28e1aa54p-153},  {0x1.259f98b4358adp-103, 0x1.eaf8c39dd9bc5p-157},
    {0x1.3932c5047d60ep-108, 0x1.832b7b530a627p-162},
};

static inline ball inverse_factorial(int j) { return b_constant(INVERSE_FACTORIAL[j]); }

/* an upper bound of x^n / n! for 0 <= x: at most 10 roundings (binary powering, n < 32), so SLACK covers them */
static double power_term(double x, int n) {
    double result = 1.0, base = x;
    for (int k = n; k; k >>= 1) {
        if (k & 1) result *= base;
        if (k > 1) base *= base;
    }
    return result * INVERSE_FACTORIAL[n].h * SLACK;
}

/* Float balls: a float midpoint and radius, for the tails of the series, whose terms are far below the
   leading ones (at most 2^-11 of them) and so need no second word for a tight result.  Each operation's rounding
   adds |m| 2^-52 >= u |exact m|, plus DW_ABS for underflow; SLACK covers the radius formula's own rounding
   (docs/compiled-tiers.md, section 5). */
typedef struct { double m, r; } fball;

static inline fball fb_mul(fball a, fball b) {
    double m = a.m * b.m;
    double r = (fabs(a.m) * b.r + fabs(b.m) * a.r + a.r * b.r + fabs(m) * 0x1p-52 + DW_ABS) * SLACK;
    fball x = {m, r};
    return x;
}
static inline fball fb_add(fball a, fball b) {
    double m = a.m + b.m;
    fball x = {m, (a.r + b.r + fabs(m) * 0x1p-52 + DW_ABS) * SLACK};
    return x;
}
/* 1/j! as a float ball: the stored h + l is within 2^-106 |h| of it */
static inline fball fb_inverse_factorial(int j) {
    dw v = INVERSE_FACTORIAL[j];
    fball x = {v.h, (fabs(v.l) + fabs(v.h) * 0x1p-104 + DW_ABS) * SLACK};
    return x;
}

/* p(t) = sum of c_j t^j for j = 0..n with c_j = 1/j! (step 1) or 1/(2j + first)! (step 2, in t = r^2),
   by Horner; sign -1 alternates the terms.  The terms from j = head on run in float balls, the first
   head in double-word balls. */
static ball power_series(ball t, int n, int first, int step, int sign, int head) {
    fball ft = {t.m.h, (fabs(t.m.l) + t.r) * SLACK};
    fball q = fb_inverse_factorial(first + step * n);
    for (int j = n - 1; j >= head; j--) {
        fball tq = fb_mul(ft, q);
        if (sign < 0) tq.m = -tq.m;
        q = fb_add(fb_inverse_factorial(first + step * j), tq);
    }
    ball p = b_make(dw_point(q.m), q.r);
    for (int j = head - 1; j >= 0; j--) {
        ball tp = b_mul(t, p);
        p = b_add(inverse_factorial(first + step * j), sign < 0 ? b_neg(tp) : tp);
    }
    return p;
}

/* ---- the functions at a point ------------------------------------------------------------- */

#define EXP_HALVINGS 3      /* e^r = (e^(r/8))^8 */
#define EXP_TERMS 10        /* |r/8| <= 0.044: the first dropped term is below 2^-75 */

/* e^x: x = k ln 2 + r, e^r from its series at r/8 squared three times, times 2^k */
static int tight_exp(double x, ball *out) {
    if (x == 0) { *out = b_point(1.0); return 0; }
    if (!(fabs(x) <= 600)) return -1;
    double k = nearbyint(x * 0x1.71547652b82fep+0);   /* x / ln 2, any rounding will do */
    ball r = b_point(x);
    if (k != 0) r = b_sub(r, b_mul(b_point(k), b_constant(LN2_DW)));
    ball t = b_mul(r, b_point(0.125));
    double m = b_magnitude(t);
    if (!(m <= 0.05)) return -1;
    ball p = power_series(t, EXP_TERMS, 0, 1, 1, 4);
    /* Lagrange: the rest is t^11/11! e^xi with |xi| <= m <= 0.05, at most 1.06 m^11/11! */
    p.r = (p.r + power_term(m, EXP_TERMS + 1) * 1.06) * SLACK;
    for (int i = 0; i < EXP_HALVINGS; i++) p = b_mul(p, p);
    if (k != 0) p = b_mul(p, b_point(ldexp(1.0, (int)k)));
    if (!b_ok(p)) return -1;
    *out = p;
    return 0;
}

/* log x = y + log(x e^-y) for the library's y; x e^-y = 1 + t with t tiny, and
   |log(1 + t) - (t - t^2/2)| <= |t|^3 / (3 (1 - |t|)) */
static int tight_log(double x, ball *out) {
    if (x == 1) { *out = b_point(0.0); return 0; }
    if (!(x > 0) || !(x <= DW_RANGE)) return -1;
    double y = log(x);
    ball e;
    if (!(fabs(y) <= 600) || tight_exp(-y, &e)) return -1;
    ball t = b_sub(b_mul(e, b_point(x)), b_point(1.0));
    double m = b_magnitude(t);
    if (!(m <= 0x1p-30)) return -1;
    ball value = b_sub(t, b_mul(b_mul(t, t), b_point(0.5)));
    value.r = (value.r + m * m * m * 0.3334) * SLACK;
    *out = b_add(b_point(y), value);
    return 0;
}

#define SIN_TERMS 9    /* sin r to r^19/19!: for |r| < 0.8 the first dropped term is below 2^-72 */
#define COS_TERMS 10   /* cos r to r^20/20!: the first dropped term below 2^-77 */
#define TIGHT_TRIG_LIMIT 0x1p20   /* k pi/2 to 2^-79 absolute or better */

/* sin r (want_cos = 0) or cos r for |r| < 1: alternating series whose terms fall, so the sum is within its
   first dropped term */
static ball sin_or_cos_small(ball r, int want_cos) {
    ball r2 = b_mul(r, r);
    double m = b_magnitude(r);
    ball v;
    if (want_cos) {
        v = power_series(r2, COS_TERMS, 0, 2, -1, 3);
        v.r = (v.r + power_term(m, 2 * COS_TERMS + 2)) * SLACK;
    } else {
        v = b_mul(r, power_series(r2, SIN_TERMS, 1, 2, -1, 3));
        v.r = (v.r + power_term(m, 2 * SIN_TERMS + 3)) * SLACK;
    }
    return v;
}

/* sin x (want_cos = 0) or cos x: x = k pi/2 + r, then the quadrant picks sin r or cos r and the sign */
static int tight_sin_cos(double x, int want_cos, ball *out) {
    if (x == 0) { *out = b_point(want_cos ? 1.0 : 0.0); return 0; }
    if (!(fabs(x) <= TIGHT_TRIG_LIMIT)) return -1;
    double k = nearbyint(x * 0x1.45f306dc9c883p-1);   /* x / (pi/2), any rounding will do */
    ball r = b_point(x);
    if (k != 0) r = b_sub(r, b_mul(b_point(k), b_constant(HALF_PI_DW)));
    if (!(b_magnitude(r) < 1.0)) return -1;
    int quadrant = (int)((((long long)k) % 4 + 4) % 4) + (want_cos ? 1 : 0);
    /* sin(r + q pi/2): sin r, cos r, -sin r, -cos r for q = 0..3; cos x = sin(x + pi/2) */
    ball v = sin_or_cos_small(r, quadrant % 2);
    *out = quadrant % 4 >= 2 ? b_neg(v) : v;
    return 0;
}

/* atan x = y + atan(d) for the library's y (of x's sign, |y| < pi/2), with
   d = tan(atan x - y) = (x cos y - sin y) / (cos y + x sin y); for |d| <= m tiny,
   |atan d - d| <= m^3/3 */
static int tight_atan(double x, ball *out) {
    if (x == 0) { *out = b_point(0.0); return 0; }
    if (!(fabs(x) <= DW_RANGE)) return -1;
    double y = atan(x);
    /* the float nearest pi/2 lies below it, so |y| <= that float keeps y inside (-pi/2, pi/2) */
    if (!(fabs(y) <= 0x1.921fb54442d18p+0) || (y > 0) != (x > 0)) return -1;
    ball s, c, inverse;
    if (tight_sin_cos(y, 0, &s) || tight_sin_cos(y, 1, &c)) return -1;
    ball xp = b_point(x);
    ball numerator = b_sub(b_mul(xp, c), s);
    if (b_reciprocal(b_add(c, b_mul(xp, s)), &inverse)) return -1;
    ball d = b_mul(numerator, inverse);
    double m = b_magnitude(d);
    if (!(m <= 0x1p-30)) return -1;
    d.r = (d.r + m * m * m * 0.3334) * SLACK;
    *out = b_add(b_point(y), d);
    return 0;
}

#define SINH_TERMS 10   /* |x| < 1/2: the first dropped term x^23/23! is below 2^-96 */

/* cosh, sinh and tanh from e^|x|, and the series of sinh below 1/2, where the difference would cancel
   (positive terms; the rest is below 1.01 times the first dropped one) */
static int tight_hyperbolic(int op, double x, ball *out) {
    double a = fabs(x);
    if (x == 0) { *out = b_point(op == OP_COSH ? 1.0 : 0.0); return 0; }
    if (op == OP_TANH && a > 300) {   /* 1 - 2/(e^(2a) + 1) lies in (1 - 2^-800, 1) */
        ball v = b_make(two_sum(1.0, -0x1p-801), 0x1p-801);
        *out = x > 0 ? v : b_neg(v);
        return 0;
    }
    ball e, inverse, r;
    if (op == OP_TANH && a >= 0.5) {
        if (tight_exp(2 * a, &e) || b_reciprocal(b_add(e, b_point(1.0)), &inverse)) return -1;
        r = b_sub(b_point(1.0), b_mul(inverse, b_point(2.0)));
    } else {
        if (tight_exp(a, &e) || b_reciprocal(e, &inverse)) return -1;
        ball cosh = b_mul(b_add(e, inverse), b_point(0.5));
        if (op == OP_COSH) { *out = cosh; return 0; }
        ball sinh;
        if (a < 0.5) {
            ball xp = b_point(a);
            sinh = b_mul(xp, power_series(b_mul(xp, xp), SINH_TERMS, 1, 2, 1, 3));
            sinh.r = (sinh.r + power_term(a, 2 * SINH_TERMS + 3) * 1.01) * SLACK;
        } else {
            sinh = b_mul(b_sub(e, inverse), b_point(0.5));
        }
        if (op == OP_SINH) r = sinh;
        else if (b_reciprocal(cosh, &inverse)) return -1;
        else r = b_mul(sinh, inverse);
    }
    *out = x > 0 ? r : b_neg(r);
    return 0;
}

/* f(x) at a float x, enclosed; -1 where the tier does not cover the function or the argument */
static int tight_at(int op, double x, ball *out) {
    switch (op) {
    case OP_EXP: return tight_exp(x, out);
    case OP_LOG: return tight_log(x, out);
    case OP_LOG10: {
        ball l;
        if (tight_log(x, &l)) return -1;
        *out = b_mul(l, b_constant(INV_LN10_DW));
        return 0;
    }
    case OP_SIN: return tight_sin_cos(x, 0, out);
    case OP_COS: return tight_sin_cos(x, 1, out);
    case OP_ATAN: return tight_atan(x, out);
    case OP_SINH:
    case OP_COSH:
    case OP_TANH: return tight_hyperbolic(op, x, out);
    }
    return -1;
}

/* f(x) at a float x as floats at or below and at or above it, or -1 */
static int tight_floats(int op, double x, double *low, double *high) {
    ball v;
    if (tight_at(op, x, &v) || !b_ok(v)) return -1;
    *low = b_floor(v);
    *high = b_ceil(v);
    return 0;
}

/* f over the float interval a, or -1 (the guarded layer then answers): monotone functions from their ends,
   sin and cos from their ends and the extrema the quarter-turn count finds */
static int tight_value(int op, iv a, iv *out) {
    double l1, h1, l2, h2;
    iv b = op == OP_COSH ? iv_abs(a) : a;   /* cosh rises with |x| */
    /* the shapes this range argument knows: increasing, cosh through |x|, and sin and cos; a function added to
       tight_at must be added here too, or its range over an interval would be taken from its ends */
    if (op != OP_EXP && op != OP_LOG && op != OP_LOG10 && op != OP_ATAN && op != OP_SINH && op != OP_TANH
        && op != OP_COSH && op != OP_SIN && op != OP_COS)
        return -1;
    if (tight_floats(op, b.lo, &l1, &h1)) return -1;
    if (b.lo == b.hi) { l2 = l1; h2 = h1; }
    else if (tight_floats(op, b.hi, &l2, &h2)) return -1;
    double l = l1, h = h2;
    if (op == OP_SIN || op == OP_COS) {
        l = lesser(l1, l2);
        h = greater(h1, h2);
        if (a.lo != a.hi) {
            int shift = op == OP_COS;
            iv t = quarter_turns(a);
            if (t.hi - t.lo >= 4.0) return -1;
            if (has_residue(t, (1 - shift + 4) % 4)) h = 1.0;
            if (has_residue(t, (3 - shift + 4) % 4)) l = -1.0;
        }
        l = greater(l, -1.0);
        h = lesser(h, 1.0);
    }
    if (!(l <= h)) return -1;
    *out = mk(l, h);
    return 0;
}

#endif
