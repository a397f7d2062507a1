/*
 * memory.h - private: every allocation goes through the model's hook; blocks
 * are sized once and carved into aligned arrays.
 */
#ifndef KINLOOP_MEMORY_H
#define KINLOOP_MEMORY_H

#include <stddef.h>
#include <stdint.h>

#include "kinloop.h"

/* The hook and its user pointer, as a model keeps them. */
typedef struct {
  kl_alloc_fn fn;
  void *user;
} kli_allocator;

/* The hook of kl_model_new: malloc, realloc and free. */
void *kli_default_alloc(void *user, void *ptr, size_t old_size,
                        size_t new_size);

/* Sizes saturate rather than wrap: a count times a size, or a sum, that a
 * size_t cannot hold is SIZE_MAX, which no allocation grants (kli_alloc
 * refuses it without calling the hook), so an overflowing size ends in
 * KL_ENOMEM, never in a block smaller than its arrays. */
size_t kli_size_mul(size_t a, size_t b);
size_t kli_size_add(size_t a, size_t b);

/* NULL for size 0 or SIZE_MAX (a saturated size), else the hook's block. */
void *kli_alloc(const kli_allocator *a, size_t size);
void kli_free(const kli_allocator *a, void *p, size_t size);
/* Ensures *arr holds at least `need` elements of `elem` bytes, growing by
 * doubling; KL_OK, or KL_ENOMEM with *arr and *cap untouched. */
int kli_reserve(const kli_allocator *a, void **arr, int *cap, int need,
                size_t elem);

/*
 * Carving one block into arrays: a first pass with base NULL only adds up
 * the bytes (kli_carve returns NULL); a second pass over the allocated block
 * hands out the same arrays in the same order, each aligned for any type
 * (an empty array gets a valid pointer too, never NULL). `used` saturates
 * at SIZE_MAX (kli_size_mul, kli_size_add) when the arrays add up to more
 * than a size_t holds.
 */
typedef struct {
  unsigned char *base;
  size_t used;
} kli_carver;

void *kli_carve(kli_carver *c, size_t count, size_t elem);

/*
 * Copies a struct of the public header whose first field is its size_t
 * `size` (`full` bytes as this library knows it) into the caller's copy,
 * which may come from an older, shorter header: the fields after `size`,
 * no further than the caller's size (at least a size_t, checked by the
 * caller), which stays as the caller set it.
 */
void kli_copy_sized(void *to, const void *from, size_t full);

#endif
