/*
 * lookup.c - open-addressing hash tables from keys to ids: the model's
 * names and joint pairs found in constant time, so building is linear.
 */
#include <string.h>

#include "lookup.h"

unsigned kli_hash_text(const char *text) {
  /* FNV-1a, 32 bits */
  unsigned h = 2166136261u;
  for (; *text != '\0'; text++) {
    h ^= (unsigned char)*text;
    h *= 16777619u;
  }
  return h;
}

unsigned kli_hash_ints(int a, int b, int c) {
  unsigned h = 2166136261u;
  int v[3], i;
  v[0] = a;
  v[1] = b;
  v[2] = c;
  for (i = 0; i < 3; i++) {
    h ^= (unsigned)v[i];
    h *= 16777619u;
    h ^= h >> 15;
  }
  return h;
}

static void put(kli_lookup_slot *slot, int cap, unsigned hash, int id) {
  unsigned mask = (unsigned)cap - 1u, at = hash & mask;
  while (slot[at].id >= 0)
    at = (at + 1u) & mask;
  slot[at].hash = hash;
  slot[at].id = id;
}

int kli_lookup_grow(const kli_allocator *a, kli_lookup *t) {
  kli_lookup_slot *bigger;
  int cap, k;
  if (2 * (t->count + 1) <= t->cap)
    return KL_OK;
  if (t->cap > (1 << 29))
    return KL_ENOMEM;
  cap = t->cap == 0 ? 16 : 2 * t->cap;
  bigger = kli_alloc(a, (size_t)cap * sizeof *bigger);
  if (bigger == NULL)
    return KL_ENOMEM;
  for (k = 0; k < cap; k++)
    bigger[k].id = -1;
  for (k = 0; k < t->cap; k++)
    if (t->slot[k].id >= 0)
      put(bigger, cap, t->slot[k].hash, t->slot[k].id);
  kli_free(a, t->slot, (size_t)t->cap * sizeof *t->slot);
  t->slot = bigger;
  t->cap = cap;
  return KL_OK;
}

void kli_lookup_add(kli_lookup *t, unsigned hash, int id) {
  put(t->slot, t->cap, hash, id);
  t->count++;
}

int kli_lookup_find(const kli_lookup *t, unsigned hash, kli_lookup_same same,
                    const void *owner, const void *key) {
  unsigned mask, at;
  if (t->cap == 0)
    return -1;
  mask = (unsigned)t->cap - 1u;
  for (at = hash & mask; t->slot[at].id >= 0; at = (at + 1u) & mask)
    if (t->slot[at].hash == hash && same(owner, t->slot[at].id, key))
      return t->slot[at].id;
  return -1;
}

void kli_lookup_clear(kli_lookup *t) {
  int k;
  for (k = 0; k < t->cap; k++)
    t->slot[k].id = -1;
  t->count = 0;
}

int kli_lookup_copy(const kli_allocator *a, kli_lookup *to,
                    const kli_lookup *from) {
  to->slot = NULL;
  to->cap = to->count = 0;
  if (from->cap == 0)
    return KL_OK;
  to->slot = kli_alloc(a, (size_t)from->cap * sizeof *to->slot);
  if (to->slot == NULL)
    return KL_ENOMEM;
  memcpy(to->slot, from->slot, (size_t)from->cap * sizeof *to->slot);
  to->cap = from->cap;
  to->count = from->count;
  return KL_OK;
}

void kli_lookup_free(const kli_allocator *a, kli_lookup *t) {
  kli_free(a, t->slot, (size_t)t->cap * sizeof *t->slot);
  t->slot = NULL;
  t->cap = t->count = 0;
}
