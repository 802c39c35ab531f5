/*
 * Class-group kernels: prime forms, the candidate generators, and the narrow
 * classes of D as cycles of reduced forms (class numbers and the class table).
 */
#include "kernels.h"

/* ------------------------------------------------------------------ */
/* prime forms and class-group candidates (p < 2^31 here)              */
/* ------------------------------------------------------------------ */

static uint64_t
powmod(uint64_t b, uint64_t e, uint64_t m)
{
    uint64_t r = 1 % m;
    b %= m;
    while (e) {
        if (e & 1)
            r = (uint64_t)((u128)r * b % m);
        b = (uint64_t)((u128)b * b % m);
        e >>= 1;
    }
    return r;
}

/* A square root of n modulo the odd prime p (Tonelli-Shanks), or -1. */
static int64_t
sqrt_mod_odd_prime(uint64_t n, uint64_t p)
{
    uint64_t q = p - 1, z = 2, m, c, t, root, t2, bb;
    int e = 0, i;
    n %= p;
    if (n == 0)
        return 0;
    if (powmod(n, (p - 1) / 2, p) != 1)
        return -1;
    if (p % 4 == 3)
        return (int64_t)powmod(n, (p + 1) / 4, p);
    while (q % 2 == 0)
        q /= 2, e++;
    while (powmod(z, (p - 1) / 2, p) != p - 1)
        z++;
    m = (uint64_t)e, c = powmod(z, q, p), t = powmod(n, q, p), root = powmod(n, (q + 1) / 2, p);
    while (t != 1) {
        for (i = 0, t2 = t; t2 != 1; i++)
            t2 = (uint64_t)((u128)t2 * t2 % p);
        bb = powmod(c, (uint64_t)1 << (m - (uint64_t)i - 1), p);
        m = (uint64_t)i, c = (uint64_t)((u128)bb * bb % p);
        t = (uint64_t)((u128)t * c % p), root = (uint64_t)((u128)root * bb % p);
    }
    return (int64_t)root;
}

/* prime_form_b of _pure.py for a prime 2 <= p < 2^31 and 0 < D < 2^62 (the b is canonical). */
static int64_t
prime_b(int64_t D, int64_t p)
{
    int64_t b, t, c;
    if (p == 2) {
        int64_t residue = D % 8;
        if (residue == 1)
            b = 1;
        else if (residue == 0)
            b = 0;
        else if (residue == 4)
            b = 2;
        else
            return -1;
    } else {
        t = sqrt_mod_odd_prime((uint64_t)D, (uint64_t)p);
        if (t < 0)
            return -1;
        b = ((t - D) % 2 == 0) ? t : p - t;
    }
    c = floordiv64(b * b - D, 4 * p);
    if (b % p == 0 && c % p == 0)
        return -1;
    return b;
}

static int64_t
gcd64(int64_t x, int64_t y)
{
    x = x < 0 ? -x : x, y = y < 0 ? -y : y;
    while (y) {
        int64_t t = x % y;
        x = y, y = t;
    }
    return x;
}

/* form_class_candidates of _pure.py into a growable array of triples; -1 on error. */
static int
candidates(int64_t D, int64_t conductor, PyObject *primes, int64_t **out, int64_t *count)
{
    PyObject *seq = PySequence_Fast(primes, "primes must be a sequence");
    int64_t r = (int64_t)isqrt_u64((uint64_t)D), b0, n = 0, cap = 256, *v, p, b, q;
    Py_ssize_t i, len;
    if (seq == NULL)
        return -1;
    v = (int64_t *)PyMem_Malloc((size_t)(3 * cap) * sizeof(int64_t));
    if (v == NULL) {
        Py_DECREF(seq);
        PyErr_NoMemory();
        return -1;
    }
#define PUSH(x, y, z)                                                                                  \
    do {                                                                                               \
        if (n == cap) {                                                                                \
            int64_t *g_;                                                                               \
            cap *= 2;                                                                                  \
            g_ = (int64_t *)PyMem_Realloc(v, (size_t)(3 * cap) * sizeof(int64_t));                     \
            if (g_ == NULL) {                                                                          \
                PyErr_NoMemory();                                                                      \
                goto fail;                                                                             \
            }                                                                                          \
            v = g_;                                                                                    \
        }                                                                                              \
        v[3 * n] = (x), v[3 * n + 1] = (y), v[3 * n + 2] = (z), n++;                                   \
    } while (0)
    b0 = ((r - D) % 2 == 0) ? r : r - 1;
    PUSH(-1, b0, (D - b0 * b0) / 4);
    len = PySequence_Fast_GET_SIZE(seq);
    for (i = 0; i < len; i++) {
        if (get_i64(PySequence_Fast_GET_ITEM(seq, i), &p, "a prime") < 0)
            goto fail;
        if (p < 2 || p >= ((int64_t)1 << 31) || 4 * (i128)p * p >= D) {
            if (p >= 2 && 4 * (i128)p * p >= D)
                break;
            PyErr_SetString(PyExc_OverflowError, "a prime is outside the class-number kernel's range");
            goto fail;
        }
        if (conductor % p) {
            b = prime_b(D, p);
            if (b >= 0)
                PUSH(p, b, floordiv64(b * b - D, 4 * p));
            continue;
        }
        for (q = p; 4 * (i128)q * q < D; q *= p) {
            for (b = -q + 1; b <= q; b++) {
                if (((b - D) % 2 == 0) && ((i128)b * b - D) % (4 * q) == 0) {
                    int64_t c = floordiv64(b * b - D, 4 * q);
                    if (gcd64(gcd64(q, b), c) == 1)
                        PUSH(q, b, c);
                }
            }
        }
    }
#undef PUSH
    Py_DECREF(seq);
    *out = v, *count = n;
    return 0;
fail:
    Py_DECREF(seq);
    PyMem_Free(v);
    return -1;
}

static PyObject *
triples_to_list(const int64_t *v, int64_t n)
{
    PyObject *list = PyList_New((Py_ssize_t)n);
    int64_t i;
    if (list == NULL)
        return NULL;
    for (i = 0; i < n; i++) {
        PyObject *t = Py_BuildValue("(LLL)", (long long)v[3 * i], (long long)v[3 * i + 1], (long long)v[3 * i + 2]);
        if (t == NULL) {
            Py_DECREF(list);
            return NULL;
        }
        PyList_SET_ITEM(list, (Py_ssize_t)i, t);
    }
    return list;
}

static int
class_kernel_args(PyObject *const *args, int64_t *D, int64_t *conductor)
{
    if (get_i64(args[0], D, "D") < 0 || get_i64(args[1], conductor, "conductor") < 0)
        return -1;
    if (*D <= 0 || *D > MAX_WORD) {
        PyErr_SetString(PyExc_OverflowError, "the class-number kernels take 0 < D < 2^62");
        return -1;
    }
    if (*conductor <= 0) {
        PyErr_SetString(PyExc_ValueError, "the conductor must be positive");
        return -1;
    }
    return 0;
}

PyObject *
k_prime_form_b(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t D, p;
    if (check_nargs(nargs, 2, "prime_form_b") < 0 || get_i64(args[0], &D, "D") < 0 || get_i64(args[1], &p, "p") < 0)
        return NULL;
    if (D <= 0 || D > MAX_WORD || p < 2 || p >= ((int64_t)1 << 31)) {
        PyErr_SetString(PyExc_OverflowError, "prime_form_b takes 0 < D < 2^62 and a prime p < 2^31");
        return NULL;
    }
    return PyLong_FromLongLong((long long)prime_b(D, p));
}

PyObject *
k_form_class_candidates(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t D, conductor, n, *v;
    PyObject *out;
    if (check_nargs(nargs, 3, "form_class_candidates") < 0 || class_kernel_args(args, &D, &conductor) < 0)
        return NULL;
    if (candidates(D, conductor, args[2], &v, &n) < 0)
        return NULL;
    out = triples_to_list(v, n);
    PyMem_Free(v);
    return out;
}

/* ------------------------------------------------------------------ */
/* class numbers: the narrow classes of D as cycles of reduced forms   */
/* ------------------------------------------------------------------ */

/* Open-addressing table (a, b) -> class; b > 0 for every reduced form, so b = 0 marks a free slot. */
typedef struct {
    int64_t a, b;
    int64_t cls;
} slot_t;

typedef struct {
    slot_t *slots;
    size_t mask, used;
} table_t;

static inline size_t
slot_hash(int64_t a, int64_t b)
{
    uint64_t h = (uint64_t)a * 0x9E3779B97F4A7C15ULL ^ ((uint64_t)b + 0x632BE59BD9B4E019ULL) * 0xC2B2AE3D27D4EB4FULL;
    return (size_t)(h ^ (h >> 29));
}

static slot_t *
table_find(table_t *t, int64_t a, int64_t b)
{
    size_t i = slot_hash(a, b) & t->mask;
    while (t->slots[i].b != 0 && (t->slots[i].a != a || t->slots[i].b != b))
        i = (i + 1) & t->mask;
    return &t->slots[i];
}

static int
table_put(table_t *t, int64_t a, int64_t b, int64_t cls)
{
    slot_t *e;
    if (2 * (t->used + 1) > t->mask + 1) {
        size_t n = 2 * (t->mask + 1), i;
        slot_t *old = t->slots, *fresh = (slot_t *)PyMem_Calloc(n, sizeof(slot_t));
        size_t oldn = t->mask + 1;
        if (fresh == NULL) {
            PyErr_NoMemory();
            return -1;
        }
        t->slots = fresh, t->mask = n - 1;
        for (i = 0; i < oldn; i++)
            if (old[i].b != 0)
                *table_find(t, old[i].a, old[i].b) = old[i];
        PyMem_Free(old);
    }
    e = table_find(t, a, b);
    if (e->b == 0)
        t->used++;
    e->a = a, e->b = b, e->cls = cls;
    return 0;
}

/* Walk the rho cycle of the reduced form (a, b, c), filing every form under cls.
   Returns its length, 0 when it is longer than limit, -1 on error. */
static int
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

static int64_t
file_cycle(table_t *t, PyObject *dict, int64_t a, int64_t b, int64_t c, int64_t D, int64_t r, int64_t limit,
           int64_t cls)
{
    int64_t a0 = a, b0 = b, k;
    if (file_form(t, dict, a, b, cls) < 0)
        return -1;
    for (k = 0; k < limit; k++) {
        if (rho_step(&a, &b, &c, D, r) < 0)
            return -1;
        if (a == a0 && b == b0)
            return k + 1;
        if (file_form(t, dict, a, b, cls) < 0)
            return -1;
        if ((k & 0xFFFFF) == 0xFFFFF && PyErr_CheckSignals() < 0)
            return -1;
    }
    return 0;
}

static int
reduce_form(int64_t *a, int64_t *b, int64_t *c, int64_t D, int64_t r)
{
    unsigned long count = 0;
    while (!is_reduced(*a, *b, r)) {
        if (rho_step(a, b, c, D, r) < 0)
            return -1;
        if ((++count & 0xFFFFF) == 0 && PyErr_CheckSignals() < 0)
            return -1;
    }
    return 0;
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
 * form_class_table of _pure.py, step for step: from the principal cycle, each
 * candidate not yet in the table becomes a generator whose powers times the
 * classes known before it fill new cycles, until a power falls into a known
 * class. Returns 1 when done, 0 when more than max_forms forms would be
 * stored (the twin's None), -1 on error. With keep->index set, the Python
 * index, vectors, generators and relations are built in the twin's order,
 * and progress is called as the twin calls it.
 */
static int
class_walk(int64_t D, int64_t r, const int64_t *cand, int64_t ncand, int64_t max_forms, table_t *t, reps_t *reps,
           class_lists_t *keep)
{
    int64_t b0 = ((r - D) % 2 == 0) ? r : r - 1, stored, L, i, h, j;
    int lists = keep != NULL && keep->index != NULL;
    t->slots = (slot_t *)PyMem_Calloc(1024, sizeof(slot_t));
    if (t->slots == NULL) {
        PyErr_NoMemory();
        return -1;
    }
    t->mask = 1023, t->used = 0;
    L = file_cycle(t, lists ? keep->index : NULL, 1, b0, (b0 * b0 - D) / 4, D, r, max_forms, 0);
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
        slot_t *hit;
        if (reduce_form(&ga, &gb, &gc, D, r) < 0)
            return -1;
        if (table_find(t, ga, gb)->b != 0)
            continue;
        if (lists) {
            gi = PyList_GET_SIZE(keep->generators);
            if (append_new(keep->generators, Py_BuildValue("(LLL)", (long long)ga, (long long)gb, (long long)gc)) < 0)
                return -1;
        }
        n = reps->n;
        xa = ga, xb = gb, xc = gc;
        for (j = 1;; j++) {
            hit = table_find(t, xa, xb);
            if (hit->b != 0) {
                if (lists) {
                    PyObject *old = PyList_GET_ITEM(keep->vectors, (Py_ssize_t)hit->cls);
                    if (append_new(keep->relations, relation(old, gi - PyTuple_GET_SIZE(old), j)) < 0)
                        return -1;
                }
                break;
            }
            for (h = 0; h < n; h++) {
                int64_t ya = xa, yb = xb, yc = xc, cls = reps->n;
                if (h > 0 && compose_reduce(xa, xb, reps->v[3 * h], reps->v[3 * h + 1], D, r, &ya, &yb, &yc) < 0)
                    return -1;
                L = file_cycle(t, lists ? keep->index : NULL, ya, yb, yc, D, r, max_forms - stored, cls);
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

/* form_class_numbers of _pure.py: the table without its Python lists. */
PyObject *
k_form_class_numbers(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t D, conductor, r, b0, max_forms, ncand = 0, *cand = NULL;
    reps_t reps = {NULL, 0, 0};
    table_t t = {NULL, 0, 0};
    PyObject *result = NULL;
    slot_t *e;
    int done;
    if (check_nargs(nargs, 4, "form_class_numbers") < 0 || class_kernel_args(args, &D, &conductor) < 0 ||
        class_discriminant(args[0], &D, &r) < 0 || get_limit(args[3], &max_forms) < 0)
        return NULL;
    if (candidates(D, conductor, args[2], &cand, &ncand) < 0)
        return NULL;
    done = class_walk(D, r, cand, ncand, max_forms, &t, &reps, NULL);
    if (done == 0) {
        result = Py_None, Py_INCREF(result);
    } else if (done > 0) {
        b0 = ((r - D) % 2 == 0) ? r : r - 1;
        e = table_find(&t, -1, b0);
        result = Py_BuildValue("(Li)", (long long)reps.n, e->b != 0 && e->cls == 0);
    }
    PyMem_Free(t.slots);
    PyMem_Free(reps.v);
    PyMem_Free(cand);
    return result;
}

/* form_class_table of _pure.py: the index (in the twin's order), representatives, vectors,
   generators and relations. */
PyObject *
k_form_class_table(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t D, r, max_forms, ncand, i, *cand = NULL;
    reps_t reps = {NULL, 0, 0};
    table_t t = {NULL, 0, 0};
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
    done = class_walk(D, r, cand, ncand, max_forms, &t, &reps, &keep);
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
    PyMem_Free(t.slots);
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
