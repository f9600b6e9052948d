/*
 * Monte Carlo propagation of distributions, JCGM 101:2008 (contracts in
 * include/swathbudget/montecarlo.h).  First the generic core (draws, trial
 * loop, adaptive stop, statistics, threads), then the sounding glue that
 * feeds it the engine's beam model.
 */
#include "swathbudget/montecarlo.h"
#include "swathbudget/georef.h"
#include "swathbudget/horiz95.h"
#include "swathbudget/propagate.h"
#include "swathbudget/system.h"

#include <math.h>
#include <pthread.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>

/* sqrt(3): half-width of a rectangular distribution of unit standard
 * deviation (JCGM 100:2008, 4.3.7). */
#define SQRT3 1.7320508075688772
/* For messages only (M_PI is not C11). */
#define DEG_PER_RAD 57.29577951308232

void sb_mc_options_default(struct sb_mc_options *o)
{
    o->seed = 1;
    o->trials = 0;
    o->digits = SB_MC_DIGITS_DEFAULT;
    o->max_trials = SB_MC_TRIALS_MAX;
    o->threads = 1;
    o->tol_factor = 1.0;
}

int sb_mc_options_check(const struct sb_mc_options *o, struct sb_error *err)
{
    if (o->trials != 0 &&
        (o->trials < SB_MC_TRIALS_MIN || o->trials > SB_MC_TRIALS_MAX))
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "number of trials %zu out of range (expected "
                            "%d to %d)",
                            o->trials, SB_MC_TRIALS_MIN, SB_MC_TRIALS_MAX);
    if (o->digits < 1 || o->digits > SB_MC_DIGITS_MAX)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "significant digits %d out of range (expected "
                            "1 to %d)",
                            o->digits, SB_MC_DIGITS_MAX);
    if (o->max_trials < 2 * (size_t)SB_MC_BATCH ||
        o->max_trials > SB_MC_TRIALS_MAX)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "trial cap %zu out of range (expected %d to %d)",
                            o->max_trials, 2 * SB_MC_BATCH,
                            SB_MC_TRIALS_MAX);
    if (o->threads < 1 || o->threads > 1024)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "thread count %d out of range (expected 1 to "
                            "1024)",
                            o->threads);
    if (!(o->tol_factor > 0.0 && o->tol_factor <= 1.0))
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "tolerance factor %g out of range (expected "
                            "more than 0, at most 1)",
                            o->tol_factor);
    return SB_OK;
}

uint64_t sb_mc_stream_seed(uint64_t seed, uint64_t index)
{
    /* Two rounds of the SplitMix64 finaliser (Steele, Lea & Flood 2014):
     * mix the seed, add the index times the golden-ratio increment, mix
     * again, so that nearby (seed, index) pairs give unrelated seeds. */
    uint64_t z = seed + 0x9e3779b97f4a7c15ULL;
    for (int round = 0; round < 2; round++) {
        z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
        z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
        z ^= z >> 31;
        if (round == 0)
            z += (index + 1) * 0x9e3779b97f4a7c15ULL;
    }
    return z;
}

double sb_mc_tolerance(double u, int digits)
{
    /* JCGM 101:2008 7.9.2: u = c x 10^l, c an n_dig-digit integer;
     * delta = 10^l / 2. */
    if (!(u > 0.0) || !isfinite(u) || digits < 1)
        return 0.0;
    int l = (int)floor(log10(u)) - (digits - 1);
    double c = nearbyint(u / pow(10.0, l));
    if (c >= pow(10.0, digits)) /* rounding carried into a new digit */
        l++;
    else if (c < pow(10.0, digits - 1)) /* log10 rounded just below */
        l--;
    return 0.5 * pow(10.0, l);
}

/* q = p m, rounded to the nearest integer when not one (JCGM 101 7.7.1). */
static size_t rank_q(size_t m, double p)
{
    return (size_t)floor(p * (double)m + 0.5);
}

int sb_mc_shortest_interval(const double *sorted, size_t m, double p,
                            double *low, double *high)
{
    size_t q = rank_q(m, p);
    if (q < 1 || q >= m)
        return SB_EINPUT;
    /* JCGM 101 7.7.2: r* minimises y(r+q) - y(r), r = 1..M-q (1-based);
     * 0-based here: r = 0..m-q-1. */
    size_t best = 0;
    double width = sorted[q] - sorted[0];
    for (size_t r = 1; r + q < m; r++) {
        double w = sorted[r + q] - sorted[r];
        if (w < width) {
            width = w;
            best = r;
        }
    }
    *low = sorted[best];
    *high = sorted[best + q];
    return SB_OK;
}

double sb_mc_quantile_sorted(const double *sorted, size_t m, double p)
{
    if (m == 0)
        return NAN;
    size_t q = rank_q(m, p);
    if (q < 1)
        q = 1;
    if (q > m)
        q = m;
    return sorted[q - 1];
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* Rearrange v[0..n-1] so that v[k] is the (k+1)-th smallest value, with no
 * larger value before it and no smaller one after (Hoare's selection,
 * "FIND", 1961, median-of-three pivot).  Hand-rolled because neither libc
 * nor GSL has an O(n) selection on doubles, and sorting every trial value
 * to read three order statistics would cost as much as the trials. */
static void select_kth(double *v, size_t n, size_t k)
{
    ptrdiff_t lo = 0, hi = (ptrdiff_t)n - 1, kk = (ptrdiff_t)k;
    while (hi - lo > 16) {
        ptrdiff_t mid = lo + (hi - lo) / 2;
        double t;
#define SWAP(a, b) (t = v[a], v[a] = v[b], v[b] = t)
        if (v[mid] < v[lo])
            SWAP(mid, lo);
        if (v[hi] < v[lo])
            SWAP(hi, lo);
        if (v[hi] < v[mid])
            SWAP(hi, mid);
        const double pivot = v[mid];
        ptrdiff_t i = lo, j = hi;
        while (i <= j) {
            while (v[i] < pivot)
                i++;
            while (v[j] > pivot)
                j--;
            if (i <= j) {
                SWAP(i, j);
                i++;
                j--;
            }
        }
#undef SWAP
        if (kk <= j)
            hi = j;
        else if (kk >= i)
            lo = i;
        else
            return; /* v[j+1..i-1] all equal the pivot, k among them */
    }
    /* short range: insertion sort */
    for (ptrdiff_t i = lo + 1; i <= hi; i++) {
        double x = v[i];
        ptrdiff_t j = i - 1;
        while (j >= lo && v[j] > x) {
            v[j + 1] = v[j];
            j--;
        }
        v[j + 1] = x;
    }
}

/* Order statistics of m trial values, destroying z and r:
 * h95 = q-th smallest r, abs95 = q-th smallest |z|, the shortest and the
 * probabilistically symmetric 95 % intervals of z.  The interval needs only the m - q smallest and the m - q
 * largest values in order (JCGM 101 7.7.2 compares y(r+q) - y(r) for
 * r <= m - q): select both tails, sort just them (about 5 % each). */
static void order_stats(double *z, double *r, size_t m, double *low,
                        double *high, double *sym_low, double *sym_high,
                        double *abs95, double *h95)
{
    size_t q = rank_q(m, SB_MC_P);
    size_t k = m - q; /* number of windows */

    select_kth(r, m, q - 1);
    *h95 = r[q - 1];
    for (size_t i = 0; i < m; i++)
        r[i] = fabs(z[i]);
    select_kth(r, m, q - 1);
    *abs95 = r[q - 1];
    select_kth(z, m, k);                 /* z[0..k) the k smallest */
    qsort(z, k, sizeof *z, cmp_double);
    select_kth(z + k, m - k, q - k);     /* z[q..m) the largest */
    qsort(z + q, m - q, sizeof *z, cmp_double);
    sb_mc_shortest_interval(z, m, SB_MC_P, low, high);
    /* probabilistically symmetric interval (JCGM 101 7.7.1): ranks
     * r = (1 - p) M / 2 rounded and r + q, 1-based; both lie in the
     * sorted tails since r <= m - q */
    size_t rs = (size_t)floor(0.5 * (double)k + 0.5);
    if (rs < 1)
        rs = 1;
    *sym_low = z[rs - 1];
    *sym_high = z[rs - 1 + q];
}

/* ---- per-thread workspace, allocated once and reused ------------------- */

/* The statistics the adaptive stop watches.  The interval watched is the
 * probabilistically symmetric one: its ends are plain quantiles, known to
 * O(M^-1/2); the position of the shortest window on a nearly symmetric
 * distribution wanders much more slowly to its limit (its width is flat to
 * first order in a shift), so batch averages of it would stall the stop
 * without making any reported figure better. */
enum { STAT_MEAN_Z, STAT_SD_Z, STAT_LOW_Z, STAT_HIGH_Z, STAT_ABS_Z95,
       STAT_MEAN_E, STAT_MEAN_N, STAT_H95, STAT_COUNT };
/* The first STAT_Z_LAST are judged with the tolerance of sd_z, the rest
 * with that of sd_h. */
#define STAT_Z_LAST STAT_MEAN_E

struct mc_work {
    gsl_rng *rng;
    size_t cap_in;      /* room in dx/active/scale */
    double *dx;         /* input errors of one trial */
    size_t *active;     /* indices of inputs with u > 0 */
    double *scale;      /* sigma (normal) or half-width (rectangular) */
    size_t cap_trials;  /* room in z and r */
    double *z;          /* Z of every trial */
    double *r;          /* horizontal radius of every trial */
    double *scratch;    /* copies of one batch's z and r, for quantiles */
    double *batch[STAT_COUNT]; /* per-batch statistics */
    size_t cap_batches;
};

static void work_free(struct mc_work *w)
{
    if (!w)
        return;
    if (w->rng)
        gsl_rng_free(w->rng);
    free(w->dx);
    free(w->active);
    free(w->scale);
    free(w->z);
    free(w->r);
    free(w->scratch);
    for (int s = 0; s < STAT_COUNT; s++)
        free(w->batch[s]);
    memset(w, 0, sizeof *w);
}

/* Make room for n_in inputs and n trials (and, adaptive, their batches).
 * Called before a problem's trial loop, never inside it. */
static int work_reserve(struct mc_work *w, size_t n_in, size_t n,
                        int adaptive)
{
    if (!w->rng) {
        w->rng = gsl_rng_alloc(gsl_rng_mt19937);
        if (!w->rng)
            return SB_ENOMEM;
    }
    if (n_in > w->cap_in) {
        size_t k = n_in;
        double *dx = realloc(w->dx, k * sizeof *dx);
        if (dx)
            w->dx = dx;
        size_t *ac = realloc(w->active, k * sizeof *ac);
        if (ac)
            w->active = ac;
        double *sc = realloc(w->scale, k * sizeof *sc);
        if (sc)
            w->scale = sc;
        if (!dx || !ac || !sc)
            return SB_ENOMEM;
        w->cap_in = k;
    }
    if (n > w->cap_trials) {
        double *z = realloc(w->z, n * sizeof *z);
        if (z)
            w->z = z;
        double *r = realloc(w->r, n * sizeof *r);
        if (r)
            w->r = r;
        if (!z || !r)
            return SB_ENOMEM;
        w->cap_trials = n;
    }
    if (adaptive) {
        if (!w->scratch) {
            w->scratch = malloc(2 * SB_MC_BATCH * sizeof *w->scratch);
            if (!w->scratch)
                return SB_ENOMEM;
        }
        size_t nb = n / SB_MC_BATCH + 1;
        if (nb > w->cap_batches) {
            for (int s = 0; s < STAT_COUNT; s++) {
                double *b = realloc(w->batch[s], nb * sizeof *b);
                if (!b)
                    return SB_ENOMEM;
                w->batch[s] = b;
            }
            w->cap_batches = nb;
        }
    }
    return SB_OK;
}

/* Running sums of one problem, shifted by the first trial's value so that
 * the variance does not cancel when the mean is large against the spread
 * (the "shifted data" algorithm). */
struct mc_sums {
    int started;
    double k[3];
    double s1[3], s2[3];
    size_t n;
};

static void sums_mean_var(const struct mc_sums *a, int axis, double *mean,
                          double *var)
{
    double n = (double)a->n;
    double m1 = a->s1[axis] / n;
    *mean = a->k[axis] + m1;
    *var = n > 1 ? fmax(0.0, (a->s2[axis] - n * m1 * m1) / (n - 1)) : 0.0;
}

/* The trial loop: `count` trials stored from z[start]; allocation-free.
 * The active inputs are listed normal ones first (n_normal of them), then
 * the rectangular ones, so the inner loops carry no branch; the running
 * sums live in locals (the stores through dx and z could alias them). */
static int run_trials(struct mc_work *w, const struct sb_mc_problem *p,
                      size_t n_normal, size_t n_active, size_t start,
                      size_t count, struct mc_sums *acc)
{
    double *dx = w->dx;
    const size_t *active = w->active;
    const double *scale = w->scale;
    gsl_rng *rng = w->rng;
    double *zs = w->z + start, *rs = w->r + start;
    double out[3];
    int bad = 0;

    if (count == 0)
        return SB_OK;
    if (!acc->started) {
        /* the shift of the sums: the first trial's output */
        for (size_t k = 0; k < n_normal; k++)
            dx[active[k]] = gsl_ran_gaussian_ziggurat(rng, scale[k]);
        for (size_t k = n_normal; k < n_active; k++)
            dx[active[k]] = gsl_ran_flat(rng, -scale[k], scale[k]);
        p->model(p->ctx, dx, out);
        acc->started = 1;
        for (int a = 0; a < 3; a++)
            acc->k[a] = out[a];
        zs[0] = out[2];
        rs[0] = sqrt(out[0] * out[0] + out[1] * out[1]);
        bad |= !isfinite(out[0] + out[1] + out[2]);
        zs++;
        rs++;
        count--;
        acc->n++;
    }
    const double k0 = acc->k[0], k1 = acc->k[1], k2 = acc->k[2];
    double a0 = 0.0, a1 = 0.0, a2 = 0.0, b0 = 0.0, b1 = 0.0, b2 = 0.0;
    for (size_t t = 0; t < count; t++) {
        for (size_t k = 0; k < n_normal; k++)
            dx[active[k]] = gsl_ran_gaussian_ziggurat(rng, scale[k]);
        for (size_t k = n_normal; k < n_active; k++)
            dx[active[k]] = gsl_ran_flat(rng, -scale[k], scale[k]);
        p->model(p->ctx, dx, out);
        const double d0 = out[0] - k0, d1 = out[1] - k1, d2 = out[2] - k2;
        a0 += d0;
        a1 += d1;
        a2 += d2;
        b0 += d0 * d0;
        b1 += d1 * d1;
        b2 += d2 * d2;
        zs[t] = out[2];
        rs[t] = sqrt(out[0] * out[0] + out[1] * out[1]);
        bad |= !isfinite(out[0] + out[1] + out[2]);
    }
    acc->s1[0] += a0;
    acc->s1[1] += a1;
    acc->s1[2] += a2;
    acc->s2[0] += b0;
    acc->s2[1] += b1;
    acc->s2[2] += b2;
    acc->n += count;
    return bad ? SB_ENUM : SB_OK;
}

/* Statistics of one adaptive batch (values z[0..m-1], r[0..m-1]). */
static void batch_stats(struct mc_work *w, const double *z, const double *r,
                        size_t m, const double ezn_mean[2], size_t h)
{
    double *s = w->scratch;
    double mean = 0.0, var = 0.0, lo = 0.0, hi = 0.0;

    for (size_t i = 0; i < m; i++)
        mean += z[i];
    mean /= (double)m;
    for (size_t i = 0; i < m; i++)
        var += (z[i] - mean) * (z[i] - mean);
    var /= (double)(m - 1);
    memcpy(s, z, m * sizeof *s);
    memcpy(s + m, r, m * sizeof *s);
    order_stats(s, s + m, m, &lo, &hi, &w->batch[STAT_LOW_Z][h],
                &w->batch[STAT_HIGH_Z][h], &w->batch[STAT_ABS_Z95][h],
                &w->batch[STAT_H95][h]);
    w->batch[STAT_MEAN_Z][h] = mean;
    w->batch[STAT_SD_Z][h] = sqrt(var);
    w->batch[STAT_MEAN_E][h] = ezn_mean[0];
    w->batch[STAT_MEAN_N][h] = ezn_mean[1];
}

/* Standard deviation of the average of h batch values (JCGM 101 7.9.4 f):
 * s = sqrt( sum (v_r - mean)^2 / (h (h - 1)) ). */
static double sd_of_average(const double *v, size_t h)
{
    double m = 0.0, ss = 0.0;
    for (size_t i = 0; i < h; i++)
        m += v[i];
    m /= (double)h;
    for (size_t i = 0; i < h; i++)
        ss += (v[i] - m) * (v[i] - m);
    return sqrt(ss / ((double)h * (double)(h - 1)));
}

/* Final statistics from all n stored trials (reorders z and r). */
static void final_stats(struct mc_work *w, const struct mc_sums *acc,
                        size_t n, int digits, struct sb_mc_stats *out)
{
    double me, ve, mn, vn, mz, vz;
    double mean = 0.0, var = 0.0;

    sums_mean_var(acc, 0, &me, &ve);
    sums_mean_var(acc, 1, &mn, &vn);
    sums_mean_var(acc, 2, &mz, &vz);
    /* Z is stored: two passes, exact whatever the sums did. */
    for (size_t i = 0; i < n; i++)
        mean += w->z[i];
    mean /= (double)n;
    for (size_t i = 0; i < n; i++)
        var += (w->z[i] - mean) * (w->z[i] - mean);
    var /= (double)(n - 1);

    out->trials = n;
    out->mean_e = me;
    out->mean_n = mn;
    out->mean_z = mean;
    out->mean_h = hypot(me, mn);
    out->sd_z = sqrt(var);
    out->sd_h = sqrt(0.5 * (ve + vn));
    order_stats(w->z, w->r, n, &out->low_z, &out->high_z, &out->sym_low_z,
                &out->sym_high_z, &out->abs_z95, &out->h95);
    out->tol_z = sb_mc_tolerance(out->sd_z, digits);
}

static int check_problem(const struct sb_mc_problem *p, struct sb_error *err)
{
    if (!p || !p->model || (p->n_in > 0 && (!p->u || !p->dist)))
        return sb_error_set(err, SB_EINTERNAL, NULL, 0, 0,
                            "Monte Carlo problem incomplete (expected a "
                            "model, u[] and dist[])");
    for (size_t i = 0; i < p->n_in; i++) {
        if (!(p->u[i] >= 0.0) || !isfinite(p->u[i]))
            return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                                "standard uncertainty of input %zu is %g "
                                "(expected a finite value >= 0)",
                                i, p->u[i]);
        if (p->dist[i] != SB_DIST_NORMAL && p->dist[i] != SB_DIST_RECT)
            return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                                "distribution of input %zu is %d (expected "
                                "normal or rectangular)",
                                i, (int)p->dist[i]);
    }
    return SB_OK;
}

/* One problem on a given workspace. */
static int run_on(struct mc_work *w, const struct sb_mc_problem *p,
                  const struct sb_mc_options *o, uint64_t stream_seed,
                  struct sb_mc_stats *out, struct sb_error *err)
{
    int rc = check_problem(p, err);
    if (rc != SB_OK)
        return rc;
    int adaptive = o->trials == 0;
    /* adaptive: start with room for 16 batches and double between
     * batches as needed, so a point that settles early never holds the
     * memory of the cap */
    size_t n_max = adaptive ? 16 * (size_t)SB_MC_BATCH : o->trials;
    if (n_max > o->max_trials && adaptive)
        n_max = o->max_trials;
    rc = work_reserve(w, p->n_in, n_max, adaptive);
    if (rc != SB_OK)
        return sb_error_set(err, rc, NULL, 0, 0,
                            "out of memory for %zu Monte Carlo trials", n_max);

    /* mt19937 takes a 32-bit seed: fold the 64-bit stream seed. */
    gsl_rng_set(w->rng, (unsigned long)((stream_seed ^ (stream_seed >> 32)) &
                                        0xffffffffUL));
    /* inputs with u > 0: normal ones (scale sigma), then rectangular
     * ones (scale: half-width sqrt(3) u) */
    size_t n_active = 0, n_normal;
    for (size_t i = 0; i < p->n_in; i++) {
        w->dx[i] = 0.0;
        if (p->u[i] > 0.0 && p->dist[i] == SB_DIST_NORMAL) {
            w->active[n_active] = i;
            w->scale[n_active++] = p->u[i];
        }
    }
    n_normal = n_active;
    for (size_t i = 0; i < p->n_in; i++) {
        if (p->u[i] > 0.0 && p->dist[i] == SB_DIST_RECT) {
            w->active[n_active] = i;
            w->scale[n_active++] = SQRT3 * p->u[i];
        }
    }

    struct mc_sums acc;
    memset(&acc, 0, sizeof acc);
    memset(out, 0, sizeof *out);
    size_t n = 0;
    int converged = 1;

    if (!adaptive) {
        rc = run_trials(w, p, n_normal, n_active, 0, o->trials, &acc);
        n = o->trials;
    } else {
        /* JCGM 101:2008 7.9.4: batches of M trials until every statistic
         * is stable to within its numerical tolerance. */
        const size_t M = SB_MC_BATCH;
        size_t h = 0;
        converged = 0;
        while (rc == SB_OK && (h + 1) * M <= o->max_trials) {
            if ((h + 1) * M > w->cap_trials) {
                size_t grow = 2 * w->cap_trials;
                if (grow > o->max_trials)
                    grow = o->max_trials;
                rc = work_reserve(w, p->n_in, grow, 1);
                if (rc != SB_OK)
                    return sb_error_set(err, rc, NULL, 0, 0,
                                        "out of memory for %zu Monte Carlo "
                                        "trials", grow);
            }
            double s1e = acc.s1[0], s1n = acc.s1[1];
            rc = run_trials(w, p, n_normal, n_active, h * M, M, &acc);
            if (rc != SB_OK)
                break;
            /* this batch's mean E and N, from the growth of the sums */
            double bm[2] = {acc.k[0] + (acc.s1[0] - s1e) / (double)M,
                            acc.k[1] + (acc.s1[1] - s1n) / (double)M};
            batch_stats(w, w->z + h * M, w->r + h * M, M, bm, h);
            h++;
            if (h < 2)
                continue;
            double mz, vz, me, ve, mn, vn;
            sums_mean_var(&acc, 2, &mz, &vz);
            sums_mean_var(&acc, 0, &me, &ve);
            sums_mean_var(&acc, 1, &mn, &vn);
            double dz = o->tol_factor * sb_mc_tolerance(sqrt(vz), o->digits);
            double dh = o->tol_factor *
                        sb_mc_tolerance(sqrt(0.5 * (ve + vn)), o->digits);
            int ok = 1;
            for (int s = 0; s < STAT_COUNT && ok; s++) {
                double delta = s < STAT_Z_LAST ? dz : dh;
                if (2.0 * sd_of_average(w->batch[s], h) > delta)
                    ok = 0;
            }
            if (ok) {
                converged = 1;
                break;
            }
        }
        n = h * M;
    }
    if (rc == SB_ENUM)
        return sb_error_set(err, SB_ENUM, NULL, 0, 0,
                            "the model returned a non-finite error (expected "
                            "finite values for every draw)");
    if (rc != SB_OK)
        return rc;
    final_stats(w, &acc, n, o->digits, out);
    out->converged = converged;
    return SB_OK;
}

int sb_mc_run(const struct sb_mc_problem *p, const struct sb_mc_options *o,
              uint64_t stream_seed, struct sb_mc_stats *out,
              struct sb_error *err)
{
    struct mc_work w;
    int rc = sb_mc_options_check(o, err);
    if (rc != SB_OK)
        return rc;
    memset(&w, 0, sizeof w);
    rc = run_on(&w, p, o, stream_seed, out, err);
    work_free(&w);
    return rc;
}

/* ---- parallel over problems ------------------------------------------- */

struct mc_pool {
    const struct sb_mc_problem *p;
    const uint64_t *keys;
    size_t n;
    const struct sb_mc_options *o;
    struct sb_mc_stats *out;
    int *status;             /* per problem */
    struct sb_error *errs;   /* per problem */
    pthread_mutex_t lock;
    size_t next;             /* next problem to take */
};

static void *pool_worker(void *arg)
{
    struct mc_pool *pool = arg;
    struct mc_work w;
    memset(&w, 0, sizeof w);
    for (;;) {
        pthread_mutex_lock(&pool->lock);
        size_t i = pool->next++;
        pthread_mutex_unlock(&pool->lock);
        if (i >= pool->n)
            break;
        uint64_t key = pool->keys ? pool->keys[i] : (uint64_t)i;
        sb_error_clear(&pool->errs[i]);
        pool->status[i] =
            run_on(&w, &pool->p[i], pool->o,
                   sb_mc_stream_seed(pool->o->seed, key), &pool->out[i],
                   &pool->errs[i]);
    }
    work_free(&w);
    return NULL;
}

int sb_mc_run_many(const struct sb_mc_problem *p, const uint64_t *keys,
                   size_t n, const struct sb_mc_options *o,
                   struct sb_mc_stats *out, struct sb_error *err)
{
    int rc = sb_mc_options_check(o, err);
    if (rc != SB_OK)
        return rc;
    if (n == 0)
        return SB_OK;

    struct mc_pool pool;
    memset(&pool, 0, sizeof pool);
    pool.p = p;
    pool.keys = keys;
    pool.n = n;
    pool.o = o;
    pool.out = out;
    pool.status = calloc(n, sizeof *pool.status);
    pool.errs = calloc(n, sizeof *pool.errs);
    size_t nt = (size_t)o->threads < n ? (size_t)o->threads : n;
    pthread_t *tid = calloc(nt, sizeof *tid);
    if (!pool.status || !pool.errs || !tid) {
        free(pool.status);
        free(pool.errs);
        free(tid);
        return sb_error_set(err, SB_ENOMEM, NULL, 0, 0,
                            "out of memory for %zu Monte Carlo points", n);
    }
    pthread_mutex_init(&pool.lock, NULL);

    /* The calling thread works too; extra threads that fail to start only
     * cost speed, never results. */
    size_t started = 0;
    for (size_t t = 1; t < nt; t++) {
        if (pthread_create(&tid[t], NULL, pool_worker, &pool) != 0)
            break;
        started = t;
    }
    pool_worker(&pool);
    for (size_t t = 1; t <= started; t++)
        pthread_join(tid[t], NULL);
    pthread_mutex_destroy(&pool.lock);

    rc = SB_OK;
    for (size_t i = 0; i < n; i++) {
        if (pool.status[i] != SB_OK) {
            rc = pool.status[i];
            if (err)
                *err = pool.errs[i];
            break;
        }
    }
    free(pool.status);
    free(pool.errs);
    free(tid);
    return rc;
}

int sb_mc_validate(double y, double U, double low, double high,
                   double delta, double *d_low, double *d_high)
{
    /* JCGM 101:2008 8.1 c) and d). */
    double dl = fabs(y - U - low);
    double dh = fabs(y + U - high);
    if (d_low)
        *d_low = dl;
    if (d_high)
        *d_high = dh;
    return dl <= delta && dh <= delta;
}

/* ---- the sounding glue -------------------------------------------------- */

/* The engine's error function as a Monte Carlo model: the same code path
 * as the linear budget's Jacobian (propagate.c), so the two differ only by
 * what is done with the model, never by the model. */
static void beam_model(const void *ctx, const double *dx, double out[3])
{
    sb_georef_error(ctx, dx, out);
}

/* A point's identity for its random stream: the bit patterns of its depth
 * and angle (with -0 folded into +0), hashed. */
static uint64_t point_key(double depth_m, double angle_rad)
{
    uint64_t a, b;
    if (depth_m == 0.0)
        depth_m = 0.0;
    if (angle_rad == 0.0)
        angle_rad = 0.0;
    memcpy(&a, &depth_m, sizeof a);
    memcpy(&b, &angle_rad, sizeof b);
    return sb_mc_stream_seed(a, b);
}

int sb_mc_verify_points(const struct sb_system *sys, const double *depths_m,
                        size_t n_depths, const double *angles_rad,
                        size_t n_angles, const struct sb_mc_options *o,
                        struct sb_mc_point_result *out, struct sb_error *err)
{
    int rc = sb_mc_options_check(o, err);
    if (rc != SB_OK)
        return rc;
    if (n_depths == 0 || n_angles == 0)
        return SB_OK;
    if (n_depths > SIZE_MAX / n_angles / sizeof(struct sb_beam))
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "too many points (%zu depths x %zu angles)",
                            n_depths, n_angles);
    size_t n = n_depths * n_angles;
    struct sb_beam *beams = malloc(n * sizeof *beams);
    struct sb_mc_problem *probs = malloc(n * sizeof *probs);
    uint64_t *keys = malloc(n * sizeof *keys);
    struct sb_mc_stats *st = calloc(n, sizeof *st);
    struct sb_tpu *tpu = malloc(n * sizeof *tpu);
    struct sb_horiz95 *h95 = NULL;

    if (!beams || !probs || !keys || !st || !tpu) {
        rc = sb_error_set(err, SB_ENOMEM, NULL, 0, 0,
                          "out of memory for %zu Monte Carlo points", n);
        goto done;
    }
    h95 = sb_horiz95_alloc(err);
    if (!h95) {
        rc = SB_ENOMEM;
        if (err && !err->msg[0])
            sb_error_set(err, rc, NULL, 0, 0, "could not build the THU table");
        goto done;
    }
    for (size_t i = 0; i < n; i++) {
        double d = depths_m[i / n_angles], a = angles_rad[i % n_angles];
        rc = sb_beam_setup(sys, d, a, &beams[i], err);
        if (rc != SB_OK)
            goto done;
        rc = sb_propagate(&beams[i], h95, &tpu[i], NULL);
        if (rc != SB_OK) {
            sb_error_set(err, rc, NULL, 0, 0,
                         "linear budget not finite at depth %g m, angle %g "
                         "deg (expected finite uncertainties)",
                         d, a * DEG_PER_RAD);
            goto done;
        }
        probs[i] = (struct sb_mc_problem){beam_model, &beams[i],
                                          SB_COMP_COUNT, beams[i].u,
                                          beams[i].dist};
        keys[i] = point_key(d, a);
    }

    struct sb_mc_options oc = *o;
    if (oc.trials == 0 && oc.tol_factor > 0.2)
        oc.tol_factor = 0.2; /* JCGM 101:2008 8.2: stop at delta / 5 */
    rc = sb_mc_run_many(probs, keys, n, &oc, st, err);
    if (rc != SB_OK)
        goto done;

    for (size_t i = 0; i < n; i++) {
        struct sb_mc_point_result *r = &out[i];
        memset(r, 0, sizeof *r);
        r->depth_m = depths_m[i / n_angles];
        r->angle_rad = angles_rad[i % n_angles];
        r->sigma_z_linear_m = tpu[i].sigma_z_m;
        r->tvu_linear_m = tpu[i].tvu95_m;
        r->thu_linear_m = tpu[i].thu95_m;
        r->tvu_mc_m = st[i].abs_z95;
        r->thu_mc_m = st[i].h95;
        r->bias_z_m = st[i].mean_z;
        r->bias_h_m = st[i].mean_h;
        r->sd_z_mc_m = st[i].sd_z;
        r->low_z_m = st[i].low_z;
        r->high_z_m = st[i].high_z;
        r->sym_low_z_m = st[i].sym_low_z;
        r->sym_high_z_m = st[i].sym_high_z;
        r->trials = st[i].trials;
        r->converged = st[i].converged;
        /* JCGM 101:2008 8.1-8.2: the linear estimate of the error is 0,
         * its interval 0 +/- TVU95, symmetric by construction, so it is
         * set against the MC interval of the same construction (2.5 % and
         * 97.5 % points); delta from the linear u written to the digits
         * asked */
        r->delta_m = sb_mc_tolerance(r->sigma_z_linear_m, o->digits);
        r->linear_valid = sb_mc_validate(0.0, r->tvu_linear_m,
                                         r->sym_low_z_m, r->sym_high_z_m,
                                         r->delta_m, &r->d_low_m,
                                         &r->d_high_m);
    }
    rc = SB_OK;
done:
    sb_horiz95_free(h95);
    free(beams);
    free(probs);
    free(keys);
    free(st);
    free(tpu);
    return rc;
}

int sb_mc_verify_point(const struct sb_system *sys, double depth_m,
                       double angle_rad, const struct sb_mc_options *o,
                       struct sb_mc_point_result *out, struct sb_error *err)
{
    return sb_mc_verify_points(sys, &depth_m, 1, &angle_rad, 1, o, out, err);
}

/* Walk one side outward from nadir over the grid angles of that side;
 * the last angle before the first failure, or NAN (also when the grid has
 * no angle strictly on that side). */
static double side_edge(const struct sb_mc_point_result *pts, size_t n,
                        int sign, int mc, double tvu_lim, double thu_lim)
{
    double edge = NAN, from = -1.0;
    int has_side = 0;
    for (size_t i = 0; i < n; i++)
        has_side |= pts[i].angle_rad * sign > 0.0;
    if (!has_side) /* nadir alone says nothing about this side */
        return NAN;
    for (;;) {
        /* next grid angle of this side beyond `from` (|angle|) */
        size_t best = n;
        for (size_t i = 0; i < n; i++) {
            double a = pts[i].angle_rad * sign;
            if (a >= 0.0 && a > from && (best == n || a < pts[best].angle_rad * sign))
                best = i;
        }
        if (best == n)
            return edge;
        const struct sb_mc_point_result *p = &pts[best];
        double tvu = mc ? p->tvu_mc_m : p->tvu_linear_m;
        double thu = mc ? p->thu_mc_m : p->thu_linear_m;
        if (!(tvu <= tvu_lim && thu <= thu_lim))
            return edge;
        from = p->angle_rad * sign;
        edge = from;
    }
}

int sb_mc_fail_compare(const struct sb_mc_point_result *pts, size_t n,
                       double tvu_limit_m, double thu_limit_m,
                       struct sb_mc_fail_compare *out)
{
    if (n == 0 || !(tvu_limit_m > 0.0) || !(thu_limit_m > 0.0))
        return SB_EINPUT;
    out->port_linear_rad = side_edge(pts, n, -1, 0, tvu_limit_m, thu_limit_m);
    out->port_mc_rad = side_edge(pts, n, -1, 1, tvu_limit_m, thu_limit_m);
    out->stbd_linear_rad = side_edge(pts, n, 1, 0, tvu_limit_m, thu_limit_m);
    out->stbd_mc_rad = side_edge(pts, n, 1, 1, tvu_limit_m, thu_limit_m);
    /* NAN == NAN is false: two NANs agree */
    out->port_differs = !(out->port_linear_rad == out->port_mc_rad ||
                          (isnan(out->port_linear_rad) &&
                           isnan(out->port_mc_rad)));
    out->stbd_differs = !(out->stbd_linear_rad == out->stbd_mc_rad ||
                          (isnan(out->stbd_linear_rad) &&
                           isnan(out->stbd_mc_rad)));
    return SB_OK;
}
