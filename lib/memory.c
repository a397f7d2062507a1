/*
 * memory.c - allocation through the caller's hook, growth of the builders'
 * arrays, and carving of sized-once blocks.
 */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "memory.h"

#define KLI_ALIGN 16u

void *kli_default_alloc(void *user, void *ptr, size_t old_size,
                        size_t new_size) {
  (void)user;
  (void)old_size;
  if (new_size == 0) {
    free(ptr);
    return NULL;
  }
  return realloc(ptr, new_size);
}

size_t kli_size_mul(size_t a, size_t b) {
  return b != 0 && a > SIZE_MAX / b ? SIZE_MAX : a * b;
}

size_t kli_size_add(size_t a, size_t b) {
  return a > SIZE_MAX - b ? SIZE_MAX : a + b;
}

void *kli_alloc(const kli_allocator *a, size_t size) {
  return size == 0 || size == SIZE_MAX ? NULL : a->fn(a->user, NULL, 0, size);
}

void kli_free(const kli_allocator *a, void *p, size_t size) {
  if (p != NULL)
    (void)a->fn(a->user, p, size, 0);
}

int kli_reserve(const kli_allocator *a, void **arr, int *cap, int need,
                size_t elem) {
  int new_cap;
  void *p;
  if (need <= *cap)
    return KL_OK;
  if (need > INT32_MAX / 2 || (size_t)need > SIZE_MAX / 2 / elem)
    return KL_ENOMEM;
  new_cap = *cap < 4 ? 4 : *cap;
  while (new_cap < need)
    new_cap *= 2;
  p = a->fn(a->user, *arr, (size_t)*cap * elem, (size_t)new_cap * elem);
  if (p == NULL)
    return KL_ENOMEM;
  *arr = p;
  *cap = new_cap;
  return KL_OK;
}

void *kli_carve(kli_carver *c, size_t count, size_t elem) {
  size_t start;
  if (c->used > SIZE_MAX - KLI_ALIGN) { /* saturated: stays so */
    c->used = SIZE_MAX;
    return NULL;
  }
  start = (c->used + KLI_ALIGN - 1) / KLI_ALIGN * KLI_ALIGN;
  c->used = kli_size_add(start, kli_size_mul(count, elem));
  /* an empty array still gets a pointer into the block, so that copying
   * zero elements from or to it is well defined */
  return c->base == NULL ? NULL : c->base + start;
}

void kli_copy_sized(void *to, const void *from, size_t full) {
  size_t have, n;
  memcpy(&have, to, sizeof have);
  n = have < full ? have : full;
  memcpy((char *)to + sizeof have, (const char *)from + sizeof have,
         n - sizeof have);
}
