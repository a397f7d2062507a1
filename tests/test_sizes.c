/*
 * test_sizes.c - the library's size arithmetic: counts times sizes and
 * sums of sizes saturate at SIZE_MAX instead of wrapping, and no
 * allocation grants a saturated size. This suite links the static library
 * to reach lib/memory.h directly: the sizes that overflow belong to
 * models too large to build in a test.
 */
#include <check.h>
#include <limits.h>
#include <stdint.h>

#include "memory.h"
#include "suite.h"

START_TEST(products_and_sums_saturate) {
  ck_assert(kli_size_mul(3, 5) == 15);
  ck_assert(kli_size_mul(0, SIZE_MAX) == 0);
  ck_assert(kli_size_mul(SIZE_MAX, 1) == SIZE_MAX);
  ck_assert(kli_size_mul(SIZE_MAX / 2 + 1, 2) == SIZE_MAX); /* wraps to 0 */
  ck_assert(kli_size_mul((size_t)1 << (sizeof(size_t) * 4),
                         (size_t)1 << (sizeof(size_t) * 4)) == SIZE_MAX);
  ck_assert(kli_size_add(SIZE_MAX - 1, 1) == SIZE_MAX);
  ck_assert(kli_size_add(SIZE_MAX - 1, 2) == SIZE_MAX); /* wraps to 0 */
  ck_assert(kli_size_add(2, 3) == 5);
}
END_TEST

/* A carving whose arrays add up past SIZE_MAX stays at SIZE_MAX however
 * many arrays follow (a later small one would wrap it back otherwise). */
START_TEST(carving_saturates_and_stays) {
  kli_carver c = {NULL, 0};
  kli_carve(&c, 10, sizeof(double));
  ck_assert(c.used == 80);
  kli_carve(&c, SIZE_MAX / 4, sizeof(double)); /* count x size overflows */
  ck_assert(c.used == SIZE_MAX);
  kli_carve(&c, 1, 1);
  ck_assert(c.used == SIZE_MAX);
  c.used = SIZE_MAX - 5; /* the alignment itself would overflow */
  kli_carve(&c, 1, 1);
  ck_assert(c.used == SIZE_MAX);
  c.used = SIZE_MAX - 100; /* a sum that overflows */
  kli_carve(&c, 200, 1);
  ck_assert(c.used == SIZE_MAX);
}
END_TEST

static int hook_calls;

static void *refusing_hook(void *user, void *ptr, size_t old_size,
                           size_t new_size) {
  (void)user;
  (void)ptr;
  (void)old_size;
  (void)new_size;
  hook_calls++;
  return NULL;
}

/* A saturated size never reaches the hook; growth past an int is
 * KL_ENOMEM, the array untouched. */
START_TEST(saturated_sizes_are_never_allocated) {
  kli_allocator a = {refusing_hook, NULL};
  void *arr = NULL;
  int cap = 0;
  hook_calls = 0;
  ck_assert_ptr_null(kli_alloc(&a, SIZE_MAX));
  ck_assert_int_eq(hook_calls, 0);
  ck_assert_ptr_null(kli_alloc(&a, 0));
  ck_assert_int_eq(hook_calls, 0);
  ck_assert_int_eq(kli_reserve(&a, &arr, &cap, INT_MAX, 8), KL_ENOMEM);
  ck_assert_int_eq(kli_reserve(&a, &arr, &cap, INT32_MAX / 2, SIZE_MAX / 4),
                   KL_ENOMEM);
  ck_assert_int_eq(hook_calls, 0);
  ck_assert_ptr_null(arr);
  ck_assert_int_eq(cap, 0);
}
END_TEST

int main(void) {
  Suite *suite = suite_create("sizes");
  TCase *tc = tcase_create("sizes");
  tcase_add_test(tc, products_and_sums_saturate);
  tcase_add_test(tc, carving_saturates_and_stays);
  tcase_add_test(tc, saturated_sizes_are_never_allocated);
  suite_add_tcase(suite, tc);
  return run_suite(suite);
}
