/*
 * Positive definite forms (D < 0): reduction, composition followed by
 * reduction, the candidate generators of the class group and the walk that
 * lists every class by its one reduced form (Cohen, Alg. 5.4.2 and
 * Def. 5.4.6; Buchmann and Vollmer, ch. 5). Twin: definite_kernels.py.
 *
 * Ranges: definite_reduce takes int64 coefficients with b^2 - 4ac computed
 * without overflow in __int128; the class kernels take -2^62 < D < 0, where
 * every reduced form has a <= sqrt(|D|/3) < 2^31, so a form is one word of
 * hash key and every composite of two reduced forms fits in int64.
 */
#include "definite.h"

/* Reduce the positive definite (a, b, c) of discriminant D in place; -1 (OverflowError) when a
   value leaves int64 or the form is not positive definite. */
static int
definite_reduce_form(int64_t *pa, int64_t *pb, int64_t *pc, i128 D)
{
    i128 a = *pa, b = *pb, c = *pc, r, t;
    unsigned long count = 0;
    if (a <= 0 || D >= 0) {
        PyErr_SetString(PyExc_OverflowError, "definite_reduce takes positive definite forms");
        return -1;
    }
    for (;;) {
        if (b <= -a || b > a) {
            r = floormod(b, 2 * a);
            if (r > a)
                r -= 2 * a;
            b = r;
            t = b * b - D; /* |b| <= a < 2^63: below 2^127 */
            c = floordiv(t, 4 * a);
        }
        if (a > c) {
            t = a, a = c, c = t, b = -b;
            if ((++count & 0xFFFFF) == 0 && PyErr_CheckSignals() < 0)
                return -1;
            continue;
        }
        if (b < 0 && a == c)
            b = -b;
        break;
    }
    if (!fits_i64(a) || !fits_i64(b) || !fits_i64(c)) {
        overflow();
        return -1;
    }
    *pa = (int64_t)a, *pb = (int64_t)b, *pc = (int64_t)c;
    return 0;
}

PyObject *
k_definite_reduce(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t a, b, c;
    i128 D;
    int bad = 0;
    if (check_nargs(nargs, 3, "definite_reduce") < 0 || get_i64(args[0], &a, "a") < 0 ||
        get_i64(args[1], &b, "b") < 0 || get_i64(args[2], &c, "c") < 0)
        return NULL;
    D = add_c((i128)b * b, -mul_c(4 * (i128)a, c, &bad), &bad);
    if (bad)
        return overflow();
    if (definite_reduce_form(&a, &b, &c, D) < 0)
        return NULL;
    return Py_BuildValue("(LLL)", (long long)a, (long long)b, (long long)c);
}

/* compose of form_kernels.c, then definite reduction; -1 on error. */
static int
compose_reduce(int64_t a1, int64_t b1, int64_t a2, int64_t b2, int64_t D, int64_t *A, int64_t *B, int64_t *C)
{
    if (compose(a1, b1, a2, b2, D, A, B, C) < 0)
        return -1;
    return definite_reduce_form(A, B, C, D);
}

PyObject *
k_definite_compose_reduce(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t a1, b1, a2, b2, D, A, B, C;
    if (check_nargs(nargs, 5, "definite_compose_reduce") < 0 || get_i64(args[0], &a1, "a1") < 0 ||
        get_i64(args[1], &b1, "b1") < 0 || get_i64(args[2], &a2, "a2") < 0 || get_i64(args[3], &b2, "b2") < 0 ||
        get_i64(args[4], &D, "D") < 0)
        return NULL;
    if (a1 <= 0 || a2 <= 0 || D >= 0) {
        PyErr_SetString(PyExc_OverflowError, "definite_compose_reduce takes positive definite forms");
        return NULL;
    }
    if (compose_reduce(a1, b1, a2, b2, D, &A, &B, &C) < 0)
        return NULL;
    return Py_BuildValue("(LLL)", (long long)A, (long long)B, (long long)C);
}

/* ------------------------------------------------------------------ */
/* the class group of D < 0: one reduced form per class                */
/* ------------------------------------------------------------------ */

static int
definite_args(PyObject *D_obj, int64_t *D)
{
    if (get_i64(D_obj, D, "D") < 0)
        return -1;
    if (*D >= 0 || *D < -MAX_WORD) {
        PyErr_SetString(PyExc_OverflowError, "the definite class kernels take -2^62 < D < 0");
        return -1;
    }
    return 0;
}

/* definite_class_candidates of the twin into a vec_t of triples; -1 on error. */
int
definite_candidates(int64_t D, int64_t conductor, const int64_t *primes, Py_ssize_t len, vec_t *out)
{
    Py_ssize_t i;
    int64_t p, q, b, a, c, bb;
    i128 N = -(i128)D;
    for (i = 0; i < len; i++) {
        p = primes[i];
        if (p < 2 || p >= ((int64_t)1 << 31)) {
            PyErr_SetString(PyExc_OverflowError, "a prime is outside the class-number kernel's range");
            return -1;
        }
        if (3 * (i128)p * p > N)
            break;
        if (conductor % p) {
            b = prime_b(D, p);
            if (b < -1)
                return -1;
            if (b >= 0) {
                a = p, bb = b, c = floordiv64(b * b - D, 4 * p);
                if (definite_reduce_form(&a, &bb, &c, D) < 0 || vec_push(out, a) < 0 || vec_push(out, bb) < 0 ||
                    vec_push(out, c) < 0)
                    return -1;
            }
            continue;
        }
        for (q = p; 3 * (i128)q * q <= N; q *= p) {
            for (b = -q + 1; b <= q; b++) {
                if (floormod64(b - D, 2) == 0 && ((i128)b * b - D) % (4 * q) == 0) {
                    c = floordiv64(b * b - D, 4 * q);
                    if (gcd64(gcd64(q, b), c) == 1) {
                        a = q, bb = b;
                        if (definite_reduce_form(&a, &bb, &c, D) < 0 || vec_push(out, a) < 0 ||
                            vec_push(out, bb) < 0 || vec_push(out, c) < 0)
                            return -1;
                    }
                }
            }
        }
    }
    return 0;
}

/*
 * The walk of definite_class_table: reps holds (a, b, c) per class; class i's vector has
 * vlen[i] entries starting at voff[i] in vdata. Returns 1 when done, 0 beyond max_forms,
 * -1 on error; relations are appended to the Python list rels.
 */
static int
add_class(walk_t *w, dtable_t *t, int64_t a, int64_t b, int64_t c, int64_t from, int64_t gi, int64_t j)
{
    int64_t cls = w->reps.n / 3, k, off = from >= 0 ? w->voff.v[from] : 0, len = from >= 0 ? w->vlen.v[from] : 0;
    if (dtable_put(t, a, b, cls) < 0 || vec_push(&w->reps, a) < 0 || vec_push(&w->reps, b) < 0 ||
        vec_push(&w->reps, c) < 0 || vec_push(&w->voff, w->vdata.n) < 0 || vec_push(&w->vlen, gi + 1) < 0)
        return -1;
    for (k = 0; k < gi + 1; k++) {
        int64_t x = k < len ? w->vdata.v[off + k] : (k == gi ? j : 0);
        if (vec_push(&w->vdata, x) < 0)
            return -1;
    }
    return 0;
}

static int
definite_walk(int64_t D, const int64_t *cand, int64_t ncand, int64_t max_forms, PyObject *progress, walk_t *w,
              dtable_t *t, PyObject *rels, vec_t *crels, int64_t target)
{
    int64_t i, gi, n, j, h, hit, a, b, c, xa, xb, xc, b0 = floormod64(D, 2);
    if (w->reps.n == 0 && (dtable_init(t, 1 << 12) < 0 || add_class(w, t, 1, b0, (b0 - D) / 4, -1, -1, 0) < 0))
        return -1;
    for (i = 0; i < ncand; i++) {
        int64_t ga = cand[3 * i], gb = cand[3 * i + 1], gc = cand[3 * i + 2];
        if (target > 0 && w->reps.n / 3 >= target)
            break;
        if (dtable_get(t, ga, gb) >= 0)
            continue;
        gi = w->gens.n / 3;
        if (vec_push(&w->gens, ga) < 0 || vec_push(&w->gens, gb) < 0 || vec_push(&w->gens, gc) < 0)
            return -1;
        n = w->reps.n / 3;
        xa = ga, xb = gb, xc = gc, j = 1;
        for (;;) {
            hit = dtable_get(t, xa, xb);
            if (hit >= 0 && rels == NULL) { /* the relation row, flattened into crels */
                int64_t off = w->voff.v[hit], len = w->vlen.v[hit], k;
                for (k = 0; k <= gi; k++)
                    if (vec_push(crels, k < len ? -w->vdata.v[off + k] : (k == gi ? j : 0)) < 0)
                        return -1;
                break;
            }
            if (hit >= 0) {
                int64_t off = w->voff.v[hit], len = w->vlen.v[hit], k;
                PyObject *rel = PyList_New((Py_ssize_t)(gi + 1));
                if (rel == NULL)
                    return -1;
                for (k = 0; k <= gi; k++) {
                    int64_t x = k < len ? -w->vdata.v[off + k] : (k == gi ? j : 0);
                    PyObject *o = PyLong_FromLongLong((long long)x);
                    if (o == NULL) {
                        Py_DECREF(rel);
                        return -1;
                    }
                    PyList_SET_ITEM(rel, (Py_ssize_t)k, o);
                }
                if (PyList_Append(rels, rel) < 0) {
                    Py_DECREF(rel);
                    return -1;
                }
                Py_DECREF(rel);
                break;
            }
            if (w->reps.n / 3 + n > max_forms)
                return 0;
            for (h = 0; h < n; h++) {
                int64_t cls = w->reps.n / 3;
                if (h == 0) {
                    a = xa, b = xb, c = xc;
                } else if (compose_reduce(xa, xb, w->reps.v[3 * h], w->reps.v[3 * h + 1], D, &a, &b, &c) < 0) {
                    return -1;
                }
                if (add_class(w, t, a, b, c, h, gi, j) < 0)
                    return -1;
                if (cls % 1000 == 0) {
                    if (progress != Py_None) {
                        PyObject *r = PyObject_CallFunction(progress, "L", (long long)cls);
                        if (r == NULL)
                            return -1;
                        Py_DECREF(r);
                    }
                    if (PyErr_CheckSignals() < 0)
                        return -1;
                }
            }
            if (compose_reduce(xa, xb, ga, gb, D, &xa, &xb, &xc) < 0)
                return -1;
            j++;
        }
    }
    return 1;
}

static PyObject *
triple_list(const vec_t *s)
{
    int64_t i, n = s->n / 3;
    PyObject *list = PyList_New((Py_ssize_t)n);
    if (list == NULL)
        return NULL;
    for (i = 0; i < n; i++) {
        PyObject *x = Py_BuildValue("(LLL)", (long long)s->v[3 * i], (long long)s->v[3 * i + 1],
                                    (long long)s->v[3 * i + 2]);
        if (x == NULL) {
            Py_DECREF(list);
            return NULL;
        }
        PyList_SET_ITEM(list, (Py_ssize_t)i, x);
    }
    return list;
}

/* The candidates given as a Python list of triples, into a vec_t. */
static int
candidate_array(PyObject *cands, vec_t *out)
{
    PyObject *seq = PySequence_Fast(cands, "candidates must be a sequence");
    Py_ssize_t i, n;
    if (seq == NULL)
        return -1;
    n = PySequence_Fast_GET_SIZE(seq);
    for (i = 0; i < n; i++) {
        PyObject *tri = PySequence_Fast(PySequence_Fast_GET_ITEM(seq, i), "a candidate must be a triple");
        int64_t x;
        Py_ssize_t k;
        if (tri == NULL || PySequence_Fast_GET_SIZE(tri) != 3) {
            if (tri != NULL)
                PyErr_SetString(PyExc_TypeError, "a candidate must be a triple");
            Py_XDECREF(tri);
            Py_DECREF(seq);
            return -1;
        }
        for (k = 0; k < 3; k++)
            if (get_i64(PySequence_Fast_GET_ITEM(tri, k), &x, "a coefficient") < 0 || vec_push(out, x) < 0) {
                Py_DECREF(tri);
                Py_DECREF(seq);
                return -1;
            }
        Py_DECREF(tri);
        if (out->v[out->n - 3] <= 0 || out->v[out->n - 3] >= ((int64_t)1 << 31)) {
            Py_DECREF(seq);
            PyErr_SetString(PyExc_OverflowError, "a candidate is outside the class kernel's range");
            return -1;
        }
    }
    Py_DECREF(seq);
    return 0;
}

PyObject *
k_definite_class_candidates(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t D, conductor, *primes;
    Py_ssize_t len;
    vec_t out = {0};
    PyObject *result;
    int rc;
    if (check_nargs(nargs, 3, "definite_class_candidates") < 0 || definite_args(args[0], &D) < 0 ||
        get_i64(args[1], &conductor, "conductor") < 0)
        return NULL;
    if (conductor <= 0) {
        PyErr_SetString(PyExc_ValueError, "the conductor must be positive");
        return NULL;
    }
    if (prime_array(args[2], &primes, &len) < 0)
        return NULL;
    rc = definite_candidates(D, conductor, primes, len, &out);
    PyMem_Free(primes);
    result = rc < 0 ? NULL : triple_list(&out);
    PyMem_Free(out.v);
    return result;
}

PyObject *
k_definite_class_table(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t D, max_forms, i, k, n;
    vec_t cand = {0};
    walk_t w = {{0}};
    dtable_t t = {0};
    PyObject *rels = NULL, *index = NULL, *reps = NULL, *vectors = NULL, *gens = NULL, *progress;
    int rc;
    if (nargs != 3 && check_nargs(nargs, 4, "definite_class_table") < 0)
        return NULL;
    if (definite_args(args[0], &D) < 0 || get_limit(args[2], &max_forms) < 0)
        return NULL;
    progress = nargs == 4 ? args[3] : Py_None;
    if (candidate_array(args[1], &cand) < 0)
        goto fail;
    rels = PyList_New(0);
    if (rels == NULL)
        goto fail;
    rc = definite_walk(D, cand.v, cand.n / 3, max_forms, progress, &w, &t, rels, NULL, 0);
    if (rc < 0)
        goto fail;
    if (rc == 0) {
        Py_DECREF(rels);
        PyMem_Free(cand.v), walk_free(&w), dtable_free(&t);
        Py_RETURN_NONE;
    }
    n = w.reps.n / 3;
    index = PyDict_New();
    vectors = PyList_New((Py_ssize_t)n);
    reps = triple_list(&w.reps);
    gens = triple_list(&w.gens);
    if (index == NULL || vectors == NULL || reps == NULL || gens == NULL)
        goto fail;
    for (i = 0; i < n; i++) {
        PyObject *key = Py_BuildValue("(LL)", (long long)w.reps.v[3 * i], (long long)w.reps.v[3 * i + 1]);
        PyObject *value = PyLong_FromLongLong((long long)i);
        int bad = key == NULL || value == NULL || PyDict_SetItem(index, key, value) < 0;
        PyObject *vec;
        Py_XDECREF(key);
        Py_XDECREF(value);
        if (bad)
            goto fail;
        vec = PyTuple_New((Py_ssize_t)w.vlen.v[i]);
        if (vec == NULL)
            goto fail;
        for (k = 0; k < w.vlen.v[i]; k++) {
            PyObject *o = PyLong_FromLongLong((long long)w.vdata.v[w.voff.v[i] + k]);
            if (o == NULL) {
                Py_DECREF(vec);
                goto fail;
            }
            PyTuple_SET_ITEM(vec, (Py_ssize_t)k, o);
        }
        PyList_SET_ITEM(vectors, (Py_ssize_t)i, vec);
    }
    PyMem_Free(cand.v), walk_free(&w), dtable_free(&t);
    return Py_BuildValue("(NNNNN)", index, reps, vectors, gens, rels);
fail:
    Py_XDECREF(rels), Py_XDECREF(index), Py_XDECREF(reps), Py_XDECREF(vectors), Py_XDECREF(gens);
    PyMem_Free(cand.v), walk_free(&w), dtable_free(&t);
    return NULL;
}

/* (a, b, c)^n reduced, n >= 1, by squaring and multiplying; -1 on error. */
static int
definite_power(int64_t *a, int64_t *b, int64_t *c, int64_t n, int64_t D)
{
    int64_t b0 = floormod64(D, 2), ra = 1, rb = b0, rc = (b0 - D) / 4, xa = *a, xb = *b, xc = *c;
    while (n > 0) {
        if ((n & 1) && compose_reduce(ra, rb, xa, xb, D, &ra, &rb, &rc) < 0)
            return -1;
        n >>= 1;
        if (n > 0 && compose_reduce(xa, xb, xa, xb, D, &xa, &xb, &xc) < 0)
            return -1;
    }
    *a = ra, *b = rb, *c = rc;
    return 0;
}

int
definite_relation_walk(int64_t D, int64_t conductor, const int64_t *primes, Py_ssize_t len, int64_t max_forms,
                       int64_t target, int64_t power, walk_t *w, dtable_t *t, PyObject *rels, vec_t *crels)
{
    /* With target > 0 the candidates are made a block of primes at a time and the walk stops
     * once it has target classes; the output is the same as the full walk cut at that point. */
    Py_ssize_t start = 0, block = target > 0 ? 2 : len;
    vec_t cand = {0};
    int rc = 1;
    while (start < len || (start == 0 && len == 0)) {
        Py_ssize_t stop = start + block < len ? start + block : len;
        cand.n = 0;
        if (definite_candidates(D, conductor, primes + start, stop - start, &cand) < 0) {
            rc = -1;
            break;
        }
        if (power > 1) {
            int64_t k;
            for (k = 0; k < cand.n && rc > 0; k += 3)
                if (definite_power(&cand.v[k], &cand.v[k + 1], &cand.v[k + 2], power, D) < 0)
                    rc = -1;
            if (rc < 0)
                break;
        }
        rc = definite_walk(D, cand.v, cand.n / 3, max_forms, Py_None, w, t, rels, crels, target);
        if (rc <= 0 || (target > 0 && w->reps.n / 3 >= target) || stop >= len)
            break;
        start = stop, block *= 2;
    }
    PyMem_Free(cand.v);
    return rc;
}

PyObject *
k_definite_class_relations(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    /* With a fifth argument target > 0 (the class number, known by other means), the walk
     * stops once it has target classes (definite_relation_walk). With a sixth argument
     * power > 1 every candidate is first raised to that power: the walk then runs in the
     * subgroup of power-th powers (with power = h/p^e and target = p^e, the p-Sylow subgroup). */
    int64_t D, conductor, max_forms, target = 0, power = 1, *primes;
    Py_ssize_t len;
    walk_t w = {{0}};
    dtable_t t = {0};
    PyObject *rels = NULL, *gens;
    int rc;
    if (nargs != 4 && nargs != 5 && check_nargs(nargs, 6, "definite_class_relations") < 0)
        return NULL;
    if (definite_args(args[0], &D) < 0 || get_i64(args[1], &conductor, "conductor") < 0 ||
        get_limit(args[3], &max_forms) < 0 || (nargs >= 5 && get_i64(args[4], &target, "target") < 0) ||
        (nargs == 6 && get_i64(args[5], &power, "power") < 0))
        return NULL;
    if (conductor <= 0 || power <= 0) {
        PyErr_SetString(PyExc_ValueError, "the conductor and the power must be positive");
        return NULL;
    }
    if (prime_array(args[2], &primes, &len) < 0)
        return NULL;
    rels = PyList_New(0);
    if (rels == NULL) {
        PyMem_Free(primes);
        return NULL;
    }
    rc = definite_relation_walk(D, conductor, primes, len, max_forms, target, power, &w, &t, rels, NULL);
    PyMem_Free(primes);
    if (rc < 0)
        goto fail;
    if (rc == 0) {
        Py_DECREF(rels);
        walk_free(&w), dtable_free(&t);
        Py_RETURN_NONE;
    }
    gens = triple_list(&w.gens);
    if (gens == NULL)
        goto fail;
    {
        long long h = (long long)(w.reps.n / 3);
        walk_free(&w), dtable_free(&t);
        return Py_BuildValue("(LNN)", h, gens, rels);
    }
fail:
    Py_XDECREF(rels);
    walk_free(&w), dtable_free(&t);
    return NULL;
}

/* ------------------------------------------------------------------ */
/* The class number of a fundamental D < 0 by counting reduced forms   */
/* ------------------------------------------------------------------ */

/* COUNT_LIMIT (definite.h): the largest |D| the count takes; its table has sqrt(|D|/3)
   entries (23 MB at the limit). */

/* x^-1 mod p for gcd(x, p) = 1, 0 < x < p (extended Euclid). */
int64_t
inverse_mod(int64_t x, int64_t p)
{
    int64_t r0 = p, r1 = x, s0 = 0, s1 = 1;
    while (r1 != 0) {
        int64_t q = r0 / r1, t = r0 - q * r1;
        r0 = r1, r1 = t;
        t = s0 - q * s1, s0 = s1, s1 = t;
    }
    return floormod64(s0, p);
}

/* The reduced forms (a, b, c) with 4a^2 >= |D| (Im tau <= 1). With a = 2^k * m, m odd, the
 * candidates b (mod 2^(k+1) * M, M the product of the odd primes of a) are combined by the
 * Chinese remainder theorem from the square roots of D modulo each odd prime and the
 * residues mod T = 2^(k+1) with b^2 = D (mod 2^(k+2)); each is then checked exactly. At
 * most 2^7 odd roots: the odd primes of a <= 5.8 * 10^6 number at most 7. largest[n] is the
 * largest prime factor of n (from the sieve). */
static int64_t
count_band(int64_t D, int64_t a, const uint32_t *largest)
{
    int64_t rest = a, M = 1, T = 2, roots[256], twos[2], ntwos, nroots = 1, count = 0, k, j;
    roots[0] = 0;
    while (rest % 2 == 0)
        rest /= 2, T *= 2;
    if (T == 2) { /* a odd: b = D (mod 2) */
        twos[0] = floormod64(D, 2), ntwos = 1;
    } else if (D & 1) { /* D = 1 (mod 8): b = +-x, x^2 = D (mod 2T) */
        int64_t x = 1, e;
        for (e = 8; e < 2 * T; e *= 2)
            if (((uint64_t)(x * x - D)) & (uint64_t)(2 * e - 1))
                x += e / 2;
        twos[0] = x % T, twos[1] = T - x % T, ntwos = 2;
    } else { /* D = 0 (mod 4), T = 4: b = D/2 (mod 4) */
        twos[0] = floormod64(D / 2, 4), ntwos = 1;
    }
    while (rest > 1) {
        int64_t p = largest[rest], r, inv, n0 = nroots;
        if (p == 0) {
            PyErr_SetString(PyExc_ValueError, "the primes must be every prime up to sqrt(|D|/3)");
            return -1;
        }
        while (rest % p == 0)
            rest /= p;
        r = prime_b(D, p);
        if (r < 0)
            return r < -1 ? -1 : 0;
        r %= p;
        inv = inverse_mod(M % p, p);
        for (k = 0; k < n0; k++) {
            int64_t x = roots[k], t = floormod64((r - x) % p * inv, p);
            roots[k] = x + M * t;
            if (r != 0) {
                t = floormod64((p - r - x) % p * inv, p);
                roots[nroots++] = x + M * t;
            }
        }
        M *= p;
    }
    {
        int64_t inv = T > 1 ? inverse_mod(M % T, T) : 0, step = M * T;
        for (k = 0; k < nroots; k++)
            for (j = 0; j < ntwos; j++) {
                int64_t x = roots[k] + M * floormod64((twos[j] - roots[k]) % T * inv, T), b;
                for (b = -a + floormod64(x + a, step); b <= a; b += step) {
                    int64_t m, c;
                    if (b == -a)
                        continue;
                    m = b * b - D;
                    if (m % (4 * a))
                        continue;
                    c = m / (4 * a);
                    if (c > a || (c == a && b >= 0))
                        count++;
                }
            }
    }
    return count;
}

int64_t
definite_amax(int64_t D)
{
    int64_t n = -D, amax = (int64_t)isqrt_u64((uint64_t)(n / 3));
    while (3 * (amax + 1) * (amax + 1) <= n)
        amax++;
    while (amax > 0 && 3 * amax * amax > n)
        amax--;
    return amax;
}

int64_t
definite_count(int64_t D, const int64_t *primes, Py_ssize_t len, uint32_t *N, uint32_t *largest)
{
    /* h(D) for a fundamental D < 0: the number of reduced forms. For a < sqrt(|D|)/2 every
     * b in (-a, a] with b^2 = D (mod 4a) gives one (c > a), and their number N(a) is
     * multiplicative: prod over p^k || a of 1 + (D/p) if p does not divide D, [k = 1] if
     * it does (D fundamental). The rest, a up to sqrt(|D|/3), by count_band. The primes
     * must be every prime up to sqrt(|D|/3) (only their squares' reach is checked). */
    int64_t n = -D, amax = definite_amax(D), total = 0, a;
    Py_ssize_t i;
    if (amax >= 2 && (len == 0 || primes[len - 1] * primes[len - 1] < amax)) {
        PyErr_SetString(PyExc_ValueError, "the primes must be every prime up to sqrt(|D|/3)");
        return -1;
    }
    for (a = 0; a <= amax; a++)
        N[a] = 1, largest[a] = 0;
    for (i = 0; i < len && primes[i] <= amax; i++) {
        int64_t p = primes[i], j;
        int symbol = D % p == 0 ? 0 : kronecker_i64(D, p);
        for (a = p, j = 1; a <= amax; a += p, j++) {
            largest[a] = (uint32_t)p;
            if (symbol < 0 || (symbol == 0 && j % p == 0))
                N[a] = 0; /* (D/p) = -1, or p^2 | a with p | D */
            else if (symbol > 0)
                N[a] <<= 1;
        }
    }
    for (a = 1; a <= amax; a++) {
        if (N[a] == 0)
            continue;
        if (4 * a * a < n) {
            total += N[a];
        } else {
            int64_t band = count_band(D, a, largest);
            if (band < 0)
                return -1;
            total += band;
        }
    }
    return total;
}

PyObject *
k_definite_class_number(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t D, amax, total, *primes;
    Py_ssize_t len;
    uint32_t *N, *largest;
    if (check_nargs(nargs, 2, "definite_class_number") < 0 || definite_args(args[0], &D) < 0)
        return NULL;
    if (-D > COUNT_LIMIT) {
        PyErr_SetString(PyExc_OverflowError, "the count of reduced forms takes |D| <= 10^14");
        return NULL;
    }
    if (prime_array(args[1], &primes, &len) < 0)
        return NULL;
    amax = definite_amax(D);
    N = PyMem_Malloc((size_t)(amax + 1) * sizeof(uint32_t));
    largest = PyMem_Malloc((size_t)(amax + 1) * sizeof(uint32_t));
    if (N == NULL || largest == NULL) {
        PyMem_Free(N), PyMem_Free(largest), PyMem_Free(primes);
        return PyErr_NoMemory();
    }
    total = definite_count(D, primes, len, N, largest);
    PyMem_Free(N), PyMem_Free(largest), PyMem_Free(primes);
    return total < 0 ? NULL : PyLong_FromLongLong((long long)total);
}
