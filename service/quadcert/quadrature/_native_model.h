/* Taylor models of f''''/4! over a stretch of the interval, for Simpson's fourth-order bound on the many
   small panels inside it (docs/simpson-models.md).  Included once, by _native.c.

   Over a stretch A with a float point a in it, Taylor's theorem with the Lagrange remainder gives, for x in A,

       f''''(x)/4! = sum_{j < J} C(4 + j, 4) c_{4+j}(a) (x - a)^j  +  C(4 + J, 4) c_{4+J}(xi) (x - a)^J

   where c_k(y) = f^(k)(y)/k! and xi lies between a and x.  The coefficients at a come from one series at the
   point a, the remainder's from one series over the whole stretch (c_{4+J}(A) encloses c_{4+J}(xi)).  Both
   are the engine's own interval Taylor arithmetic, so f must have 4 + J derivatives on A: a series that
   comes back shorter (a kink, a root reaching zero) builds no model.  A panel [u, v] inside A then needs only
   a polynomial's range over t = x - a in [u - a, v - a], in place of a whole series over the panel. */

#ifndef QUADCERT_NATIVE_MODEL_H
#define QUADCERT_NATIVE_MODEL_H

#include "_native_series.h"

#define MODEL_TERMS 12   /* J: the polynomial's terms; the series reach order 4 + J = 16 <= ORDER */

typedef struct {
    double a;                  /* the expansion point, a float inside the stretch */
    double lo, hi;             /* the stretch A */
    iv e[MODEL_TERMS + 1];     /* e_j = C(4 + j, 4) c_{4+j}(a) for j < J; e_J = C(4 + J, 4) c_{4+J}(A) */
} taylor_model;

/* C(4 + j, 4) for j = 0..J, exact in float64 */
static const double BINOMIAL_4[MODEL_TERMS + 1] = {1, 5, 15, 35, 70, 126, 210, 330, 495, 715, 1001, 1365, 1820};

/* The model of f over [lo, hi]; 0, or -1 where either series fails, comes back short or leaves the float
   range (then the panels keep their own series). */
static int build_model(machine *vm, double lo, double hi, taylor_model *out, const iv *ln10, const iv *two) {
    series at, over;
    double a = 0.5 * lo + 0.5 * hi;   /* any float in [lo, hi] will do; this one is (halving and rounding) */
    if (!(a >= lo && a <= hi)) return -1;
    if (evaluate(vm, point(a), 3 + MODEL_TERMS, &at, ln10, two) || at.len != 4 + MODEL_TERMS) return -1;
    if (evaluate(vm, mk(lo, hi), 4 + MODEL_TERMS, &over, ln10, two) || over.len != 5 + MODEL_TERMS) return -1;
    for (int j = 0; j <= MODEL_TERMS; j++) {
        iv c = j < MODEL_TERMS ? at.c[4 + j] : over.c[4 + MODEL_TERMS];
        if (!finite_iv(c)) return -1;
        out->e[j] = iv_scale(c, BINOMIAL_4[j]);
        if (!finite_iv(out->e[j])) return -1;
    }
    out->a = a;
    out->lo = lo;
    out->hi = hi;
    return 0;
}

static inline fball to_fball(iv a) { mr x = to_mr(a); fball b = {x.m, x.r}; return b; }

/* An enclosure of f''''/4! over [lo, hi] (inside the model's stretch), and the width of the remainder's
   part of it (*remainder_width: what the model's reach costs).  The polynomial's range is the mean-value
   form P(t_c) + P'(B) [-rho, rho], with B = [t_c - rho, t_c + rho] a ball around T, in float balls
   (docs/simpson-models.md, section 3): its width follows the panel's size, where Horner's rule over the
   whole of T would add up the terms' magnitudes. */
static iv model_fourth(const taylor_model *md, double lo, double hi, double *remainder_width) {
    iv t = mk(add_dn(lo, -md->a), add_up(hi, -md->a));
    mr tb = to_mr(t);
    fball centre = {tb.m, 0.0}, whole = {tb.m, tb.r}, offset = {0.0, tb.r};
    fball top = to_fball(md->e[MODEL_TERMS - 1]);
    fball value = top, slope = fb_mul(top, (fball){(double)(MODEL_TERMS - 1), 0.0});
    for (int j = MODEL_TERMS - 2; j >= 0; j--) {
        fball e = to_fball(md->e[j]);
        value = fb_add(fb_mul(value, centre), e);
        if (j >= 1) slope = fb_add(fb_mul(slope, whole), fb_mul(e, (fball){(double)j, 0.0}));
    }
    fball range = fb_add(value, fb_mul(slope, offset));
    /* the remainder C(4 + J, 4) c_{4+J}(A) t^J, at most |e_J| max|t|^J in size */
    double reach = pos_pow(greater(fabs(t.lo), fabs(t.hi)), MODEL_TERMS, 1);
    double size = greater(fabs(md->e[MODEL_TERMS].lo), fabs(md->e[MODEL_TERMS].hi));
    double remainder = mul_up(size, reach);
    *remainder_width = 2 * remainder;
    double radius = add_up(range.r, remainder);
    if (!(radius <= DBL_MAX) || range.m != range.m || !(fabs(range.m) <= DBL_MAX)) return mk(-INFINITY, INFINITY);
    return mk(add_dn(range.m, -radius), add_up(range.m, radius));
}

#endif
