/*
 * Tests of the reference surface (grid.c).  Cell statistics are checked
 * against GSL's two-pass gsl_stats_mean / gsl_stats_sd on the same values
 * (an independent method), and coarsening against a grid built directly at
 * the coarse size.
 */
#include <check.h>
#include <gsl/gsl_rng.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <stdlib.h>

#include "swathbudget/grid.h"

START_TEST(cell_stats_match_gsl)
{
    /* 200 depths at random places inside the cell [10, 12) x [-4, -2) of a
     * 2 m grid (x and y chosen on both sides of zero) */
    struct sb_grid *g;
    struct sb_error err;
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    double z[200];
    const struct sb_grid_cell *c;

    ck_assert_int_eq(sb_grid_alloc(2.0, &g, &err), SB_OK);
    for (int i = 0; i < 200; i++) {
        double x = 10 + 2 * gsl_rng_uniform(r);
        double y = -4 + 2 * gsl_rng_uniform(r);

        /* a large offset makes a naive sum-of-squares formula lose digits;
         * Welford's update must not */
        z[i] = 1000.0 + gsl_ran_gaussian(r, 0.05);
        ck_assert_int_eq(sb_grid_add(g, x, y, z[i], &err), SB_OK);
    }
    ck_assert_uint_eq(sb_grid_count(g), 1);
    c = sb_grid_find(g, 11.0, -3.0);
    ck_assert_ptr_nonnull(c);
    ck_assert_int_eq(c->ix, 5);
    ck_assert_int_eq(c->iy, -2);
    ck_assert_uint_eq(c->n, 200);
    ck_assert(fabs(c->mean - gsl_stats_mean(z, 1, 200)) < 1e-12);
    ck_assert(fabs(sb_grid_cell_sd(c) - gsl_stats_sd(z, 1, 200)) < 1e-12);
    /* neighbours are empty */
    ck_assert_ptr_null(sb_grid_find(g, 12.0, -3.0));
    ck_assert_ptr_null(sb_grid_find(g, 11.0, -2.0));
    ck_assert_ptr_null(sb_grid_find(g, 9.999, -3.0));
    gsl_rng_free(r);
    sb_grid_free(g);
}
END_TEST

START_TEST(cell_edges)
{
    /* cell i holds i c <= x < (i + 1) c: a point on a boundary belongs to
     * the cell above it (the floor convention) */
    struct sb_grid *g;
    struct sb_error err;

    ck_assert_int_eq(sb_grid_alloc(0.5, &g, &err), SB_OK);
    ck_assert_int_eq(sb_grid_add(g, 1.0, 0.0, 5.0, &err), SB_OK);
    ck_assert_int_eq(sb_grid_find(g, 1.0, 0.0)->ix, 2);
    ck_assert_ptr_null(sb_grid_find(g, 0.9999, 0.0));
    ck_assert_ptr_nonnull(sb_grid_find(g, 1.4999, 0.4999));
    ck_assert_ptr_null(sb_grid_find(g, 1.5, 0.0));
    ck_assert_ptr_null(sb_grid_find(g, 1.2, -0.0001));
    ck_assert(sb_grid_cell_sd(sb_grid_find(g, 1.2, 0.2)) == 0.0);
    sb_grid_free(g);
}
END_TEST

START_TEST(many_cells_grow_and_coarsen)
{
    /* a 300 x 300 field of 1 m cells (90 000 cells: the table doubles many
     * times), each cell given 3 values; the depth varies with position */
    struct sb_grid *g, *c4, *direct;
    struct sb_error err;
    size_t pos = 0;
    const struct sb_grid_cell *cell;

    ck_assert_int_eq(sb_grid_alloc(1.0, &g, &err), SB_OK);
    ck_assert_int_eq(sb_grid_alloc(4.0, &direct, &err), SB_OK);
    for (int i = -150; i < 150; i++)
        for (int j = -150; j < 150; j++)
            for (int k = 0; k < 3; k++) {
                double x = i + 0.25 + 0.25 * k, y = j + 0.5;
                double z = 20 + 0.01 * i - 0.02 * j + 0.1 * k;

                ck_assert_int_eq(sb_grid_add(g, x, y, z, &err), SB_OK);
                ck_assert_int_eq(sb_grid_add(direct, x, y, z, &err), SB_OK);
            }
    ck_assert_uint_eq(sb_grid_count(g), 90000);
    /* one cell's mean and sd by hand: values 20 + 0.01 i - 0.02 j + {0,
     * 0.1, 0.2}: mean + 0.1, sd 0.1 */
    cell = sb_grid_find(g, -10.5, 7.5);
    ck_assert(fabs(cell->mean - (20 - 0.11 - 0.14 + 0.1)) < 1e-12);
    ck_assert(fabs(sb_grid_cell_sd(cell) - 0.1) < 1e-12);

    ck_assert_int_eq(sb_grid_coarsen(g, 4, &c4, &err), SB_OK);
    ck_assert(sb_grid_cell_size(c4) == 4.0);
    ck_assert_uint_eq(sb_grid_count(c4), sb_grid_count(direct));
    /* x, y in [-150, 150) m: 4 m cells -38 .. 37, 76 each way */
    ck_assert_uint_eq(sb_grid_count(c4), 76 * 76);
    while ((cell = sb_grid_next(direct, &pos)) != NULL) {
        const struct sb_grid_cell *m =
            sb_grid_find(c4, cell->ix * 4.0 + 1, cell->iy * 4.0 + 1);

        ck_assert_ptr_nonnull(m);
        ck_assert_uint_eq(m->n, cell->n);
        ck_assert(fabs(m->mean - cell->mean) < 1e-12);
        ck_assert(fabs(m->m2 - cell->m2) < 1e-9);
    }
    sb_grid_free(g);
    sb_grid_free(c4);
    sb_grid_free(direct);
}
END_TEST

START_TEST(refusals)
{
    struct sb_grid *g = NULL;
    struct sb_error err;

    ck_assert_int_eq(sb_grid_alloc(0.0, &g, &err), SB_EINPUT);
    ck_assert_int_eq(sb_grid_alloc(NAN, &g, &err), SB_EINPUT);
    ck_assert_ptr_null(g);
    ck_assert_int_eq(sb_grid_alloc(1.0, &g, &err), SB_OK);
    ck_assert_int_eq(sb_grid_add(g, NAN, 0, 1, &err), SB_EINPUT);
    ck_assert_int_eq(sb_grid_add(g, 0, 0, INFINITY, &err), SB_EINPUT);
    ck_assert_int_eq(sb_grid_add(g, 3e9, 0, 1, NULL), SB_EINPUT);
    ck_assert_ptr_null(sb_grid_find(g, 3e9, 0));
    ck_assert_ptr_null(sb_grid_find(g, NAN, 0));
    ck_assert_uint_eq(sb_grid_count(g), 0);
    sb_grid_free(g);
}
END_TEST

START_TEST(cell_for_depth)
{
    /* 5 % of the depth rounded down to a power of two, in [0.5, 512] m */
    ck_assert(sb_grid_cell_for_depth(1.0) == 0.5);
    ck_assert(sb_grid_cell_for_depth(20.0) == 1.0);  /* 1.0 */
    ck_assert(sb_grid_cell_for_depth(40.0) == 2.0);  /* 2.0 */
    ck_assert(sb_grid_cell_for_depth(39.0) == 1.0);  /* 1.95 */
    ck_assert(sb_grid_cell_for_depth(200.0) == 8.0); /* 10 */
    ck_assert(sb_grid_cell_for_depth(1e6) == 512.0);
    ck_assert(sb_grid_cell_for_depth(NAN) == 0.5);
}
END_TEST

static Suite *suite(void)
{
    Suite *s = suite_create("grid");
    TCase *tc = tcase_create("core");

    tcase_set_timeout(tc, 120);
    tcase_add_test(tc, cell_stats_match_gsl);
    tcase_add_test(tc, cell_edges);
    tcase_add_test(tc, many_cells_grow_and_coarsen);
    tcase_add_test(tc, refusals);
    tcase_add_test(tc, cell_for_depth);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    SRunner *sr = srunner_create(suite());
    int failed;

    srunner_run_all(sr, CK_NORMAL);
    failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    return failed ? EXIT_FAILURE : EXIT_SUCCESS;
}
