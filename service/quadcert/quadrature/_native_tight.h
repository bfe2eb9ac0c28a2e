/* The compiled engine's tight tier: elementary functions at float64 points, enclosed in double-word
   intervals and rounded outward to the neighbouring floats.  docs/compiled-tiers.md gives the error
   analysis; the library's own results are used only as starting guesses, never trusted.
   Included once, by _native.c, after _native_interval.h. */

#ifndef QUADCERT_NATIVE_TIGHT_H
#define QUADCERT_NATIVE_TIGHT_H

/* The value h + l.  Every operation returns it normalised (|l| <= ulp(h)/2, and l = 0 when h = 0). */
typedef struct { double h, l; } dw;
/* lo <= the exact value <= hi */
typedef struct { dw lo, hi; } dwi;

#define DW_REL 0x1p-99      /* relative widening per operation: 128 u^2, against at most 6.1 u^2 of error */
#define DW_ABS 0x1p-1000    /* absolute widening per operation: covers every underflowed rounding */
#define DW_RANGE 0x1p900    /* magnitudes the tier accepts; beyond, the guarded layer answers */

/* ---- error-free transformations and operations with an error bound --------------------------- */

static inline dw two_sum(double a, double b) {   /* exact: a + b = s + e (no overflow) */
    double s = a + b, bp = s - a, e = (a - (s - bp)) + (b - bp);
    dw r = {s, e};
    return r;
}

/* a + b for normalised a, b: |result - (a + b)| <= 3.1 u^2 (|a.h| + |b.h|) + 2 eta; *err gets a bound
   that is at least that */
static inline dw dw_add(dw a, dw b, double *err) {
    dw s = two_sum(a.h, b.h);
    double v = a.l + b.l;
    double w = s.l + v;
    *err = add_up(mul_up(add_up(fabs(a.h), fabs(b.h)), DW_REL), DW_ABS);
    return two_sum(s.h, w);
}

/* a * b for normalised a, b: |result - a b| <= 6.1 u^2 |a.h b.h| + 4 eta (the FMA makes a.h b.h exact to eta) */
static inline dw dw_mul(dw a, dw b, double *err) {
    double ch = a.h * b.h;
    double cl1 = fma(a.h, b.h, -ch);
    double tl0 = a.l * b.l;
    double tl1 = fma(a.h, b.l, tl0);
    double cl2 = fma(a.l, b.h, tl1);
    double cl3 = cl1 + cl2;
    *err = add_up(mul_up(mul_up(fabs(a.h), fabs(b.h)), DW_REL), DW_ABS);
    return two_sum(ch, cl3);
}

/* z moved down / up by err (>= 0), renormalised exactly */
static inline dw dw_below(dw z, double err) { return two_sum(z.h, add_dn(z.l, -err)); }
static inline dw dw_above(dw z, double err) { return two_sum(z.h, add_up(z.l, err)); }

static inline dw dw_point(double x) { dw r = {x, 0.0}; return r; }
static inline dw dw_neg(dw a) { dw r = {-a.h, -a.l}; return r; }
/* comparisons of normalised values: a.h < b.h implies a <= b */
static inline int dw_less(dw a, dw b) { return a.h < b.h || (a.h == b.h && a.l < b.l); }
static inline int dw_ok(dw a) { return fabs(a.h) <= DW_RANGE; }   /* false for NaN and infinities too */

static inline dwi dwi_point(double x) { dwi r = {dw_point(x), dw_point(x)}; return r; }
static inline dwi dwi_make(dw lo, dw hi) { dwi r = {lo, hi}; return r; }
static inline dwi dwi_neg(dwi a) { return dwi_make(dw_neg(a.hi), dw_neg(a.lo)); }
static inline int dwi_ok(dwi a) { return dw_ok(a.lo) && dw_ok(a.hi); }

/* a constant v = h + l, rounded to nearest in 107 bits: within 2^-106 |h| of v, enclosed with 2^-104 |h| */
static inline dwi dwi_constant(dw v) {
    double err = mul_up(fabs(v.h), 0x1p-104);
    return dwi_make(dw_below(v, err), dw_above(v, err));
}

static inline dwi dwi_add(dwi a, dwi b) {
    double e1, e2;
    dw lo = dw_add(a.lo, b.lo, &e1), hi = dw_add(a.hi, b.hi, &e2);
    return dwi_make(dw_below(lo, e1), dw_above(hi, e2));
}
static inline dwi dwi_sub(dwi a, dwi b) { return dwi_add(a, dwi_neg(b)); }

static inline dwi dw_product(dw a, dw b) {
    double e;
    dw p = dw_mul(a, b, &e);
    return dwi_make(dw_below(p, e), dw_above(p, e));
}

static dwi dwi_mul(dwi a, dwi b) {
    if (a.lo.h >= 0 && b.lo.h >= 0) return dwi_make(dw_product(a.lo, b.lo).lo, dw_product(a.hi, b.hi).hi);
    if (a.hi.h <= 0 && b.hi.h <= 0) return dwi_make(dw_product(a.hi, b.hi).lo, dw_product(a.lo, b.lo).hi);
    dwi c[4] = {dw_product(a.lo, b.lo), dw_product(a.lo, b.hi), dw_product(a.hi, b.lo), dw_product(a.hi, b.hi)};
    dwi r = c[0];
    for (int i = 1; i < 4; i++) {
        if (dw_less(c[i].lo, r.lo)) r.lo = c[i].lo;
        if (dw_less(r.hi, c[i].hi)) r.hi = c[i].hi;
    }
    return r;
}

/* [-e, e] for a float e >= 0 */
static inline dwi dwi_radius(double e) { return dwi_make(dw_point(-e), dw_point(e)); }
/* the largest magnitude in a, rounded up to a float */
static inline double dwi_magnitude(dwi a) {
    return greater(add_up(fabs(a.lo.h), fabs(a.lo.l)), add_up(fabs(a.hi.h), fabs(a.hi.l)));
}

/* 1/d for one positive d: with f = 1/d.h in floats and e = 1 - d f (|e| tiny), 1/d = f (1 + e + e^2/(1 - e)),
   and 0 <= e^2/(1 - e) <= e^2 / (1 - |e|). */
static int dw_reciprocal(dw d, dwi *out) {
    if (!(d.h >= 0x1p-900 && d.h <= DW_RANGE)) return -1;
    double f = 1.0 / d.h;
    dwi e = dwi_sub(dwi_point(1.0), dw_product(d, dw_point(f)));
    double em = dwi_magnitude(e);
    if (!(em <= 0x1p-40)) return -1;
    double tail = mul_up(mul_up(em, em), 1.001);
    dwi factor = dwi_add(dwi_add(dwi_point(1.0), e), dwi_make(dw_point(0.0), dw_point(tail)));
    *out = dwi_mul(dwi_point(f), factor);
    return 0;
}

/* 1/a for a positive interval a */
static int dwi_reciprocal(dwi a, dwi *out) {
    dwi low, high;
    if (a.lo.h <= 0 || dw_reciprocal(a.hi, &low) || dw_reciprocal(a.lo, &high)) return -1;
    *out = dwi_make(low.lo, high.hi);
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

static inline dwi inverse_factorial(int j) { return dwi_constant(INVERSE_FACTORIAL[j]); }

/* x^n / n! for 0 <= x <= m: an upper bound, in floats */
static double power_term(double m, int n) { return mul_up(pos_pow(m, n, 1), INVERSE_FACTORIAL[n].h * 1.0000001); }

/* ---- the functions at a point ------------------------------------------------------------- */

#define EXP_HALVINGS 4      /* e^r = (e^(r/16))^16 */
#define EXP_TERMS 13        /* |r/16| <= 0.022: the dropped terms are below 2^-110 */

/* e^x: x = k ln 2 + r, e^r from its series at r/16 squared four times, times 2^k */
static int tight_exp(double x, dwi *out) {
    if (x == 0) { *out = dwi_point(1.0); return 0; }
    if (!(fabs(x) <= 600)) return -1;
    double k = nearbyint(x * 0x1.71547652b82fep+0);   /* x / ln 2, any rounding will do */
    dwi r = dwi_point(x);
    if (k != 0) r = dwi_sub(r, dwi_mul(dwi_point(k), dwi_constant(LN2_DW)));
    dwi t = dwi_mul(r, dwi_point(0x1p-4));
    double m = dwi_magnitude(t);
    if (!(m <= 0.05)) return -1;
    dwi p = inverse_factorial(EXP_TERMS);
    for (int j = EXP_TERMS - 1; j >= 0; j--) p = dwi_add(inverse_factorial(j), dwi_mul(t, p));
    /* Lagrange: the rest is t^14/14! e^xi with |xi| <= m < 0.05, so at most 1.06 m^14/14! */
    p = dwi_add(p, dwi_radius(mul_up(power_term(m, EXP_TERMS + 1), 1.06)));
    for (int i = 0; i < EXP_HALVINGS; i++) p = dwi_mul(p, p);
    if (k != 0) p = dwi_mul(p, dwi_point(ldexp(1.0, (int)k)));
    if (!dwi_ok(p) || p.lo.h <= 0) return -1;
    *out = p;
    return 0;
}

/* log x = y + log(x e^-y) for the library's y; x e^-y = 1 + t with t tiny, and
   |log(1 + t) - (t - t^2/2)| <= |t|^3 / (3 (1 - |t|)) */
static int tight_log(double x, dwi *out) {
    if (x == 1) { *out = dwi_point(0.0); return 0; }
    if (!(x > 0) || !(x <= DW_RANGE)) return -1;
    double y = log(x);
    dwi e;
    if (!(fabs(y) <= 600) || tight_exp(-y, &e)) return -1;
    dwi t = dwi_sub(dwi_mul(e, dwi_point(x)), dwi_point(1.0));
    double m = dwi_magnitude(t);
    if (!(m <= 0x1p-30)) return -1;
    dwi series = dwi_sub(t, dwi_mul(dwi_mul(t, t), dwi_point(0.5)));
    series = dwi_add(series, dwi_radius(mul_up(pos_pow(m, 3, 1), 0.3334)));
    *out = dwi_add(dwi_point(y), series);
    return 0;
}

/* sin and cos of r with 0 <= r < 1: alternating series whose terms fall, so each is within its first
   dropped term */
#define SIN_TERMS 13   /* up to r^27/27! */
static void sin_cos_small(dwi r, dwi *s, dwi *c) {
    dwi r2 = dwi_mul(r, r);
    double m = dwi_magnitude(r);
    dwi p = inverse_factorial(2 * SIN_TERMS + 1);
    for (int j = SIN_TERMS - 1; j >= 0; j--) p = dwi_sub(inverse_factorial(2 * j + 1), dwi_mul(r2, p));
    *s = dwi_add(dwi_mul(r, p), dwi_radius(power_term(m, 2 * SIN_TERMS + 3)));
    dwi q = inverse_factorial(2 * SIN_TERMS + 2);
    for (int j = SIN_TERMS; j >= 0; j--) q = dwi_sub(inverse_factorial(2 * j), dwi_mul(r2, q));
    *c = dwi_add(q, dwi_radius(power_term(m, 2 * SIN_TERMS + 4)));
}

#define TIGHT_TRIG_LIMIT 0x1p20   /* k pi/2 to 2^-79 absolute or better */

/* sin x and cos x: x = k pi/2 + r, then the quadrant */
static int tight_sin_cos(double x, dwi *s, dwi *c) {
    if (x == 0) { *s = dwi_point(0.0); *c = dwi_point(1.0); return 0; }
    if (!(fabs(x) <= TIGHT_TRIG_LIMIT)) return -1;
    double k = nearbyint(x * 0x1.45f306dc9c883p-1);   /* x / (pi/2), any rounding will do */
    dwi r = dwi_point(x);
    if (k != 0) r = dwi_sub(r, dwi_mul(dwi_point(k), dwi_constant(HALF_PI_DW)));
    dwi sr, cr;
    if (r.lo.h < 0 && r.hi.h > 0) {
        /* r straddles 0 (only when it is far below 2^-26): sin r lies in r, cos r in [1 - r^2/2, 1] */
        double m = dwi_magnitude(r);
        if (!(m <= 0x1p-26)) return -1;
        sr = r;
        cr = dwi_make(dw_point(dn(1.0)), dw_point(1.0));
    } else {
        int negative = r.hi.h <= 0;
        dwi a = negative ? dwi_neg(r) : r;
        if (!(dwi_magnitude(a) < 1.0)) return -1;
        sin_cos_small(a, &sr, &cr);
        if (negative) sr = dwi_neg(sr);
    }
    switch ((((long long)k) % 4 + 4) % 4) {
    case 0: *s = sr; *c = cr; break;
    case 1: *s = cr; *c = dwi_neg(sr); break;
    case 2: *s = dwi_neg(sr); *c = dwi_neg(cr); break;
    default: *s = dwi_neg(cr); *c = sr; break;
    }
    return 0;
}

/* atan x = y + atan(d) for the library's y (of x's sign, |y| < pi/2), with
   d = tan(atan x - y) = (x cos y - sin y) / (cos y + x sin y); for |d| tiny,
   d - d^3/3 <= atan d <= d when d >= 0, and the mirror image below 0 */
static int tight_atan(double x, dwi *out) {
    if (x == 0) { *out = dwi_point(0.0); return 0; }
    if (!(fabs(x) <= DW_RANGE)) return -1;
    double y = atan(x);
    if (!(fabs(y) < 1.5707963267948966) || (y > 0) != (x > 0)) return -1;
    dwi s, c, inverse;
    if (tight_sin_cos(y, &s, &c) || c.lo.h <= 0) return -1;
    dwi xp = dwi_point(x);
    dwi numerator = dwi_sub(dwi_mul(xp, c), s);
    if (dwi_reciprocal(dwi_add(c, dwi_mul(xp, s)), &inverse)) return -1;
    dwi d = dwi_mul(numerator, inverse);
    double m = dwi_magnitude(d);
    if (!(m <= 0x1p-30)) return -1;
    double cube = mul_up(pos_pow(m, 3, 1), 0.3334);
    d = dwi_add(d, dwi_make(dw_point(d.lo.h > 0 ? -cube : 0.0), dw_point(d.hi.h < 0 ? cube : 0.0)));
    *out = dwi_add(dwi_point(y), d);
    return 0;
}

/* sinh of a >= 0 below 1/2 by its series (positive terms, the rest below 1.34 times the first dropped) */
#define SINH_TERMS 12
static dwi sinh_small(double a) {
    dwi x = dwi_point(a), x2 = dwi_mul(x, x);
    dwi p = inverse_factorial(2 * SINH_TERMS + 1);
    for (int j = SINH_TERMS - 1; j >= 0; j--) p = dwi_add(inverse_factorial(2 * j + 1), dwi_mul(x2, p));
    double rest = mul_up(power_term(a, 2 * SINH_TERMS + 3), 1.34);
    return dwi_add(dwi_mul(x, p), dwi_make(dw_point(0.0), dw_point(rest)));
}

/* cosh, sinh and tanh from e^|x| (and the series of sinh near 0, where the difference would cancel) */
static int tight_hyperbolic(int op, double x, dwi *out) {
    double a = fabs(x);
    if (x == 0) { *out = dwi_point(op == OP_COSH ? 1.0 : 0.0); return 0; }
    if (op == OP_TANH && a > 300) {   /* 1 - 2/(e^(2a) + 1) > 1 - 2^-800 */
        dw one = dw_point(1.0), below = two_sum(1.0, -0x1p-800);
        *out = x > 0 ? dwi_make(below, one) : dwi_make(dw_neg(one), dw_neg(below));
        return 0;
    }
    dwi e, inverse, r;
    if (op == OP_TANH && a >= 0.5) {
        if (tight_exp(2 * a, &e) || dwi_reciprocal(dwi_add(e, dwi_point(1.0)), &inverse)) return -1;
        r = dwi_sub(dwi_point(1.0), dwi_mul(inverse, dwi_point(2.0)));
    } else {
        if (tight_exp(a, &e) || dwi_reciprocal(e, &inverse)) return -1;
        dwi cosh = dwi_mul(dwi_add(e, inverse), dwi_point(0.5));
        if (op == OP_COSH) { *out = cosh; return 0; }
        dwi sinh = a < 0.5 ? sinh_small(a) : dwi_mul(dwi_sub(e, inverse), dwi_point(0.5));
        if (op == OP_SINH) r = sinh;
        else if (dwi_reciprocal(cosh, &inverse)) return -1;
        else r = dwi_mul(sinh, inverse);
    }
    *out = x > 0 ? r : dwi_neg(r);
    return 0;
}

/* f(x) at a float x, enclosed; -1 where the tier does not cover the function or the argument */
static int tight_at(int op, double x, dwi *out) {
    switch (op) {
    case OP_EXP: return tight_exp(x, out);
    case OP_LOG: return tight_log(x, out);
    case OP_LOG10: {
        dwi l;
        if (tight_log(x, &l)) return -1;
        *out = dwi_mul(l, dwi_constant(INV_LN10_DW));
        return 0;
    }
    case OP_SIN:
    case OP_COS: {
        dwi s, c;
        if (tight_sin_cos(x, &s, &c)) return -1;
        *out = op == OP_SIN ? s : c;
        return 0;
    }
    case OP_ATAN: return tight_atan(x, out);
    case OP_SINH:
    case OP_COSH:
    case OP_TANH: return tight_hyperbolic(op, x, out);
    }
    return -1;
}

/* the float at or below / at or above a normalised double-word value */
static inline double dw_floor(dw a) { return a.l >= 0 ? a.h : dn(a.h); }
static inline double dw_ceil(dw a) { return a.l <= 0 ? a.h : up(a.h); }

/* f(x) at a float x as floats at or below and at or above it, or -1 */
static int tight_floats(int op, double x, double *low, double *high) {
    dwi v;
    if (tight_at(op, x, &v) || !dwi_ok(v)) return -1;
    *low = dw_floor(v.lo);
    *high = dw_ceil(v.hi);
    return 0;
}

/* f over the float interval a, or -1 (the guarded layer then answers): monotone functions from their ends,
   sin and cos from their ends and the extrema the quarter-turn count finds */
static int tight_value(int op, iv a, iv *out) {
    double l1, h1, l2, h2;
    iv b = op == OP_COSH ? iv_abs(a) : a;   /* cosh rises with |x| */
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
