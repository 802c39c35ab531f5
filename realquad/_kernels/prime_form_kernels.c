/*
 * Prime forms and the candidate generators of the narrow class group: square
 * roots of D modulo small primes (tabulated once per process), the canonical
 * prime form of each prime, and the candidates J, (p, b, c) the class walks
 * of class_kernels.c start from.
 */
#include "kernels.h"

/* ------------------------------------------------------------------ */
/* prime forms and class-group candidates (p < 2^31 here)              */
/* ------------------------------------------------------------------ */

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

/*
 * Square roots modulo the odd primes below SQRT_TABLE_LIMIT, tabulated once per
 * process (about 2.2 MB): root_of[offset[p] + n] is a square root of n modulo p,
 * or 0xFFFF when n is not a square. A survey asks the same small primes about
 * every discriminant; one load replaces Euler's criterion and Tonelli-Shanks.
 */
#define SQRT_TABLE_LIMIT 4096
static uint16_t *root_of;
static uint32_t root_offset[SQRT_TABLE_LIMIT];

static int
build_root_table(void)
{
    static unsigned char composite[SQRT_TABLE_LIMIT];
    uint32_t total = 0, p, x, i;
    for (p = 2; p < SQRT_TABLE_LIMIT; p++)
        if (!composite[p])
            for (i = p * p; i < SQRT_TABLE_LIMIT; i += p)
                composite[i] = 1;
    for (p = 3; p < SQRT_TABLE_LIMIT; p += 2)
        if (!composite[p])
            root_offset[p] = total, total += p;
    root_of = (uint16_t *)PyMem_Malloc((size_t)total * sizeof(uint16_t));
    if (root_of == NULL) {
        PyErr_NoMemory();
        return -1;
    }
    memset(root_of, 0xFF, (size_t)total * sizeof(uint16_t));
    for (p = 3; p < SQRT_TABLE_LIMIT; p += 2)
        if (!composite[p])
            for (x = 0; x <= p / 2; x++)
                root_of[root_offset[p] + x * x % p] = (uint16_t)x;
    return 0;
}

/* A square root of D modulo the odd prime p, or -1 (-2 on error). */
static int64_t
root_mod_prime(int64_t D, int64_t p)
{
    if (p < SQRT_TABLE_LIMIT) {
        uint16_t t;
        if (root_of == NULL && build_root_table() < 0)
            return -2;
        uint32_t residue = (uint64_t)D >> 32 ? (uint32_t)((uint64_t)D % (uint64_t)p) : (uint32_t)D % (uint32_t)p;
        t = root_of[root_offset[p] + residue];
        return t == 0xFFFF ? -1 : (int64_t)t;
    }
    return sqrt_mod_odd_prime((uint64_t)D, (uint64_t)p);
}

/* prime_form_b of prime_form_kernels.py for a prime 2 <= p < 2^31 and 0 < |D| < 2^62 (the b is canonical). */
int64_t
prime_b(int64_t D, int64_t p)
{
    int64_t b, t, c;
    if (p == 2) {
        int64_t residue = floormod64(D, 8);
        if (residue == 1)
            b = 1;
        else if (residue == 0)
            b = 0;
        else if (residue == 4)
            b = 2;
        else
            return -1;
    } else {
        t = root_mod_prime(D >= 0 ? D : floormod64(D, p), p);
        if (t < 0)
            return t;
        b = ((t - D) % 2 == 0) ? t : p - t;
    }
    if (b % p == 0) { /* p ramifies: the form must be primitive */
        c = floordiv64(b * b - D, 4 * p);
        if (c % p == 0)
            return -1;
    }
    return b;
}

/* A sequence of primes as a C array (PyMem_Free it); -1 on error. */
int
prime_array(PyObject *primes, int64_t **out, Py_ssize_t *len)
{
    PyObject *seq = PySequence_Fast(primes, "primes must be a sequence");
    Py_ssize_t i, n;
    int64_t *v;
    if (seq == NULL)
        return -1;
    n = PySequence_Fast_GET_SIZE(seq);
    v = (int64_t *)PyMem_Malloc((size_t)(n + 1) * sizeof(int64_t));
    if (v == NULL) {
        Py_DECREF(seq);
        PyErr_NoMemory();
        return -1;
    }
    for (i = 0; i < n; i++)
        if (get_i64(PySequence_Fast_GET_ITEM(seq, i), &v[i], "a prime") < 0) {
            Py_DECREF(seq);
            PyMem_Free(v);
            return -1;
        }
    Py_DECREF(seq);
    *out = v, *len = n;
    return 0;
}

/*
 * form_class_candidates of prime_form_kernels.py into a growable array of triples; -1 on
 * error. With lift set, each prime form (p, b, c) is replaced by the reduced
 * form (p, b + 2pk, *) of its class with r - 2p < b + 2pk <= r (reduced because
 * 2p < sqrt D): the same classes, for callers that only count them; its c is
 * left 0 (no form of a non-square D has c = 0) for class_walk to compute when
 * it needs it.
 */
int
candidates(int64_t D, int64_t conductor, const int64_t *primes, Py_ssize_t len, int lift, int64_t **out,
           int64_t *count)
{
    int64_t r = (int64_t)isqrt_u64((uint64_t)D), b0, n = 0, cap = 256, *v, p, b, q;
    Py_ssize_t i;
    v = (int64_t *)PyMem_Malloc((size_t)(3 * cap) * sizeof(int64_t));
    if (v == NULL) {
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
    for (i = 0; i < len; i++) {
        p = primes[i];
        if (p < 2 || p >= ((int64_t)1 << 31) || 4 * (i128)p * p >= D) {
            if (p >= 2 && 4 * (i128)p * p >= D)
                break;
            PyErr_SetString(PyExc_OverflowError, "a prime is outside the class-number kernel's range");
            goto fail;
        }
        if (conductor % p) {
            b = prime_b(D, p);
            if (b < -1)
                goto fail;
            if (b >= 0) {
                if (lift) { /* r - b and 2p are below 2^32; c = 0 marks "not computed" */
                    b += 2 * p * (int64_t)((uint32_t)(r - b) / (uint32_t)(2 * p));
                    PUSH(p, b, 0);
                } else {
                    PUSH(p, b, (b * b - D) / (4 * p));
                }
            }
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
    *out = v, *count = n;
    return 0;
fail:
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

int
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
    if (D == 0 || D > MAX_WORD || D < -MAX_WORD || p < 2 || p >= ((int64_t)1 << 31)) {
        PyErr_SetString(PyExc_OverflowError, "prime_form_b takes 0 < |D| < 2^62 and a prime p < 2^31");
        return NULL;
    }
    p = prime_b(D, p);
    return p < -1 ? NULL : PyLong_FromLongLong((long long)p);
}

PyObject *
k_form_class_candidates(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t D, conductor, n, *v, *primes;
    Py_ssize_t len;
    PyObject *out;
    int rc;
    if (check_nargs(nargs, 3, "form_class_candidates") < 0 || class_kernel_args(args, &D, &conductor) < 0 ||
        prime_array(args[2], &primes, &len) < 0)
        return NULL;
    rc = candidates(D, conductor, primes, len, 0, &v, &n);
    PyMem_Free(primes);
    if (rc < 0)
        return NULL;
    out = triples_to_list(v, n);
    PyMem_Free(v);
    return out;
}
