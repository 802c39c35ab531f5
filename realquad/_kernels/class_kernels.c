/*
 * Class-group kernels: the narrow classes of D as cycles of reduced forms
 * (class numbers, relations and the class table), walked from the candidates
 * of prime_form_kernels.c.
 */
#include "kernels.h"

/* ------------------------------------------------------------------ */
/* class numbers: the narrow classes of D as cycles of reduced forms   */
/* ------------------------------------------------------------------ */

/*
 * Open-addressing table (a, b) -> class for reduced forms, |a| and b below
 * 2^31 (D < 2^62), keyed by one word. Slots carry the stamp of the walk that
 * filled them, so starting a walk is a stamp increment, not a clearing; one
 * table serves every walk of the process (the next one reuses its memory)
 * unless it is in use, when a walk gets a private one.
 */
typedef struct {
    uint64_t key;
    uint32_t stamp;
    int32_t cls;
} slot_t;

typedef struct {
    slot_t *slots;
    size_t mask, used;
    uint32_t stamp;
    int shift;
} table_t;

static table_t shared_table;
static int shared_busy;

static inline uint64_t
form_key(int64_t a, int64_t b)
{
    return ((uint64_t)(a + ((int64_t)1 << 31)) << 32) | (uint64_t)b;
}

static inline size_t
slot_index(const table_t *t, uint64_t key)
{
    return (size_t)((key * 0x9E3779B97F4A7C15ULL) >> t->shift);
}

/* The slot of key, or the free slot where it would go. */
static inline slot_t *
table_slot(const table_t *t, uint64_t key)
{
    size_t i = slot_index(t, key);
    while (t->slots[i].stamp == t->stamp && t->slots[i].key != key)
        i = (i + 1) & t->mask;
    return &t->slots[i];
}

/* The class of (a, b), or -1 when it is not in the table. */
static inline int64_t
table_class(const table_t *t, int64_t a, int64_t b)
{
    slot_t *e = table_slot(t, form_key(a, b));
    return e->stamp == t->stamp ? (int64_t)e->cls : -1;
}

static int
table_resize(table_t *t, int bits)
{
    size_t n = (size_t)1 << bits, i, oldn = t->slots ? t->mask + 1 : 0;
    slot_t *old = t->slots, *fresh = (slot_t *)PyMem_Calloc(n, sizeof(slot_t));
    uint32_t stamp = t->stamp;
    if (fresh == NULL) {
        PyErr_NoMemory();
        return -1;
    }
    t->slots = fresh, t->mask = n - 1, t->shift = 64 - bits, t->stamp = 1;
    for (i = 0; i < oldn; i++)
        if (old[i].stamp == stamp && stamp != 0) {
            slot_t *e = table_slot(t, old[i].key);
            e->key = old[i].key, e->cls = old[i].cls, e->stamp = 1;
        }
    PyMem_Free(old);
    return 0;
}

/* Start a walk: the shared table with a fresh stamp, or a private table. */
static int
table_open(table_t **out)
{
    table_t *t;
    if (!shared_busy) {
        t = &shared_table, shared_busy = 1;
    } else {
        t = (table_t *)PyMem_Calloc(1, sizeof(table_t));
        if (t == NULL) {
            PyErr_NoMemory();
            return -1;
        }
    }
    t->used = 0;
    if (t->slots == NULL) {
        if (table_resize(t, 12) < 0)
            goto fail;
    } else if (++t->stamp == 0) { /* stamps wrapped: clear once */
        memset(t->slots, 0, (t->mask + 1) * sizeof(slot_t));
        t->stamp = 1;
    }
    *out = t;
    return 0;
fail:
    if (t == &shared_table)
        shared_busy = 0;
    else
        PyMem_Free(t);
    return -1;
}

static void
table_close(table_t *t)
{
    if (t == NULL)
        return;
    if (t == &shared_table) {
        shared_busy = 0;
        return;
    }
    PyMem_Free(t->slots);
    PyMem_Free(t);
}

static inline int
table_put(table_t *t, int64_t a, int64_t b, int64_t cls)
{
    uint64_t key = form_key(a, b);
    slot_t *e;
    if (2 * (t->used + 1) > t->mask + 1 && table_resize(t, 65 - t->shift) < 0)
        return -1;
    e = table_slot(t, key);
    if (e->stamp != t->stamp)
        t->used++;
    e->key = key, e->stamp = t->stamp, e->cls = (int32_t)cls;
    return 0;
}

/* File (a, b) under cls, and in dict (the class index for Python) when given. */
static inline int
file_form(table_t *t, PyObject *dict, int64_t a, int64_t b, int64_t cls)
{
    PyObject *key, *value;
    int rc;
    if (table_put(t, a, b, cls) < 0)
        return -1;
    if (dict == NULL)
        return 0;
    key = Py_BuildValue("(LL)", (long long)a, (long long)b);
    value = PyLong_FromLongLong((long long)cls);
    rc = (key == NULL || value == NULL) ? -1 : PyDict_SetItem(dict, key, value);
    Py_XDECREF(key);
    Py_XDECREF(value);
    return rc;
}

/* One rho step on a reduced form of D < 2^62 (so |a|, |c|, b <= r < 2^31), with
   one division: t = 2|c|q - b for q = floor((r + b)/2|c|), and the new c is
   a + s(t - b)/2 with s = (t + b)/2c, from (b^2 - D)/4c = a. */
static inline void
rho_reduced(int64_t *a, int64_t *b, int64_t *c, int64_t r)
{
    int64_t m2 = 2 * (*c < 0 ? -*c : *c), x = r + *b, q, t, nc;
    q = (int64_t)((uint32_t)x / (uint32_t)m2); /* x < 2^32 */
    t = m2 * q - *b;
    nc = *a + (*c < 0 ? -q : q) * ((t - *b) / 2);
    *a = *c, *b = t, *c = nc;
}

static int64_t file_cycle_mirrored(table_t *t, int64_t a, int64_t b, int64_t c, int64_t r, int64_t limit,
                                   int64_t cls);

/* Walk the rho cycle of the reduced form (a, b, c), filing every form under cls.
   Returns its length, 0 when it is longer than limit, -1 on error. */
static int64_t
file_cycle(table_t *t, PyObject *dict, int64_t a, int64_t b, int64_t c, int64_t r, int64_t limit, int64_t cls)
{
    int64_t a0 = a, b0 = b, k;
    if (dict == NULL)
        return file_cycle_mirrored(t, a, b, c, r, limit, cls);
    if (file_form(t, dict, a, b, cls) < 0)
        return -1;
    for (k = 0; k < limit; k++) {
        rho_reduced(&a, &b, &c, r);
        if (a == a0 && b == b0)
            return k + 1;
        if (file_form(t, dict, a, b, cls) < 0)
            return -1;
        if ((k & 0xFFFFF) == 0xFFFFF && PyErr_CheckSignals() < 0)
            return -1;
    }
    return 0;
}

/*
 * file_cycle without the Python index, walking about half of a cycle when it
 * can. A reduced form f = (a, b, c) and its mirror image (c, b, a) lie in
 * inverse classes; a "centre" is a form with rho(f) = (c, b, a) (rho keeps b).
 * A cycle with a centre is its own mirror image about it, the forms k1 - j
 * and k1 + 1 + j mirroring each other, with a second centre half a cycle on.
 * So the walk goes to the first centre k1 (keeping the mirror images of the
 * forms it passes), files those images, then walks on from the image of the
 * start, filing each form and its image, to the second centre: L/2 + 1 rho
 * steps for a cycle of L forms. A cycle without a centre (a class of order
 * above 2) is walked whole. Returns what file_cycle returns.
 */
static int64_t
file_cycle_mirrored(table_t *t, int64_t a, int64_t b, int64_t c, int64_t r, int64_t limit, int64_t cls)
{
    int64_t a0 = a, b0 = b, c0 = c, na, nb, nc, k, k1, q, n = 0, cap = 256, *images, L = -1;
    images = (int64_t *)PyMem_Malloc((size_t)(2 * cap) * sizeof(int64_t));
    if (images == NULL) {
        PyErr_NoMemory();
        return -1;
    }
    for (k = 0;; k++) { /* to the first centre, or once round */
        if (k >= limit) {
            L = 0;
            goto out;
        }
        if (n == cap) {
            int64_t *grown = (int64_t *)PyMem_Realloc(images, (size_t)(4 * cap) * sizeof(int64_t));
            if (grown == NULL) {
                PyErr_NoMemory();
                goto out;
            }
            images = grown, cap *= 2;
        }
        if (table_put(t, a, b, cls) < 0)
            goto out;
        images[2 * n] = c, images[2 * n + 1] = b, n++;
        na = a, nb = b, nc = c;
        rho_reduced(&na, &nb, &nc, r);
        if (na == a0 && nb == b0) {
            L = k + 1;
            goto out;
        }
        if (nb == b)
            break;
        a = na, b = nb, c = nc;
        if ((k & 0xFFFFF) == 0xFFFFF && PyErr_CheckSignals() < 0)
            goto out;
    }
    k1 = k;
    for (k = 0; k < n; k++)
        if (table_put(t, images[2 * k], images[2 * k + 1], cls) < 0)
            goto out;
    a = c0, b = b0, c = a0; /* the image of the start, at 2 k1 + 1 */
    for (q = 2 * k1 + 1;; q++) {
        if (2 * (q + 1 - k1) > limit + 2) {
            L = 0;
            goto out;
        }
        na = a, nb = b, nc = c;
        rho_reduced(&na, &nb, &nc, r);
        if (nb == b) { /* the second centre, half a cycle after the first */
            L = 2 * (q - k1);
            goto out;
        }
        a = na, b = nb, c = nc;
        if (table_put(t, a, b, cls) < 0 || table_put(t, c, b, cls) < 0)
            goto out;
        if ((q & 0xFFFFF) == 0xFFFFF && PyErr_CheckSignals() < 0)
            goto out;
    }
out:
    PyMem_Free(images);
    if (L > limit)
        L = 0;
    return L;
}

static int
compose_reduce(int64_t a1, int64_t b1, int64_t a2, int64_t b2, int64_t D, int64_t r, int64_t *A, int64_t *B,
               int64_t *C)
{
    if (compose(a1, b1, a2, b2, D, A, B, C) < 0)
        return -1;
    return reduce_form(A, B, C, D, r);
}

/* A Python tuple (v..., 0 * pad, j): the exponent vector of a new class. */
static PyObject *
extend_vector(PyObject *old, Py_ssize_t pad, int64_t j)
{
    Py_ssize_t n = PyTuple_GET_SIZE(old), i;
    PyObject *v;
    if (pad < 0) /* as (0,) * pad in the twin */
        pad = 0;
    v = PyTuple_New(n + pad + 1);
    if (v == NULL)
        return NULL;
    for (i = 0; i < n; i++) {
        PyObject *x = PyTuple_GET_ITEM(old, i);
        Py_INCREF(x);
        PyTuple_SET_ITEM(v, i, x);
    }
    for (i = 0; i < pad; i++)
        PyTuple_SET_ITEM(v, n + i, PyLong_FromLong(0));
    PyTuple_SET_ITEM(v, n + pad, PyLong_FromLongLong((long long)j));
    return v;
}

/* A Python list [-v..., 0 * pad, j]: the relation closing a generator's powers. */
static PyObject *
relation(PyObject *old, Py_ssize_t pad, int64_t j)
{
    Py_ssize_t n = PyTuple_GET_SIZE(old), i;
    PyObject *v;
    if (pad < 0)
        pad = 0;
    v = PyList_New(n + pad + 1);
    if (v == NULL)
        return NULL;
    for (i = 0; i < n; i++)
        PyList_SET_ITEM(v, i, PyNumber_Negative(PyTuple_GET_ITEM(old, i)));
    for (i = 0; i < pad; i++)
        PyList_SET_ITEM(v, n + i, PyLong_FromLong(0));
    PyList_SET_ITEM(v, n + pad, PyLong_FromLongLong((long long)j));
    return v;
}

static int
append_new(PyObject *list, PyObject *item)
{
    int rc = item == NULL ? -1 : PyList_Append(list, item);
    Py_XDECREF(item);
    return rc;
}

/* What the class table keeps for Python besides the counts (all NULL: nothing). */
typedef struct {
    PyObject *index, *vectors, *generators, *relations, *progress;
} class_lists_t;

/* The representatives found so far, as int64 triples. */
typedef struct {
    int64_t *v;
    int64_t n, cap;
} reps_t;

static int
reps_push(reps_t *reps, int64_t a, int64_t b, int64_t c)
{
    if (reps->n == reps->cap) {
        int64_t cap = reps->cap ? 2 * reps->cap : 64;
        int64_t *grown = (int64_t *)PyMem_Realloc(reps->v, (size_t)(3 * cap) * sizeof(int64_t));
        if (grown == NULL) {
            PyErr_NoMemory();
            return -1;
        }
        reps->v = grown, reps->cap = cap;
    }
    reps->v[3 * reps->n] = a, reps->v[3 * reps->n + 1] = b, reps->v[3 * reps->n + 2] = c, reps->n++;
    return 0;
}

/*
 * form_class_table of class_kernels.py, step for step: from the principal cycle, each
 * candidate not yet in the table becomes a generator whose powers times the
 * classes known before it fill new cycles, until a power falls into a known
 * class. Returns 1 when done, 0 when more than max_forms forms would be
 * stored (the twin's None), -1 on error. With keep->vectors set, the Python
 * vectors, generators and relations (and the index, when keep->index is set)
 * are built in the twin's order, and progress is called as the twin calls it.
 */
static int
class_walk(int64_t D, int64_t r, const int64_t *cand, int64_t ncand, int64_t max_forms, table_t *t, reps_t *reps,
           class_lists_t *keep)
{
    int64_t b0 = ((r - D) % 2 == 0) ? r : r - 1, stored, L, i, h, j;
    int lists = keep != NULL && keep->vectors != NULL;
    PyObject *index = lists ? keep->index : NULL;
    L = file_cycle(t, index, 1, b0, (b0 * b0 - D) / 4, r, max_forms, 0);
    if (L <= 0)
        return (int)L;
    stored = L;
    if (reps_push(reps, 1, b0, (b0 * b0 - D) / 4) < 0)
        return -1;
    if (lists && append_new(keep->vectors, PyTuple_New(0)) < 0)
        return -1;
    for (i = 0; i < ncand; i++) {
        int64_t ga = cand[3 * i], gb = cand[3 * i + 1], gc = cand[3 * i + 2], xa, xb, xc, n;
        Py_ssize_t gi = 0;
        int64_t hit;
        if (gc == 0) { /* a lifted candidate: reduced already, its c left to compute */
            if (table_class(t, ga, gb) >= 0)
                continue;
            gc = (gb * gb - D) / (4 * ga);
        }
        if (reduce_form(&ga, &gb, &gc, D, r) < 0)
            return -1;
        if (table_class(t, ga, gb) >= 0)
            continue;
        if (lists) {
            gi = PyList_GET_SIZE(keep->generators);
            if (append_new(keep->generators, Py_BuildValue("(LLL)", (long long)ga, (long long)gb, (long long)gc)) < 0)
                return -1;
        }
        n = reps->n;
        xa = ga, xb = gb, xc = gc;
        for (j = 1;; j++) {
            hit = table_class(t, xa, xb);
            if (hit >= 0) {
                if (lists) {
                    PyObject *old = PyList_GET_ITEM(keep->vectors, (Py_ssize_t)hit);
                    if (append_new(keep->relations, relation(old, gi - PyTuple_GET_SIZE(old), j)) < 0)
                        return -1;
                }
                break;
            }
            for (h = 0; h < n; h++) {
                int64_t ya = xa, yb = xb, yc = xc, cls = reps->n;
                if (h > 0 && compose_reduce(xa, xb, reps->v[3 * h], reps->v[3 * h + 1], D, r, &ya, &yb, &yc) < 0)
                    return -1;
                L = file_cycle(t, index, ya, yb, yc, r, max_forms - stored, cls);
                if (L <= 0)
                    return (int)L;
                stored += L;
                if (reps_push(reps, ya, yb, yc) < 0)
                    return -1;
                if (lists) {
                    PyObject *old = PyList_GET_ITEM(keep->vectors, (Py_ssize_t)h);
                    if (append_new(keep->vectors, extend_vector(old, gi - PyTuple_GET_SIZE(old), j)) < 0)
                        return -1;
                    if (keep->progress != NULL && keep->progress != Py_None && cls % 1000 == 0) {
                        PyObject *ret = PyObject_CallFunction(keep->progress, "L", (long long)cls);
                        if (ret == NULL)
                            return -1;
                        Py_DECREF(ret);
                    }
                }
            }
            if (compose_reduce(xa, xb, ga, gb, D, r, &xa, &xb, &xc) < 0)
                return -1;
        }
    }
    return 1;
}

static int
class_discriminant(PyObject *arg, int64_t *D, int64_t *r)
{
    if (get_i64(arg, D, "D") < 0)
        return -1;
    if (*D <= 0 || *D > MAX_WORD) {
        PyErr_SetString(PyExc_OverflowError, "the class-number kernels take 0 < D < 2^62");
        return -1;
    }
    *r = (int64_t)isqrt_u64((uint64_t)*D);
    if (*r * *r == *D) {
        PyErr_SetString(PyExc_ValueError, "the discriminant must not be a square");
        return -1;
    }
    return 0;
}

/*
 * (h+, j) of D < 2^62 into *h_plus and *j_principal (j = 1 when (-1, b0, c0)
 * is principal): form_class_numbers of class_kernels.py on a C array of primes.
 * Returns 1 when done, 0 beyond max_forms reduced forms, -1 on error.
 */
int
class_numbers_core(int64_t D, int64_t conductor, const int64_t *primes, Py_ssize_t nprimes, int64_t max_forms,
                   int64_t *h_plus, int *j_principal)
{
    int64_t r = (int64_t)isqrt_u64((uint64_t)D), b0 = ((r - D) % 2 == 0) ? r : r - 1, ncand = 0, *cand = NULL;
    reps_t reps = {NULL, 0, 0};
    table_t *t = NULL;
    int done = -1;
    if (candidates(D, conductor, primes, nprimes, 1, &cand, &ncand) < 0 || table_open(&t) < 0)
        goto out;
    done = class_walk(D, r, cand, ncand, max_forms, t, &reps, NULL);
    if (done > 0)
        *h_plus = reps.n, *j_principal = table_class(t, -1, b0) == 0;
out:
    table_close(t);
    PyMem_Free(reps.v);
    PyMem_Free(cand);
    return done;
}

/* form_class_numbers of class_kernels.py: the table without its Python lists. */
PyObject *
k_form_class_numbers(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t D, conductor, r, max_forms, h_plus = 0, *primes;
    Py_ssize_t nprimes;
    int done, j = 0;
    if (check_nargs(nargs, 4, "form_class_numbers") < 0 || class_kernel_args(args, &D, &conductor) < 0 ||
        class_discriminant(args[0], &D, &r) < 0 || get_limit(args[3], &max_forms) < 0 ||
        prime_array(args[2], &primes, &nprimes) < 0)
        return NULL;
    done = class_numbers_core(D, conductor, primes, nprimes, max_forms, &h_plus, &j);
    PyMem_Free(primes);
    if (done < 0)
        return NULL;
    if (done == 0)
        Py_RETURN_NONE;
    return Py_BuildValue("(Li)", (long long)h_plus, j);
}

/* form_class_relations of class_kernels.py: (h+, j, generators, relations) of the class
   table, without its index and vectors. */
PyObject *
k_form_class_relations(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t D, conductor, r, max_forms, ncand = 0, *cand = NULL, *primes = NULL;
    Py_ssize_t nprimes;
    reps_t reps = {NULL, 0, 0};
    table_t *t = NULL;
    class_lists_t keep = {NULL, NULL, NULL, NULL, NULL};
    PyObject *result = NULL;
    int done;
    if (check_nargs(nargs, 4, "form_class_relations") < 0 || class_kernel_args(args, &D, &conductor) < 0 ||
        class_discriminant(args[0], &D, &r) < 0 || get_limit(args[3], &max_forms) < 0 ||
        prime_array(args[2], &primes, &nprimes) < 0)
        return NULL;
    keep.vectors = PyList_New(0);
    keep.generators = PyList_New(0);
    keep.relations = PyList_New(0);
    if (keep.vectors == NULL || keep.generators == NULL || keep.relations == NULL ||
        candidates(D, conductor, primes, nprimes, 0, &cand, &ncand) < 0 || table_open(&t) < 0)
        goto done;
    done = class_walk(D, r, cand, ncand, max_forms, t, &reps, &keep);
    if (done == 0)
        result = Py_None, Py_INCREF(result);
    else if (done > 0)
        result = Py_BuildValue("(LiOO)", (long long)reps.n, table_class(t, -1, ((r - D) % 2 == 0) ? r : r - 1) == 0,
                               keep.generators, keep.relations);
done:
    table_close(t);
    PyMem_Free(reps.v);
    PyMem_Free(cand);
    PyMem_Free(primes);
    Py_XDECREF(keep.vectors);
    Py_XDECREF(keep.generators);
    Py_XDECREF(keep.relations);
    return result;
}

/* form_class_table of class_kernels.py: the index (in the twin's order), representatives, vectors,
   generators and relations. */
PyObject *
k_form_class_table(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t D, r, max_forms, ncand, i, *cand = NULL;
    reps_t reps = {NULL, 0, 0};
    table_t *t = NULL;
    class_lists_t keep = {NULL, NULL, NULL, NULL, NULL};
    PyObject *seq = NULL, *result = NULL, *representatives = NULL;
    int done;
    if (nargs != 3 && nargs != 4) {
        PyErr_SetString(PyExc_TypeError, "form_class_table() takes 3 or 4 arguments");
        return NULL;
    }
    if (class_discriminant(args[0], &D, &r) < 0 || get_limit(args[2], &max_forms) < 0)
        return NULL;
    keep.progress = nargs == 4 ? args[3] : NULL;
    seq = PySequence_Fast(args[1], "candidates must be a sequence");
    if (seq == NULL)
        return NULL;
    ncand = PySequence_Fast_GET_SIZE(seq);
    cand = (int64_t *)PyMem_Malloc((size_t)(3 * ncand + 3) * sizeof(int64_t));
    if (cand == NULL) {
        PyErr_NoMemory();
        goto done;
    }
    for (i = 0; i < ncand; i++) {
        PyObject *g = PySequence_Fast_GET_ITEM(seq, i);
        if (!PyTuple_Check(g) || PyTuple_GET_SIZE(g) != 3) {
            PyErr_SetString(PyExc_TypeError, "a candidate is not a form (a, b, c)");
            goto done;
        }
        if (get_i64(PyTuple_GET_ITEM(g, 0), &cand[3 * i], "a") < 0 ||
            get_i64(PyTuple_GET_ITEM(g, 1), &cand[3 * i + 1], "b") < 0 ||
            get_i64(PyTuple_GET_ITEM(g, 2), &cand[3 * i + 2], "c") < 0)
            goto done;
    }
    keep.index = PyDict_New();
    keep.vectors = PyList_New(0);
    keep.generators = PyList_New(0);
    keep.relations = PyList_New(0);
    if (keep.index == NULL || keep.vectors == NULL || keep.generators == NULL || keep.relations == NULL)
        goto done;
    if (table_open(&t) < 0)
        goto done;
    done = class_walk(D, r, cand, ncand, max_forms, t, &reps, &keep);
    if (done == 0) {
        result = Py_None, Py_INCREF(result);
        goto done;
    }
    if (done < 0)
        goto done;
    representatives = PyList_New((Py_ssize_t)reps.n);
    if (representatives == NULL)
        goto done;
    for (i = 0; i < reps.n; i++) {
        PyObject *rep = Py_BuildValue("(LLL)", (long long)reps.v[3 * i], (long long)reps.v[3 * i + 1],
                                      (long long)reps.v[3 * i + 2]);
        if (rep == NULL)
            goto done;
        PyList_SET_ITEM(representatives, (Py_ssize_t)i, rep);
    }
    result = PyTuple_Pack(5, keep.index, representatives, keep.vectors, keep.generators, keep.relations);
done:
    table_close(t);
    PyMem_Free(reps.v);
    PyMem_Free(cand);
    Py_XDECREF(seq);
    Py_XDECREF(keep.index);
    Py_XDECREF(representatives);
    Py_XDECREF(keep.vectors);
    Py_XDECREF(keep.generators);
    Py_XDECREF(keep.relations);
    return result;
}
