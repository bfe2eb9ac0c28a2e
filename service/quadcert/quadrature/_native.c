/* Certified adaptive Simpson and Gauss–Legendre panels on float64 intervals, compiled.

   The same method as _simpson.py (Taylor enclosures of order 4 per panel, the
   Peano bounds of _peano.py intersected, worst-first bisection), for formulas
   whose certificate fits in float64.  One addition: once Simpson's panels are
   small, the fourth derivative over each comes from a Taylor model shared by
   a whole stretch of them (_native_model.h), not a series of its own.  Every
   operation rounds outward:

   - + - * / and sqrt are correctly rounded by IEEE 754 in round-to-nearest.
     A result is moved one ulp outward unless it is provably exact (TwoSum for
     sums, significand bit counts for products, quotients and roots), so exact
     values such as 1 - x*x at x = 1 stay exact points.
   - elementary functions come from the C library, which is not guaranteed to be
     correctly rounded: each value is widened by GUARD relative plus TINY
     absolute, far beyond the documented error of any mainstream libm, and the
     tests check this layer against python-flint balls.  Where that widening
     becomes the run's floor, the values at the nodes come from the tight tier
     instead (_native_tight.h: our own double-word evaluation, with its own
     error analysis in docs/compiled-tiers.md), over the same mesh.
   - ranges over intervals come from monotonicity, with extrema of sin and cos
     found by rigorous quarter-turn counting.

   The engine never refuses an integral: anything it cannot do (a value it
   cannot enclose, a panel it cannot bound at the depth limit, a tolerance below
   float64's resolution) makes it decline, and the Python engine, with its
   exact limits, arbitrary precision and detailed refusals, takes over.  No
   global state: every call owns its memory. */

#include "_native_interval.h"
#include "_native_series.h"
#include "_native_model.h"

/* ---- panels and refinement --------------------------------------------------------------- */

#define GAUSS_MAX 10            /* the most Gauss–Legendre nodes per panel (ORDER = 2 GAUSS_MAX) */
#define GAUSS_BOUND 5              /* the order key of the Gauss–Legendre bound (Simpson's are 0..4) */
enum { RULE_SIMPSON = 0, RULE_GAUSS = 1, RULE_AUTO = 2 };

typedef struct {
    iv p, m, q, fp, fm, fq;
    iv enclosure;
    double width, centre, rounding;
    int depth, order, resolved;
    Py_ssize_t model;          /* the Taylor model of f''''/4! its stretch lies in (Simpson), or -1 */
} panel;

/* A running sum that terms are added to and later removed from.  In plain float64 the removal of a term
   that dominated the sum (a first panel 1e10 wide, the rest 1e-10) leaves that term's rounding error
   behind for good, about 1e-6 here, and the loop then refines far past the tolerance, or declines because
   the rounding estimate looks like float64's floor.  Each step's error is kept exactly by TwoSum in a
   second word; these sums steer the refinement only, they certify nothing. */
typedef struct { double hi, lo; } running_sum;

static inline void sum_add(running_sum *acc, double x) {
    double t = acc->hi + x, bp = t - acc->hi;
    acc->lo += (acc->hi - (t - bp)) + (x - bp);
    acc->hi = t;
}

static inline double sum_value(const running_sum *acc) { return acc->hi + acc->lo; }

typedef struct {
    machine *vm;
    iv ln10, two_over_root_pi;
    iv c_signed, c_abs[4];     /* -24/2880 and C_k * k! for k = 1..3 */
    int rule;                  /* RULE_SIMPSON, RULE_GAUSS or RULE_AUTO */
    int gauss_points;          /* n, the nodes per Gauss–Legendre panel (5 or 10, from the table Python sends) */
    iv gauss_t[GAUSS_MAX], gauss_w[GAUSS_MAX];   /* nodes and weights on [-1, 1], enclosed */
    iv gauss_c;                /* c_n (2n)!: the remainder's constant times the coefficient's factorial */
    panel *panels;
    Py_ssize_t count, capacity;
    Py_ssize_t *heap;          /* indices of live panels, max-heap by width */
    Py_ssize_t heap_size;
    long long nodes;
    int overflow;              /* a Taylor coefficient left the float64 range */
    int tight;                 /* node values from the tight tier (after the guarded one met its floor) */
    int may_tighten;           /* whether the run may move to the tight tier */
    taylor_model *models;      /* Simpson: f''''/4! over stretches, shared by the panels inside them */
    Py_ssize_t model_count, model_capacity;
    running_sum widths, centres, roundings;   /* over the live panels, to steer the loop */
    long long unresolved;      /* live panels whose certificate failed */
    double goal;               /* the run's latest goal for the half-width of the total (steering only) */
} refiner;

/* f at a node: the rule sums' values, so in the tight tier where it covers the functions (the panels' Taylor
   enclosures over whole panels need no such accuracy and keep the guarded layer) */
static int node_value(refiner *r, iv x, iv *out) {
    series s;
    r->vm->tight = r->tight;
    int failed = evaluate(r->vm, x, 0, &s, &r->ln10, &r->two_over_root_pi);
    r->vm->tight = 0;
    if (failed || !finite_iv(s.c[0])) return -1;
    *out = s.c[0];
    return 0;
}

/* Simpson's sum H (f(p) + 4 f(m) + f(q)) / 6 over the panel, enclosed */
static iv simpson_sum(refiner *r, const panel *pn, iv width) {
    return iv_div(r->vm, iv_mul(width, iv_add(iv_add(pn->fp, pn->fq), iv_scale(pn->fm, 4.0))), point(6.0));
}

/* the certified panel's fields from its enclosure and the best of its bounds (pn->rounding already holds
   that bound's rule sum's width) */
static void settle(panel *pn, iv enclosure, int order) {
    pn->enclosure = enclosure;
    pn->order = order;
    pn->width = iv_width(enclosure);
    pn->centre = 0.5 * enclosure.lo + 0.5 * enclosure.hi;
    pn->resolved = 1;
}

/* When Simpson's panels use a Taylor model (_native_model.h) instead of a series of their own.  Neither
   factor affects rigor: a model's enclosure is as valid as the series', these only choose the cheaper. */
#define MODEL_SHARE 0.25   /* the model's remainder may take this share of a panel's enclosure width */
#define MODEL_REACH 16.0   /* a new model must keep it this many times smaller on the panel it is built on */
#define MODEL_WORTH 64.0   /* and is built only on a panel this many times wider than the goal (its two
                              series cost some twenty panels' own: a panel near the goal has few descendants) */

/* The share of Simpson's fourth-order bound over the panel that the model's remainder makes up, and the
   enclosure (through *out); a share above 1 (or NaN) when the model does not reach. */
static double by_model(refiner *r, const taylor_model *md, const panel *pn, iv width, iv simpson, iv *out) {
    double lo = pn->p.lo, hi = pn->q.hi, remainder;
    if (lo < md->lo || hi > md->hi) return INFINITY;
    iv fourth = model_fourth(md, lo, hi, &remainder);
    iv scale = iv_mul(iv_pow_int(width, 5), r->c_signed);   /* width >= 0 */
    *out = iv_add(simpson, iv_mul(scale, fourth));
    if (!finite_iv(*out)) return INFINITY;
    double cost = mul_up(remainder, greater(fabs(scale.lo), fabs(scale.hi)));
    double whole = iv_width(*out);
    return whole > 0 ? cost / whole : (cost == 0 ? 0.0 : INFINITY);
}

static void certify_directly(refiner *r, panel *pn, iv width, iv simpson);

static void certify(refiner *r, panel *pn) {
    iv width = iv_sub(pn->q, pn->p);
    iv simpson = simpson_sum(r, pn, width);
    pn->rounding = iv_width(simpson);
    pn->resolved = 0;
    pn->width = INFINITY;
    pn->centre = 0;
    pn->order = -1;
    if (r->rule == RULE_SIMPSON && pn->model >= 0) {
        iv enclosure;
        if (by_model(r, &r->models[pn->model], pn, width, simpson, &enclosure) <= MODEL_SHARE) {
            settle(pn, enclosure, SIMPSON_ORDER);
            return;
        }
        pn->model = -1;   /* out of its reach: the panel's own series, and perhaps a nearer model */
    }
    certify_directly(r, pn, width, simpson);
    if (r->rule != RULE_SIMPSON || !pn->resolved || pn->order != SIMPSON_ORDER) return;
    if (!(pn->width > MODEL_WORTH * r->goal)) return;
    if (r->model_count == r->model_capacity) {
        Py_ssize_t capacity = r->model_capacity ? 2 * r->model_capacity : 64;
        taylor_model *grown = realloc(r->models, (size_t)capacity * sizeof(taylor_model));
        if (!grown) return;   /* no model: the panels keep their own series */
        r->models = grown;
        r->model_capacity = capacity;
    }
    taylor_model *md = &r->models[r->model_count];
    if (build_model(r->vm, pn->p.lo, pn->q.hi, md, &r->ln10, &r->two_over_root_pi)) { r->vm->fault = 0; return; }
    iv unused;
    if (by_model(r, md, pn, width, simpson, &unused) * MODEL_REACH <= MODEL_SHARE) pn->model = r->model_count++;
}

static void certify_directly(refiner *r, panel *pn, iv width, iv simpson) {
    series s;
    int order = r->rule == RULE_SIMPSON ? SIMPSON_ORDER : 2 * r->gauss_points;
    if (evaluate(r->vm, mk(pn->p.lo, pn->q.hi), order, &s, &r->ln10, &r->two_over_root_pi)) return;
    for (int k = 0; k < s.len; k++) {
        /* beyond float64's range the bounds lose all their information: the precise engine's
           unbounded exponents do better, so the run declines */
        if (!finite_iv(s.c[k])) { r->overflow = 1; return; }
    }
    iv best = iv_mul(width, s.c[0]), enclosure = best;
    int best_order = 0;
    iv candidates[5];
    int orders[5], n = 0;
    iv powers[TERMS + 1];   /* width^k, built once by repeated products (which enclose the powers) */
    powers[1] = width;
    for (int k = 2; k <= s.len; k++) powers[k] = iv_mul(powers[k - 1], width);
    /* Gauss–Legendre (docs/gauss-legendre.md): H/2 * sum w_i f(m + H/2 t_i) + c_n H^(2n+1) f^(2n)(panel) */
    int smooth = r->rule != RULE_SIMPSON && s.len == order + 1;
    iv gauss_sum = point(0.0);
    if (smooth) {
        iv half = iv_mul(width, point(0.5));
        for (int i = 0; i < r->gauss_points && smooth; i++) {
            iv value;
            if (node_value(r, iv_add(pn->m, iv_mul(half, r->gauss_t[i])), &value)) smooth = 0;
            else gauss_sum = iv_add(gauss_sum, iv_mul(r->gauss_w[i], value));
        }
        r->nodes += r->gauss_points;
        if (smooth) {
            gauss_sum = iv_mul(half, gauss_sum);
            candidates[n] = iv_add(gauss_sum, iv_mul(iv_mul(powers[order + 1], r->gauss_c), s.c[order]));
            orders[n++] = GAUSS_BOUND;
        }
    }
    int peano = !(smooth && r->rule == RULE_GAUSS);   /* gauss-legendre: Simpson's bounds only off smooth panels */
    if (peano && s.len > SIMPSON_ORDER) {
        iv w5 = powers[5];
        candidates[n] = iv_add(simpson, iv_mul(iv_mul(w5, r->c_signed), s.c[4]));
        orders[n++] = 4;
    }
    for (int k = 3; k >= 1; k--) {
        if (peano && s.len > k) {
            iv size = iv_abs(s.c[k]);
            iv radius = iv_mul(iv_mul(powers[k + 1], r->c_abs[k]), size);
            candidates[n] = iv_add(simpson, mk(-radius.hi, radius.hi));
            orders[n++] = k;
        }
    }
    for (int i = 0; i < n; i++) {
        if (iv_width(candidates[i]) < iv_width(best)) { best = candidates[i]; best_order = orders[i]; }
        enclosure = mk(greater(enclosure.lo, candidates[i].lo), lesser(enclosure.hi, candidates[i].hi));
    }
    if (r->vm->fault || !finite_iv(enclosure)) return;
    if (best_order == GAUSS_BOUND) pn->rounding = iv_width(gauss_sum);
    settle(pn, enclosure, best_order);
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

/* a new panel in slot `reuse` (a panel just split, whose slot is free) or at the end, a child of `parent`
   (a copy, NULL for the first), certified */
static int make_panel(refiner *r, iv p, iv q, iv fp, iv fq, const panel *parent, Py_ssize_t reuse,
                      Py_ssize_t *index) {
    if (reuse < 0 && grow(r)) return DECLINE_MEMORY;
    Py_ssize_t slot = reuse < 0 ? r->count : reuse;
    panel *pn = &r->panels[slot];
    pn->p = p; pn->q = q; pn->fp = fp; pn->fq = fq; pn->depth = parent ? parent->depth + 1 : 0;
    pn->model = parent ? parent->model : -1;
    double sum_lo = add_dn(p.lo, q.lo), sum_hi = add_up(p.hi, q.hi);
    pn->m = mk(0.5 * sum_lo, 0.5 * sum_hi);   /* halving is exact above 2^-1021 */
    /* below that it may round, so the ends move out one step; an exact 0 (a symmetric panel) stays 0 */
    if (sum_lo != 0 && fabs(pn->m.lo) < 0x1p-1000) pn->m.lo = dn(pn->m.lo);
    if (sum_hi != 0 && fabs(pn->m.hi) < 0x1p-1000) pn->m.hi = up(pn->m.hi);
    if (node_value(r, pn->m, &pn->fm)) return DECLINE_VALUE;
    r->nodes++;
    certify(r, pn);
    *index = slot;
    if (reuse < 0) r->count++;
    return r->overflow ? DECLINE_RANGE : 0;
}

/* Where a panel is cut in two: a float inside the enclosure of its midpoint, so that the children's ends are
   exact points and their widths carry no uncertainty from the ends (over thousands of panels that would add
   up to a visible share of a tight tolerance). Any cut point between the ends is valid; the value the parent
   computed over the whole midpoint enclosure encloses f at the cut too, so it is reused as the children's end
   value. Where no float lies strictly between the ends, the enclosure itself is the cut, as before. */
static iv split_point(const panel *parent) {
    iv m = parent->m;
    if (m.lo == m.hi) return m;
    if (m.lo > parent->p.hi && m.lo < parent->q.lo) return mk(m.lo, m.lo);
    if (m.hi > parent->p.hi && m.hi < parent->q.lo) return mk(m.hi, m.hi);
    return m;
}

/* The sum of the live panels' enclosures.  Adding N intervals with outward rounding at every step would
   cost N ulps of the total (the float64 floor of a long mesh); instead each end is summed with TwoSum,
   whose rounding errors are exact and are enclosed separately, so the total is
   [s_lo + E_lo, s_hi + E_hi] with one outward rounding at the end. */
static iv sum_of_panels(const refiner *r) {
    double s[2] = {0.0, 0.0};
    iv errors[2] = {{0.0, 0.0}, {0.0, 0.0}};
    for (Py_ssize_t i = 0; i < r->heap_size; i++) {
        const iv *e = &r->panels[r->heap[i]].enclosure;
        double x[2] = {e->lo, e->hi};
        for (int k = 0; k < 2; k++) {
            double t = s[k] + x[k], bp = t - s[k];
            double err = (s[k] - (t - bp)) + (x[k] - bp);   /* exact: s + x = t + err */
            s[k] = t;
            errors[k] = iv_add(errors[k], point(err));
        }
    }
    return mk(add_dn(s[0], errors[0].lo), add_up(s[1], errors[1].hi));
}

/* The refinement loop's factors. None of them affects rigor (the answer is the certified sum of the panels
   whatever they are); they decide when to try the exact sum, and when float64 cannot reach the goal. */
#define ROUNDING_SHARE 64.0        /* width below this many times the rounding: the floor is in sight */
#define ESTIMATE_SLACK 1.01        /* try the exact sum once the running estimate is within 1% of the goal */
#define RECHECK_SHRINK 0.95        /* after a failed exact sum, try again once the widths shrank by 5% */
#define GOAL_MARGIN (1 - 1e-9)     /* the certified bound must beat the goal by this much (float slack) */
#define ROUNDING_GOAL_SHARE 0.25   /* rounding above this share of the goal: float64 may not get there */
#define STALL_SHRINK 0.9           /* doubling the panels must shrink the widths below this share */
#define STALLS_TO_DECLINE 2        /* checkpoints in a row without that, near the floor, before declining */
#define TIGHTEN_SHARE 0.5          /* guarded rounding above this share of the goal: move to the tight tier */
#define FIRST_CHECKPOINT 64        /* panels at the first stall checkpoint (then twice as many each time) */

/* a live panel's share of the running sums, added (sign 1) or taken out (sign -1) */
static void account(refiner *r, Py_ssize_t i, double sign) {
    const panel *pn = &r->panels[i];
    sum_add(&r->roundings, sign * pn->rounding);
    if (pn->resolved) {
        sum_add(&r->widths, sign * pn->width);
        sum_add(&r->centres, sign * pn->centre);
    } else {
        r->unresolved += (long long)sign;
    }
}

/* the running sums and the heap made anew from the live panels, after their widths changed in place */
static void recount(refiner *r) {
    r->widths = r->centres = r->roundings = (running_sum){0, 0};
    r->unresolved = 0;
    Py_ssize_t live = r->heap_size;
    r->heap_size = 0;
    for (Py_ssize_t i = 0; i < live; i++) {
        account(r, r->heap[i], 1);
        heap_push(r, r->heap[i]);   /* Floyd's order would do; pushing is simpler */
    }
}

/* The guarded tier met its floor: every live panel's node values are taken again in the tight tier and the
   panel certified anew, keeping the mesh (the split points, and with them all the refinement so far).
   Returns 0, or a decline status. */
static int tighten(refiner *r) {
    r->tight = 1;
    long long nodes = r->nodes;   /* the same nodes again: the count (and the budget) counts each node once */
    for (Py_ssize_t i = 0; i < r->heap_size; i++) {
        panel *pn = &r->panels[r->heap[i]];
        if (node_value(r, pn->p, &pn->fp) || node_value(r, pn->m, &pn->fm) || node_value(r, pn->q, &pn->fq))
            return DECLINE_VALUE;
        certify(r, pn);
        if (r->overflow) return DECLINE_RANGE;
    }
    r->nodes = nodes;
    recount(r);
    return 0;
}

static int run(refiner *r, iv a, iv b, double tol, double rel, long long max_nodes, double deadline, iv *total_out) {
    iv fa, fb;
    if (node_value(r, a, &fa) || node_value(r, b, &fb)) return DECLINE_VALUE;
    r->nodes = 2;
    r->goal = tol;
    Py_ssize_t first;
    int status = make_panel(r, a, b, fa, fb, NULL, -1, &first);
    if (status) return status;
    double next_check = INFINITY;
    double width_at_checkpoint = INFINITY;
    long long steps = 0;
    Py_ssize_t checkpoint = FIRST_CHECKPOINT;
    int stalls = 0;
    heap_push(r, first);
    account(r, first, 1);
    for (;;) {
        if (!r->unresolved) {
            double width_sum = sum_value(&r->widths), centre_sum = sum_value(&r->centres);
            double rounding_sum = sum_value(&r->roundings);
            double half = width_sum / 2;
            double goal = target_of(tol, rel, centre_sum - half, centre_sum + half);
            r->goal = goal;
            if (half <= goal * ESTIMATE_SLACK && width_sum < next_check) {
                iv total = sum_of_panels(r);
                double bound = up(0.5 * iv_width(total));
                if (bound <= target_of(tol, rel, total.lo, total.hi) * GOAL_MARGIN) { *total_out = total; return MET; }
                next_check = width_sum * RECHECK_SHRINK;
            }
            /* float64 cannot get there: its rounding alone takes a quarter of the goal, and it is already a
               visible share of the width (on a coarse mesh next to a singular end the first panels' sums
               are huge and so is their rounding, yet refining shrinks both) */
            int floor_reached = rounding_sum > ROUNDING_GOAL_SHARE * goal && width_sum < ROUNDING_SHARE * rounding_sum;
            if (r->heap_size >= checkpoint) {
                /* doubling the panels must shrink the total: if twice in a row it barely moves while
                   rounding is already a visible share of it, the float64 floor has been reached before
                   the tolerance (far from the floor, wide panels of an oscillating integrand can keep
                   the total flat for a while, and that is no reason to give up) */
                int near_floor = width_sum < ROUNDING_SHARE * rounding_sum;
                stalls = (near_floor && width_sum > STALL_SHRINK * width_at_checkpoint) ? stalls + 1 : 0;
                width_at_checkpoint = width_sum;
                checkpoint *= 2;
            }
            /* the guarded tier's rounding will take a visible share of the goal: cheaper to tighten now, on a
               small mesh, than at the floor */
            int tighten_early = !r->tight && r->may_tighten && rounding_sum > TIGHTEN_SHARE * goal;
            if (floor_reached || stalls >= STALLS_TO_DECLINE || tighten_early) {
                if (r->tight || !r->may_tighten) return floor_reached ? DECLINE_RESOLUTION : DECLINE_STALLED;
                /* the float64 floor of the guarded tier: continue on the same mesh with tight values */
                if ((status = tighten(r))) return status;
                stalls = 0;
                width_at_checkpoint = INFINITY;
                next_check = INFINITY;
                checkpoint = 2 * r->heap_size;
                continue;
            }
        }
        long long next = r->nodes + 2 + (r->rule == RULE_SIMPSON ? 0 : 2 * r->gauss_points);   /* a split's cost */
        if (next > max_nodes || ((++steps & 31) == 0 && deadline > 0 && now() > deadline)) {
            if (r->unresolved) return DECLINE_UNRESOLVED;
            *total_out = sum_of_panels(r);
            return next > max_nodes ? NODE_BUDGET : DEADLINE;
        }
        Py_ssize_t worst = r->heap[0];
        if (r->panels[worst].depth >= MAX_DEPTH) return DECLINE_DEPTH;
        heap_pop(r);
        account(r, worst, -1);
        panel parent = r->panels[worst];
        Py_ssize_t left, right;
        iv cut = split_point(&parent);
        if ((status = make_panel(r, parent.p, cut, parent.fp, parent.fm, &parent, worst, &left)))
            return status;
        if ((status = make_panel(r, cut, parent.q, parent.fm, parent.fq, &parent, -1, &right)))
            return status;
        heap_push(r, left);
        account(r, left, 1);
        heap_push(r, right);
        account(r, right, 1);
    }
}

/* ---- Python entry points ----------------------------------------------------------------- */

static const iv LN10 = {0x1.26bb1bbb55515p+1, 0x1.26bb1bbb55516p+1};                /* ln 10, down and up */
static const iv TWO_OVER_ROOT_PI = {0x1.20dd750429b6dp+0, 0x1.20dd750429b6ep+0};    /* 2/sqrt(pi) */

/* indices in range and a stack that never underflows or overflows and ends with one value */
#define MAX_POWER 1024   /* |n| of an integer power x^n */
#define MAX_STACK 1024   /* stack slots a program may ask for */
/* the stack effect of opcodes OP_X .. OP_MAX; every function (OP_SQRT .. OP_ABS) replaces its argument */
static const signed char EFFECT[] = {1, 1, 0, -1, -1, -1, -1, 0, 0, -1, -1, -1};

static int check_program(const machine *vm, Py_ssize_t nconst) {
    int depth = 0;
    for (Py_ssize_t i = 0; i < vm->ops; i++) {
        int op = vm->code[2 * i], arg = vm->code[2 * i + 1], e;
        if (op >= 0 && op <= OP_MAX) e = EFFECT[op];
        else if (op >= OP_SQRT && op <= OP_ABS) e = 0;
        else { PyErr_SetString(PyExc_ValueError, "unknown opcode"); return -1; }
        if (op == OP_CONST && (arg < 0 || arg >= nconst)) { PyErr_SetString(PyExc_ValueError, "bad constant"); return -1; }
        if (op == OP_POWI && (arg < -MAX_POWER || arg > MAX_POWER)) { PyErr_SetString(PyExc_ValueError, "bad power"); return -1; }
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

/* A checked machine for a program from Python: its constants read, its stack allocated, its code
   validated.  Returns 0, or -1 with a Python exception set; release_machine frees it either way. */
static int load_machine(machine *vm, const Py_buffer *code, PyObject *consts_obj, int stack_size) {
    memset(vm, 0, sizeof *vm);
    if (code->len % 8 != 0 || stack_size < 1 || stack_size > MAX_STACK) {
        PyErr_SetString(PyExc_ValueError, "malformed program");
        return -1;
    }
    PyObject *seq = PySequence_Fast(consts_obj, "constants must be a sequence");
    if (!seq) return -1;
    Py_ssize_t nconst = PySequence_Fast_GET_SIZE(seq);
    iv *consts = PyMem_Malloc((size_t)(nconst + 1) * sizeof(iv));
    vm->stack = PyMem_Malloc((size_t)stack_size * sizeof(series));
    vm->consts = consts;
    int status = 0;
    if (!consts || !vm->stack) {
        PyErr_NoMemory();
        status = -1;
    }
    for (Py_ssize_t i = 0; status == 0 && i < nconst; i++) status = read_iv(seq, i, &consts[i]);
    Py_DECREF(seq);
    if (status) return -1;
    vm->code = (const int32_t *)code->buf;
    vm->ops = code->len / 8;
    vm->stack_size = stack_size;
    return check_program(vm, nconst);
}

static void release_machine(machine *vm) {
    PyMem_Free((void *)vm->consts);
    PyMem_Free(vm->stack);
    vm->consts = NULL;
    vm->stack = NULL;
}

/* Simpson's Peano constants times k! (the series hold f^(k)/k!), as num/den: row 0 the signed fourth-order
   one (-24/2880), rows 1..3 the absolute ones for k = 1..3 (5/36, 2/81 = 2!/81, 1/96 = 3!/576) */
static const double PEANO[4][2] = {{-1.0, 120.0}, {5.0, 36.0}, {2.0, 81.0}, {1.0, 96.0}};

static PyObject *native_integrate(PyObject *self, PyObject *args) {
    (void)self;
    Py_buffer code;
    PyObject *consts_obj;
    int stack_size, want_mesh, rule, may_tighten = 1;
    double a_lo, a_hi, b_lo, b_hi, tol, rel, seconds;
    long long max_nodes;
    PyObject *gauss_obj;
    if (!PyArg_ParseTuple(args, "y*OidddddddLpiO|p:integrate", &code, &consts_obj, &stack_size, &a_lo, &a_hi, &b_lo,
                          &b_hi, &tol, &rel, &seconds, &max_nodes, &want_mesh, &rule, &gauss_obj, &may_tighten))
        return NULL;
    PyObject *result = NULL;
    refiner r;
    memset(&r, 0, sizeof r);
    machine vm;
    memset(&vm, 0, sizeof vm);
    if (rule < RULE_SIMPSON || rule > RULE_AUTO) {
        PyErr_SetString(PyExc_ValueError, "unknown rule");
        goto done;
    }
    r.rule = rule;
    r.may_tighten = may_tighten;
    if (rule != RULE_SIMPSON) {   /* (t_lo, t_hi) and (w_lo, w_hi) per node, from exact enclosures (_gauss.py) */
        Py_ssize_t size = PySequence_Check(gauss_obj) ? PySequence_Size(gauss_obj) : -1;
        if (size < 3 || size % 2 == 0 || size > 2 * GAUSS_MAX + 1) {
            PyErr_SetString(PyExc_ValueError, "the Gauss-Legendre table needs 2n + 1 intervals, n <= 10");
            goto done;
        }
        r.gauss_points = (int)(size / 2);
        for (int i = 0; i < r.gauss_points; i++) {
            if (read_iv(gauss_obj, 2 * i, &r.gauss_t[i]) || read_iv(gauss_obj, 2 * i + 1, &r.gauss_w[i])) goto done;
        }
        if (read_iv(gauss_obj, 2 * r.gauss_points, &r.gauss_c)) goto done;
    }
    if (load_machine(&vm, &code, consts_obj, stack_size)) goto done;
    int status;
    iv total = point(0.0);
    double started = now();
    if (fegetround() != FE_TONEAREST) {
        status = DECLINE_ROUNDING_MODE;
    } else {
        r.vm = &vm;
        r.ln10 = LN10;
        r.two_over_root_pi = TWO_OVER_ROOT_PI;
        r.c_signed = mk(div_dn(PEANO[0][0], PEANO[0][1]), div_up(PEANO[0][0], PEANO[0][1]));
        for (int k = 1; k <= 3; k++) r.c_abs[k] = mk(div_dn(PEANO[k][0], PEANO[k][1]), div_up(PEANO[k][0], PEANO[k][1]));
        Py_BEGIN_ALLOW_THREADS
        status = run(&r, mk(a_lo, a_hi), mk(b_lo, b_hi), tol, rel, max_nodes,
                     seconds > 0 ? started + seconds : 0.0, &total);
        Py_END_ALLOW_THREADS
    }
    long long counts[6] = {0, 0, 0, 0, 0, 0};
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
    /* where float64's resolution stopped the run, the mesh it built is handed to the precise engine: each
       live panel's left end (an interval, a point where it is a float) and depth */
    PyObject *left_ends = Py_None;
    Py_INCREF(left_ends);
    if (status == DECLINE_RESOLUTION || status == DECLINE_STALLED) {
        Py_DECREF(left_ends);
        left_ends = PyList_New(r.heap_size);
        if (!left_ends) { Py_DECREF(mesh); goto done; }
        for (Py_ssize_t i = 0; i < r.heap_size; i++) {
            panel *pn = &r.panels[r.heap[i]];
            PyObject *row = Py_BuildValue("(ddi)", pn->p.lo, pn->p.hi, pn->depth);
            if (!row) { Py_DECREF(mesh); Py_DECREF(left_ends); goto done; }
            PyList_SET_ITEM(left_ends, i, row);
        }
    }
    result = Py_BuildValue("(iddLn(LLLLLL)NnN)", status, total.lo, total.hi, r.nodes, r.heap_size, counts[0],
                           counts[1], counts[2], counts[3], counts[4], counts[5], mesh, r.model_count, left_ends);
done:
    PyBuffer_Release(&code);
    release_machine(&vm);
    free(r.panels);
    free(r.heap);
    free(r.models);
    return result;
}

/* the Taylor coefficients f^(k)(X)/k! of a program over X = [lo, hi], for the tests of the recurrences */
static PyObject *native_taylor(PyObject *self, PyObject *args) {
    (void)self;
    Py_buffer code;
    PyObject *consts_obj, *result = NULL;
    int stack_size, order;
    double lo, hi;
    if (!PyArg_ParseTuple(args, "y*Oiddi:taylor", &code, &consts_obj, &stack_size, &lo, &hi, &order)) return NULL;
    machine vm;
    if (load_machine(&vm, &code, consts_obj, stack_size)) goto done;
    if (order < 0 || order > ORDER || !(lo <= hi)) {
        PyErr_SetString(PyExc_ValueError, "bad order or interval");
        goto done;
    }
    iv ln10 = LN10, two = TWO_OVER_ROOT_PI;
    series s;
    if (evaluate(&vm, mk(lo, hi), order, &s, &ln10, &two)) { result = Py_None; Py_INCREF(result); goto done; }
    result = PyList_New(s.len);
    for (int k = 0; result && k < s.len; k++) {
        PyObject *pair = Py_BuildValue("(dd)", s.c[k].lo, s.c[k].hi);
        if (!pair) { Py_CLEAR(result); break; }
        PyList_SET_ITEM(result, k, pair);
    }
done:
    PyBuffer_Release(&code);
    release_machine(&vm);
    return result;
}

/* f''''/4! over [plo, phi] from the Taylor model of f over [lo, hi], with the width of its remainder part,
   for the property tests of the models; None where the model cannot be built */
static PyObject *native_model(PyObject *self, PyObject *args) {
    (void)self;
    Py_buffer code;
    PyObject *consts_obj, *result = NULL;
    int stack_size;
    double lo, hi, plo, phi;
    if (!PyArg_ParseTuple(args, "y*Oidddd:model", &code, &consts_obj, &stack_size, &lo, &hi, &plo, &phi)) return NULL;
    machine vm;
    if (load_machine(&vm, &code, consts_obj, stack_size)) goto done;
    if (!(lo <= plo && plo <= phi && phi <= hi)) {
        PyErr_SetString(PyExc_ValueError, "the panel must lie inside the stretch");
        goto done;
    }
    iv ln10 = LN10, two = TWO_OVER_ROOT_PI;
    taylor_model md;
    if (build_model(&vm, lo, hi, &md, &ln10, &two)) { result = Py_None; Py_INCREF(result); goto done; }
    double remainder;
    iv fourth = model_fourth(&md, plo, phi, &remainder);
    result = Py_BuildValue("(ddd)", fourth.lo, fourth.hi, remainder);
done:
    PyBuffer_Release(&code);
    release_machine(&vm);
    return result;
}

/* one function over an interval, guarded or (tight = 1) from the tight tier where it covers it, for the
   property tests of these layers */
static PyObject *native_enclose(PyObject *self, PyObject *args) {
    (void)self;
    int op, tight = 0;
    double lo, hi;
    if (!PyArg_ParseTuple(args, "idd|p:enclose", &op, &lo, &hi, &tight)) return NULL;
    if (!(op >= OP_SQRT && op <= OP_ABS) || !(lo <= hi)) {
        PyErr_SetString(PyExc_ValueError, "unknown function or empty interval");
        return NULL;
    }
    machine vm;
    memset(&vm, 0, sizeof vm);
    vm.tight = tight;
    iv r = function_value(&vm, op, mk(lo, hi));
    if (vm.fault || !finite_iv(r)) Py_RETURN_NONE;
    return Py_BuildValue("(dd)", r.lo, r.hi);
}

/* the tight tier's enclosure of f at a float x, as the ball (m.h, m.l, r), or None where it
   does not cover it; op -1 gives the constant table's entry x (0..2 ln 2, pi/2, 1/ln 10; 3 + j 1/j!) */
static PyObject *native_tight(PyObject *self, PyObject *args) {
    (void)self;
    int op;
    double x;
    if (!PyArg_ParseTuple(args, "id:tight", &op, &x)) return NULL;
    ball v;
    if (op == -1) {
        int i = (int)x;
        if (!(x >= 0 && x < 3 + FACTORIALS) || i != x) {
            PyErr_SetString(PyExc_ValueError, "no such constant");
            return NULL;
        }
        v = b_constant(i == 0 ? LN2_DW : i == 1 ? HALF_PI_DW : i == 2 ? INV_LN10_DW : INVERSE_FACTORIAL[i - 3]);
    } else if (tight_at(op, x, &v) || !b_ok(v)) {
        Py_RETURN_NONE;
    }
    return Py_BuildValue("(ddd)", v.m.h, v.m.l, v.r);
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
        if (n < 1 || n > MAX_POWER) { PyErr_SetString(PyExc_ValueError, "power out of range"); return NULL; }
        r = iv_pow_int(a, n);
        break;
    default: PyErr_SetString(PyExc_ValueError, "unknown operation"); return NULL;
    }
    if (vm.fault) Py_RETURN_NONE;
    return Py_BuildValue("(dd)", r.lo, r.hi);
}

/* Everything _fast.py must agree on, so that it can check at import instead of trusting two copies. */
static PyObject *native_tables(PyObject *self, PyObject *unused) {
    (void)self;
    (void)unused;
    static const char *const OPS[] = {"x", "const", "neg", "+", "-", "*", "/", "sqr", "powi", "^", "min", "max"};
    static const char *const FUNCTIONS[] = {"sqrt", "exp", "log", "log10", "sin", "cos", "tan", "asin",
                                             "acos", "atan", "sinh", "cosh", "tanh", "erf", "abs"};
    PyObject *opcodes = PyDict_New(), *effects = PyDict_New(), *peano = PyList_New(4);
    if (!opcodes || !effects || !peano) goto fail;
    for (int op = 0; op <= OP_MAX; op++) {
        PyObject *code = PyLong_FromLong(op), *effect = PyLong_FromLong(EFFECT[op]);
        int bad = !code || !effect || PyDict_SetItemString(opcodes, OPS[op], code) || PyDict_SetItem(effects, code, effect);
        Py_XDECREF(code);
        Py_XDECREF(effect);
        if (bad) goto fail;
    }
    for (int op = OP_SQRT; op <= OP_ABS; op++) {
        PyObject *code = PyLong_FromLong(op);
        int bad = !code || PyDict_SetItemString(opcodes, FUNCTIONS[op - OP_SQRT], code);
        Py_XDECREF(code);
        if (bad) goto fail;
    }
    for (int k = 0; k < 4; k++) {
        PyObject *row = Py_BuildValue("(dd)", PEANO[k][0], PEANO[k][1]);
        if (!row) goto fail;
        PyList_SET_ITEM(peano, k, row);
    }
    return Py_BuildValue(
        "{sNsNsNs{sisisisisisisisisisisi}sisisisi}", "opcodes", opcodes, "effects", effects, "peano", peano,
        "status", "met", MET, "node_budget", NODE_BUDGET, "deadline", DEADLINE, "value", DECLINE_VALUE, "depth",
        DECLINE_DEPTH, "resolution", DECLINE_RESOLUTION, "unresolved", DECLINE_UNRESOLVED, "memory", DECLINE_MEMORY,
        "rounding_mode", DECLINE_ROUNDING_MODE, "float_range", DECLINE_RANGE, "stalled", DECLINE_STALLED,
        "order", ORDER, "max_depth", MAX_DEPTH, "max_power", MAX_POWER, "max_stack", MAX_STACK);
fail:
    Py_XDECREF(opcodes);
    Py_XDECREF(effects);
    Py_XDECREF(peano);
    return NULL;
}

static PyMethodDef methods[] = {
    {"tables", native_tables, METH_NOARGS, "The opcodes, statuses and constants the engine was built with."},
    {"integrate", native_integrate, METH_VARARGS, "Certified adaptive Simpson of a compiled program."},
    {"taylor", native_taylor, METH_VARARGS, "Taylor coefficient enclosures of a compiled program."},
    {"model", native_model, METH_VARARGS, "The fourth derivative over a panel from a Taylor model over a stretch."},
    {"enclose", native_enclose, METH_VARARGS, "Guarded or tight enclosure of one elementary function."},
    {"tight", native_tight, METH_VARARGS, "The tight tier's double-word enclosure at a point, or a constant."},
    {"operate", native_operate, METH_VARARGS, "One outward-rounded interval operation."},
    {NULL, NULL, 0, NULL},
};

static struct PyModuleDef module = {PyModuleDef_HEAD_INIT, "_native", "Compiled float64 interval engine.", -1,
                                    methods, NULL, NULL, NULL, NULL};

PyMODINIT_FUNC PyInit__native(void) { return PyModule_Create(&module); }
