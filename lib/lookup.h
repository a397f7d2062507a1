/*
 * lookup.h - private: open-addressing tables from a key's hash to an id, so
 * that the model finds names and joint pairs in constant time.
 */
#ifndef KINLOOP_LOOKUP_H
#define KINLOOP_LOOKUP_H

#include "memory.h"

typedef struct {
  unsigned hash;
  int id; /* -1: empty */
} kli_lookup_slot;

/* At most half full, so that probes stay short; capacity a power of 2. */
typedef struct {
  kli_lookup_slot *slot;
  int cap, count;
} kli_lookup;

/* Whether id's key is `key` (for the table's owner to say). */
typedef int (*kli_lookup_same)(const void *owner, int id, const void *key);

unsigned kli_hash_text(const char *text);
unsigned kli_hash_ints(int a, int b, int c);

/* Makes room for one more entry; KL_OK, or KL_ENOMEM with t unchanged. */
int kli_lookup_grow(const kli_allocator *a, kli_lookup *t);
/* Adds (hash, id); room must have been made with kli_lookup_grow. */
void kli_lookup_add(kli_lookup *t, unsigned hash, int id);
/* The id whose key is `key`, or -1. */
int kli_lookup_find(const kli_lookup *t, unsigned hash, kli_lookup_same same,
                    const void *owner, const void *key);
/* Empties the table, keeping its memory (for rebuilding it). */
void kli_lookup_clear(kli_lookup *t);
/* A copy of `from` into the empty `to`; KL_OK or KL_ENOMEM. */
int kli_lookup_copy(const kli_allocator *a, kli_lookup *to,
                    const kli_lookup *from);
void kli_lookup_free(const kli_allocator *a, kli_lookup *t);

#endif
