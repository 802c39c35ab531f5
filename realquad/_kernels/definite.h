/*
 * Shared between the kernels of positive definite forms (definite_kernels.c and
 * definite_structure_kernels.c): a growable int64 array, the hash table of reduced forms
 * (a, b) -> class, and the internal entry points of the class-group walk and the count.
 */
#ifndef REALQUAD_DEFINITE_H
#define REALQUAD_DEFINITE_H

#include "kernels.h"

/* A growable array of int64 values. */
typedef struct {
    int64_t *v;
    int64_t n, cap;
} vec_t;

static inline int
vec_push(vec_t *s, int64_t x)
{
    if (s->n == s->cap) {
        int64_t cap = s->cap ? 2 * s->cap : 64, *g = (int64_t *)PyMem_Realloc(s->v, (size_t)cap * sizeof(int64_t));
        if (g == NULL) {
            PyErr_NoMemory();
            return -1;
        }
        s->v = g, s->cap = cap;
    }
    s->v[s->n++] = x;
    return 0;
}

/* Open addressing (a, b) -> class; a >= 1, so key 0 marks an empty slot. */
typedef struct {
    uint64_t *keys;
    int32_t *cls;
    size_t mask, used;
} dtable_t;

static inline uint64_t
dkey(int64_t a, int64_t b)
{
    return ((uint64_t)a << 32) | (uint64_t)(uint32_t)(b + ((int64_t)1 << 31));
}

static inline size_t
dslot(const dtable_t *t, uint64_t key)
{
    size_t i = (size_t)((key * 0x9E3779B97F4A7C15ULL) >> 20) & t->mask;
    while (t->keys[i] != 0 && t->keys[i] != key)
        i = (i + 1) & t->mask;
    return i;
}

static inline int
dtable_init(dtable_t *t, size_t n)
{
    t->keys = (uint64_t *)PyMem_Calloc(n, sizeof(uint64_t));
    t->cls = (int32_t *)PyMem_Malloc(n * sizeof(int32_t));
    t->mask = n - 1, t->used = 0;
    if (t->keys == NULL || t->cls == NULL) {
        PyMem_Free(t->keys), PyMem_Free(t->cls);
        t->keys = NULL, t->cls = NULL;
        PyErr_NoMemory();
        return -1;
    }
    return 0;
}

static inline void
dtable_free(dtable_t *t)
{
    PyMem_Free(t->keys), PyMem_Free(t->cls);
    t->keys = NULL, t->cls = NULL;
}

static inline int64_t
dtable_get(const dtable_t *t, int64_t a, int64_t b)
{
    size_t i = dslot(t, dkey(a, b));
    return t->keys[i] ? (int64_t)t->cls[i] : -1;
}

static inline int
dtable_put(dtable_t *t, int64_t a, int64_t b, int64_t cls)
{
    size_t i;
    if (2 * (t->used + 1) > t->mask + 1) {
        dtable_t fresh;
        size_t j;
        if (dtable_init(&fresh, 2 * (t->mask + 1)) < 0)
            return -1;
        for (j = 0; j <= t->mask; j++)
            if (t->keys[j]) {
                size_t k = dslot(&fresh, t->keys[j]);
                fresh.keys[k] = t->keys[j], fresh.cls[k] = t->cls[j];
            }
        fresh.used = t->used;
        dtable_free(t);
        *t = fresh;
    }
    i = dslot(t, dkey(a, b));
    if (!t->keys[i])
        t->used++;
    t->keys[i] = dkey(a, b), t->cls[i] = (int32_t)cls;
    return 0;
}

/* The walk: reps holds (a, b, c) per class; class i's vector has vlen[i] entries starting at
   voff[i] in vdata. */
typedef struct {
    vec_t reps, vdata, voff, vlen, gens;
} walk_t;

static inline void
walk_free(walk_t *w)
{
    PyMem_Free(w->reps.v), PyMem_Free(w->vdata.v), PyMem_Free(w->voff.v), PyMem_Free(w->vlen.v);
    PyMem_Free(w->gens.v);
}

/* The candidate generators (prime forms of the primes, reduced) of D with the conductor. */
KERNEL_PRIVATE int definite_candidates(int64_t D, int64_t conductor, const int64_t *primes, Py_ssize_t len,
                                       vec_t *out);

/* The walk of definite_class_relations in the subgroup of power-th powers, stopping at target
 * classes (0: the whole group) and at max_forms (then 0 is returned); relations appended to the
 * Python list rels or, when rels is NULL, to crels row after row (row i has i + 1 entries).
 * Returns 1 when done, 0 beyond max_forms, -1 on error. */
KERNEL_PRIVATE int definite_relation_walk(int64_t D, int64_t conductor, const int64_t *primes, Py_ssize_t len,
                                          int64_t max_forms, int64_t target, int64_t power, walk_t *w,
                                          dtable_t *t, PyObject *rels, vec_t *crels);

/* h(D) of a fundamental D < 0, |D| <= COUNT_LIMIT, by counting reduced forms; N and largest
   hold floor(sqrt(|D|/3)) + 1 entries each. -1 on error. */
#define COUNT_LIMIT ((int64_t)100000000000000LL)
KERNEL_PRIVATE int64_t definite_count(int64_t D, const int64_t *primes, Py_ssize_t len, uint32_t *N,
                                      uint32_t *largest);
/* x^-1 mod p for gcd(x, p) = 1, 0 < x < p (extended Euclid). */
KERNEL_PRIVATE int64_t inverse_mod(int64_t x, int64_t p);
/* floor(sqrt(|D|/3)): the largest first coefficient of a reduced form of D < 0. */
KERNEL_PRIVATE int64_t definite_amax(int64_t D);

#endif
