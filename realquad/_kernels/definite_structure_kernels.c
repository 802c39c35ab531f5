/*
 * The structure of Cl(D) for many D < 0 in one call, the class numbers known (or counted
 * here): what a survey of imaginary fields asks for millions of fields. Twin:
 * definite_structure_kernels.py.
 *
 * For each p^e || h: e = 1 gives Z/p; the 2-Sylow subgroup is fixed by its order and the
 * 2-rank r unless 2 <= r <= e - 2; otherwise the p-Sylow subgroup is walked alone (the
 * (h/p^e)-th powers of the prime forms, stopping at p^e classes; definite_relation_walk), its
 * cyclic factors from the Smith form of its relations over Z/p^e (the relations contain
 * p^e Z^g, the quotient having exponent dividing p^e, so the elimination may work modulo p^e
 * with a pivot of least p-adic valuation). The primary parts give the invariant factors.
 * Reference: H. Cohen, A Course in Computational Algebraic Number Theory, Springer 1993,
 * sec. 2.4.3 (Smith normal form) and 5.4.
 */
#include "definite.h"

#define MAX_PARTS 64

/* The p-adic valuation of 0 < x < q = p^e (e when x = 0). */
static int
valuation(int64_t x, int64_t p, int e)
{
    int v = 0;
    if (x == 0)
        return e;
    while (x % p == 0)
        x /= p, v++;
    return v;
}

/* The orders p^k > 1 of the cyclic factors of Z^g modulo the g relation rows of m (g x g,
 * entries modulo q = p^e), by elimination with a pivot of least valuation; their number, or
 * -1 when their product is not q (ArithmeticError). */
static int
sylow_factors(int64_t *m, int64_t g, int64_t p, int e, int64_t q, int64_t *out)
{
    int64_t i, j, k, product = 1;
    int n = 0;
    for (k = 0; k < g; k++) {
        int64_t pr = -1, pc = -1, pivot, inverse, pk = 1;
        int best = e + 1;
        for (i = k; i < g; i++)
            for (j = k; j < g; j++) {
                int v = valuation(m[i * g + j], p, e);
                if (v < best)
                    best = v, pr = i, pc = j;
            }
        if (best >= e) { /* the rest is zero modulo q: a factor Z/q each */
            for (; k < g; k++)
                out[n++] = q, product *= q;
            break;
        }
        for (j = 0; j < g; j++) { /* rows pr <-> k, columns pc <-> k */
            int64_t t = m[pr * g + j];
            m[pr * g + j] = m[k * g + j], m[k * g + j] = t;
        }
        for (i = 0; i < g; i++) {
            int64_t t = m[i * g + pc];
            m[i * g + pc] = m[i * g + k], m[i * g + k] = t;
        }
        for (i = 0; i < best; i++)
            pk *= p;
        pivot = m[k * g + k];
        inverse = inverse_mod(floormod64(pivot / pk, q), q);
        for (j = k; j < g; j++) /* the pivot row times a unit: the pivot is p^best */
            m[k * g + j] = (int64_t)((i128)m[k * g + j] * inverse % q);
        for (i = k + 1; i < g; i++) { /* clear the pivot column below it */
            int64_t f = m[i * g + k] / pk;
            if (f == 0)
                continue;
            for (j = k; j < g; j++)
                m[i * g + j] = floormod64(m[i * g + j] - (int64_t)((i128)f * m[k * g + j] % q), q);
        }
        /* the pivot row's other entries are multiples of p^best: column operations clear them
           without touching the rows below (their column k is now zero) */
        if (pk > 1)
            out[n++] = pk, product *= pk;
    }
    return product == q ? n : -1;
}

/* The invariants of the p-Sylow subgroup of order q = p^e of Cl(D) by its walk into out;
 * their number, -1 on error. */
static int
walked_sylow(int64_t D, int64_t conductor, const int64_t *primes, Py_ssize_t len, Py_ssize_t first, int64_t h,
             int64_t p, int e, int64_t q, vec_t *rels, int64_t *out)
{
    Py_ssize_t some = first < len ? first : len;
    int64_t found = 0, g = 0, i, j, *m;
    int n;
    for (;;) {
        walk_t w = {{0}};
        dtable_t t = {0};
        int rc;
        rels->n = 0;
        rc = definite_relation_walk(D, conductor, primes, some, q, q, h / q, &w, &t, NULL, rels);
        found = rc > 0 ? w.reps.n / 3 : 0, g = w.gens.n / 3;
        walk_free(&w), dtable_free(&t);
        if (rc < 0)
            return -1;
        if (found == q || some == len)
            break;
        some = len; /* the first few primes nearly always do */
    }
    if (found != q) {
        PyErr_Format(PyExc_ArithmeticError,
                     "internal check failed: the %lld-Sylow subgroup of Cl(%lld) does not have %lld classes",
                     (long long)p, (long long)D, (long long)q);
        return -1;
    }
    m = PyMem_Calloc((size_t)(g * g > 0 ? g * g : 1), sizeof(int64_t));
    if (m == NULL) {
        PyErr_NoMemory();
        return -1;
    }
    for (i = 0; i < g; i++) /* row i: i + 1 entries, from offset i(i+1)/2 */
        for (j = 0; j <= i; j++)
            m[i * g + j] = floormod64(rels->v[i * (i + 1) / 2 + j], q);
    n = sylow_factors(m, g, p, e, q, out);
    PyMem_Free(m);
    if (n < 0)
        PyErr_Format(PyExc_ArithmeticError,
                     "internal check failed: the %lld-Sylow relations of Cl(%lld) do not give %lld classes",
                     (long long)p, (long long)D, (long long)q);
    return n;
}

/* The invariants d1 | d2 | ... (ascending, > 1) of Cl(D) with h classes and 2-rank r (-1:
 * not known), as a Python tuple; NULL on error. */
static PyObject *
structure(int64_t D, int64_t conductor, int64_t h, int64_t r, const int64_t *primes, Py_ssize_t len,
          Py_ssize_t first, vec_t *rels)
{
    int64_t rest = h, factors[MAX_PARTS], parts[MAX_PARTS], d, k;
    int nfactors = 0, twos = 0;
    PyObject *tuple;
    for (k = 0; k < MAX_PARTS; k++)
        factors[k] = 1;
    for (d = 2; rest > 1; d += d == 2 ? 1 : 2) {
        int64_t p = d * d > rest ? rest : d, q = 1;
        int e = 0, n = 0, i;
        if (rest % p)
            continue;
        while (rest % p == 0)
            rest /= p, q *= p, e++;
        if (p == 2)
            twos = e;
        if (e == 1) {
            parts[n++] = p;
        } else if (p == 2 && r >= 0 && !(2 <= r && r <= e - 2)) {
            if (r < 1 || r > e) {
                PyErr_Format(PyExc_ArithmeticError, "internal check failed: 2-rank %lld with 2^%d || h",
                             (long long)r, e);
                return NULL;
            }
            for (i = 0; i < r - 1; i++)
                parts[n++] = 2;
            parts[n++] = (int64_t)1 << (e - r + 1);
        } else {
            if (q >= ((int64_t)1 << 31)) {
                PyErr_SetString(PyExc_OverflowError, "a Sylow subgroup beyond the structure kernel's range");
                return NULL;
            }
            n = walked_sylow(D, conductor, primes, len, first, h, p, e, q, rels, parts);
            if (n < 0)
                return NULL;
        }
        /* parts: cyclic p-factors; the largest goes to the largest invariant */
        for (i = 0; i < n; i++) {
            int j, big = i;
            for (j = i + 1; j < n; j++)
                if (parts[j] > parts[big])
                    big = j;
            k = parts[i], parts[i] = parts[big], parts[big] = k;
            factors[i] *= parts[i];
        }
        if (n > nfactors)
            nfactors = n;
    }
    if (r >= 0 && twos == 0 && r != 0) {
        PyErr_Format(PyExc_ArithmeticError, "internal check failed: 2-rank %lld with h = %lld odd", (long long)r,
                     (long long)h);
        return NULL;
    }
    tuple = PyTuple_New(nfactors);
    if (tuple == NULL)
        return NULL;
    for (k = 0; k < nfactors; k++) {
        PyObject *o = PyLong_FromLongLong((long long)factors[nfactors - 1 - k]);
        if (o == NULL) {
            Py_DECREF(tuple);
            return NULL;
        }
        PyTuple_SET_ITEM(tuple, (Py_ssize_t)k, o);
    }
    return tuple;
}

/* The int64 values of a Python sequence (PyMem_Free the result); NULL on error. */
static int64_t *
int_array(PyObject *obj, Py_ssize_t *len, const char *what)
{
    PyObject *seq = PySequence_Fast(obj, "expected a sequence of integers");
    int64_t *out;
    Py_ssize_t i;
    if (seq == NULL)
        return NULL;
    *len = PySequence_Fast_GET_SIZE(seq);
    out = PyMem_Malloc((size_t)(*len > 0 ? *len : 1) * sizeof(int64_t));
    if (out == NULL) {
        Py_DECREF(seq);
        PyErr_NoMemory();
        return NULL;
    }
    for (i = 0; i < *len; i++)
        if (get_i64(PySequence_Fast_GET_ITEM(seq, i), &out[i], what) < 0) {
            Py_DECREF(seq);
            PyMem_Free(out);
            return NULL;
        }
    Py_DECREF(seq);
    return out;
}

PyObject *
k_definite_structures(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t conductor, first, *Ds = NULL, *hs = NULL, *ranks = NULL, *primes = NULL, amax = 0;
    Py_ssize_t n, nh, nr, len, i;
    uint32_t *N = NULL, *largest = NULL;
    vec_t rels = {0};
    PyObject *hlist = NULL, *groups = NULL;
    if (check_nargs(nargs, 6, "definite_structures") < 0 || get_i64(args[3], &conductor, "conductor") < 0 ||
        get_i64(args[5], &first, "first") < 0)
        return NULL;
    if (conductor <= 0 || first < 0) {
        PyErr_SetString(PyExc_ValueError, "the conductor must be positive and first not negative");
        return NULL;
    }
    Ds = int_array(args[0], &n, "D");
    hs = Ds == NULL ? NULL : int_array(args[1], &nh, "a class number");
    ranks = hs == NULL ? NULL : int_array(args[2], &nr, "a 2-rank");
    if (ranks == NULL || prime_array(args[4], &primes, &len) < 0)
        goto done;
    if (nh != n || nr != n) {
        PyErr_SetString(PyExc_ValueError, "one class number and one 2-rank per discriminant");
        goto done;
    }
    for (i = 0; i < n; i++) {
        if (Ds[i] >= 0 || Ds[i] < -MAX_WORD || (hs[i] == 0 && -Ds[i] > COUNT_LIMIT)) {
            PyErr_SetString(PyExc_OverflowError, "a discriminant outside the structure kernel's range");
            goto done;
        }
        if (hs[i] < 0 || (hs[i] == 0 && conductor != 1)) {
            PyErr_SetString(PyExc_ValueError, "class numbers are positive (0: counted, maximal orders only)");
            goto done;
        }
        if (hs[i] == 0 && definite_amax(Ds[i]) > amax)
            amax = definite_amax(Ds[i]);
    }
    N = PyMem_Malloc((size_t)(amax + 1) * sizeof(uint32_t));
    largest = PyMem_Malloc((size_t)(amax + 1) * sizeof(uint32_t));
    hlist = PyList_New(n);
    groups = PyList_New(n);
    if (N == NULL || largest == NULL) {
        PyErr_NoMemory();
        goto done;
    }
    if (hlist == NULL || groups == NULL)
        goto done;
    for (i = 0; i < n; i++) {
        int64_t h = hs[i];
        PyObject *o;
        if (h == 0 && (h = definite_count(Ds[i], primes, len, N, largest)) < 0)
            goto done;
        o = PyLong_FromLongLong((long long)h);
        if (o == NULL)
            goto done;
        PyList_SET_ITEM(hlist, i, o);
        o = structure(Ds[i], conductor, h, ranks[i], primes, len, (Py_ssize_t)first, &rels);
        if (o == NULL)
            goto done;
        PyList_SET_ITEM(groups, i, o);
        if ((i & 1023) == 1023 && PyErr_CheckSignals() < 0)
            goto done;
    }
    PyMem_Free(Ds), PyMem_Free(hs), PyMem_Free(ranks), PyMem_Free(primes);
    PyMem_Free(N), PyMem_Free(largest), PyMem_Free(rels.v);
    return Py_BuildValue("(NN)", hlist, groups);
done:
    PyMem_Free(Ds), PyMem_Free(hs), PyMem_Free(ranks), PyMem_Free(primes);
    PyMem_Free(N), PyMem_Free(largest), PyMem_Free(rels.v);
    Py_XDECREF(hlist), Py_XDECREF(groups);
    return NULL;
}
