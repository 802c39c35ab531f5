/*
 * Continued-fraction kernels: the principal cycle of omega (half cycle, period,
 * regulator in long double with its error bound) and the exact block products
 * of convergents. See kernels.h for the ranges and references.
 */
#include "kernels.h"

/* ------------------------------------------------------------------ */
/* continued fraction of omega: the principal cycle                    */
/* ------------------------------------------------------------------ */

typedef struct {
    int64_t D, r;
    int64_t P, Q, P1, Q1; /* (P_k, Q_k) and (P_{k+1}, Q_{k+1}) */
    int64_t k, kmax;      /* iteration, last iteration allowed */
} walk_t;

static int
walk_start(walk_t *w, PyObject *Dobj, PyObject *limit)
{
    int64_t D, steps, a;
    if (get_i64(Dobj, &D, "the discriminant") < 0)
        return -1;
    if (get_limit(limit, &steps) < 0)
        return -1;
    if (D <= 0) {
        PyErr_SetString(PyExc_ValueError, "the discriminant must be positive");
        return -1;
    }
    w->D = D;
    w->r = (int64_t)isqrt_u64((uint64_t)D);
    if (w->r * w->r == D) {
        PyErr_SetString(PyExc_ValueError, "the discriminant must not be a square");
        return -1;
    }
    /* Python: range(max_steps // 2 + 2), floor division */
    w->kmax = (steps >= 0 ? steps / 2 : -((-steps + 1) / 2)) + 1;
    w->P = D & 1;
    w->Q = 2;
    a = (w->P + w->r) / 2;
    w->P1 = a * 2 - w->P;
    w->Q1 = (D - w->P1 * w->P1) / 2;
    w->k = 0;
    return 0;
}

/* The next partial quotient floor((P1 + r)/Q1) >= 1; most are small, so
   comparisons first (a division costs tens of cycles). */
static inline int64_t
next_quotient(int64_t x, int64_t q)
{
    if (x < 2 * q)
        return 1;
    if (x < 3 * q)
        return 2;
    if (x < 4 * q)
        return 3;
    if (((uint64_t)x | (uint64_t)q) >> 32 == 0)
        return (int64_t)((uint32_t)x / (uint32_t)q);
    return x / q;
}

static inline void
walk_step(walk_t *w, int64_t a)
{
    int64_t P2 = a * w->Q1 - w->P1;
    int64_t Qn = w->Q + a * (w->P1 - P2);
    w->Q = w->Q1;
    w->Q1 = Qn;
    w->P = w->P1;
    w->P1 = P2;
}

PyObject *
k_principal_half_cycle(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    walk_t w;
    uint64_t *buf = NULL, *grown;
    Py_ssize_t n = 0, cap = 1024, i;
    PyObject *list, *out;
    int parity = -1;
    int64_t q_mid = 0, steps = 0;
    if (check_nargs(nargs, 2, "principal_half_cycle") < 0 || walk_start(&w, args[0], args[1]) < 0)
        return NULL;
    buf = (uint64_t *)PyMem_Malloc(cap * sizeof(uint64_t));
    if (buf == NULL)
        return PyErr_NoMemory();
    buf[n++] = (uint64_t)((w.P + w.r) / 2);
    for (; w.k <= w.kmax; w.k++) {
        int64_t a;
        if (w.Q1 == w.Q) {
            parity = 1, q_mid = w.Q1, steps = 2 * w.k + 1;
            break;
        }
        if (w.P1 == w.P) {
            n--;
            parity = 0, q_mid = w.Q, steps = 2 * w.k;
            break;
        }
        a = next_quotient(w.P1 + w.r, w.Q1);
        if (n == cap) {
            cap *= 2;
            grown = (uint64_t *)PyMem_Realloc(buf, cap * sizeof(uint64_t));
            if (grown == NULL) {
                PyMem_Free(buf);
                return PyErr_NoMemory();
            }
            buf = grown;
        }
        buf[n++] = (uint64_t)a;
        walk_step(&w, a);
        if ((w.k & 0xFFFFF) == 0 && PyErr_CheckSignals() < 0) {
            PyMem_Free(buf);
            return NULL;
        }
    }
    if (parity < 0) {
        PyMem_Free(buf);
        Py_RETURN_NONE;
    }
    list = PyList_New(n);
    if (list == NULL) {
        PyMem_Free(buf);
        return NULL;
    }
    for (i = 0; i < n; i++) {
        PyObject *v = PyLong_FromUnsignedLongLong(buf[i]);
        if (v == NULL) {
            PyMem_Free(buf);
            Py_DECREF(list);
            return NULL;
        }
        PyList_SET_ITEM(list, i, v);
    }
    PyMem_Free(buf);
    out = Py_BuildValue("(NiLL)", list, parity, (long long)q_mid, (long long)steps);
    return out;
}

PyObject *
k_principal_period(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    walk_t w;
    if (check_nargs(nargs, 2, "principal_period") < 0 || walk_start(&w, args[0], args[1]) < 0)
        return NULL;
    for (; w.k <= w.kmax; w.k++) {
        if (w.Q1 == w.Q)
            return Py_BuildValue("(LiL)", (long long)(2 * w.k + 1), 1, (long long)w.Q1);
        if (w.P1 == w.P)
            return Py_BuildValue("(LiL)", (long long)(2 * w.k), 0, (long long)w.Q);
        walk_step(&w, next_quotient(w.P1 + w.r, w.Q1));
        if ((w.k & 0xFFFFFF) == 0 && PyErr_CheckSignals() < 0)
            return NULL;
    }
    Py_RETURN_NONE;
}

/*
 * principal_regulator: the walk of principal_period, multiplying the complete
 * quotients theta_i = (P_i + s)/Q_i (s = sqrtl(D)) into a long double. Each
 * theta carries THETA_ROUNDINGS roundings (sqrt; sum; quotient; plus the
 * conversion of D where long double has fewer than 64 bits), each product one
 * more; renormalising by powers of 2 (frexpl) is exact and theta_i > 1 keeps
 * the product away from underflow. So the returned log error bounds
 * |log(computed) - log(exact)| rigorously with u = LDBL_EPSILON/2.
 */
#if LDBL_MANT_DIG >= 64
#define THETA_ROUNDINGS 3
#else
#define THETA_ROUNDINGS 4
#endif

PyObject *
k_principal_regulator(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    walk_t w;
    long double s, prod = 1.0L, value, mant;
    long long exponent = 0;
    int e, parity;
    double unit = (double)(LDBL_EPSILON / 2), roundings, err;
    unsigned long long M;
    if (check_nargs(nargs, 2, "principal_regulator") < 0 || walk_start(&w, args[0], args[1]) < 0)
        return NULL;
    s = sqrtl((long double)w.D);
    for (; w.k <= w.kmax; w.k++) {
        if (w.Q1 == w.Q || w.P1 == w.P) {
            parity = w.Q1 == w.Q;
            mant = frexpl(prod, &e);
            value = mant * mant;
            exponent = 2 * (exponent + e);
            if (parity)
                value *= ((long double)w.P1 + s) / (long double)w.Q1;
            mant = frexpl(value, &e);
            M = (unsigned long long)ldexpl(mant, LDBL_MANT_DIG);
            exponent += e - LDBL_MANT_DIG;
            roundings = 2.0 * (double)w.k * (THETA_ROUNDINGS + 1) + 1 + parity * (THETA_ROUNDINGS + 1);
            err = roundings * unit / (1.0 - unit) * 1.001;
            return Py_BuildValue("(LiLKLd)", (long long)(2 * w.k + parity), parity,
                                 (long long)(parity ? w.Q1 : w.Q), M, exponent, err);
        }
        prod *= ((long double)w.P1 + s) / (long double)w.Q1;
        if (prod > 0x1p8000L) {
            prod = frexpl(prod, &e);
            exponent += e;
        }
        walk_step(&w, next_quotient(w.P1 + w.r, w.Q1));
        if ((w.k & 0xFFFFFF) == 0 && PyErr_CheckSignals() < 0)
            return NULL;
    }
    Py_RETURN_NONE;
}

/* ------------------------------------------------------------------ */
/* convergent_leaves: block products of [[a, 1], [1, 0]], exact        */
/* ------------------------------------------------------------------ */

static PyObject *
limbs_to_py(const uint64_t *x, Py_ssize_t n)
{
    unsigned char *bytes;
    PyObject *v;
    Py_ssize_t i;
    int j;
    while (n > 0 && x[n - 1] == 0)
        n--;
    if (n <= 1)
        return PyLong_FromUnsignedLongLong(n ? x[0] : 0);
    bytes = (unsigned char *)PyMem_Malloc((size_t)n * 8);
    if (bytes == NULL)
        return PyErr_NoMemory();
    for (i = 0; i < n; i++)
        for (j = 0; j < 8; j++)
            bytes[8 * i + j] = (unsigned char)(x[i] >> (8 * j));
#if PY_VERSION_HEX >= 0x030D0000
    v = PyLong_FromUnsignedNativeBytes(bytes, (size_t)n * 8, Py_ASNATIVEBYTES_LITTLE_ENDIAN);
#else
    v = _PyLong_FromByteArray(bytes, (size_t)n * 8, 1, 0);
#endif
    PyMem_Free(bytes);
    return v;
}

/* x <- a*y + x over n limbs (x has room for n + 1); returns the new length. */
static inline Py_ssize_t
mul_add(uint64_t *x, const uint64_t *y, uint64_t a, Py_ssize_t n)
{
    u128 carry = 0;
    Py_ssize_t i;
    for (i = 0; i < n; i++) {
        u128 t = (u128)a * y[i] + x[i] + carry;
        x[i] = (uint64_t)t;
        carry = t >> 64;
    }
    if (carry) {
        x[n] = (uint64_t)carry;
        return n + 1;
    }
    return n;
}

PyObject *
k_convergent_leaves(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    PyObject *seq, *out = NULL;
    Py_ssize_t n, chunk, start, i, cap = 0;
    uint64_t *quot = NULL, *mem = NULL;
    if (check_nargs(nargs, 2, "convergent_leaves") < 0)
        return NULL;
    chunk = PyLong_AsSsize_t(args[1]);
    if (chunk == -1 && PyErr_Occurred())
        return NULL;
    if (chunk == 0) {
        PyErr_SetString(PyExc_ValueError, "range() arg 3 must not be zero");
        return NULL;
    }
    if (chunk < 0) /* as range(0, n, chunk) in the twin: no blocks */
        return PyList_New(0);
    seq = PySequence_Fast(args[0], "quotients must be a sequence");
    if (seq == NULL)
        return NULL;
    n = PySequence_Fast_GET_SIZE(seq);
    quot = (uint64_t *)PyMem_Malloc((n ? n : 1) * sizeof(uint64_t));
    if (quot == NULL) {
        PyErr_NoMemory();
        goto done;
    }
    for (i = 0; i < n; i++) {
        PyObject *item = PyNumber_Index(PySequence_Fast_GET_ITEM(seq, i));
        if (item == NULL)
            goto done;
        quot[i] = PyLong_AsUnsignedLongLong(item);
        Py_DECREF(item);
        if (quot[i] == (uint64_t)-1 && PyErr_Occurred()) {
            PyErr_SetString(PyExc_OverflowError, "a partial quotient is outside the compiled kernels' range");
            goto done;
        }
    }
    out = PyList_New(0);
    if (out == NULL)
        goto done;
    for (start = 0; start < n; start += chunk) {
        Py_ssize_t end = start + chunk < n ? start + chunk : n, bits = 0, limbs, np = 1, nq = 1;
        uint64_t *p, *pp, *q, *qq, *t;
        PyObject *leaf;
        for (i = start; i < end; i++)
            bits += (quot[i] ? 64 - __builtin_clzll(quot[i]) : 0) + 1;
        limbs = bits / 64 + 2;
        if (limbs > cap) {
            PyMem_Free(mem);
            cap = limbs;
            mem = (uint64_t *)PyMem_Malloc((size_t)(4 * cap) * sizeof(uint64_t));
            if (mem == NULL) {
                PyErr_NoMemory();
                Py_CLEAR(out);
                goto done;
            }
        }
        memset(mem, 0, (size_t)(4 * limbs) * sizeof(uint64_t));
        p = mem, pp = mem + limbs, q = mem + 2 * limbs, qq = mem + 3 * limbs;
        p[0] = 1, qq[0] = 1;
        for (i = start; i < end; i++) {
            uint64_t a = quot[i];
            /* (p, pp) <- (a p + pp, p); the same for (q, qq) */
            np = mul_add(pp, p, a, np);
            t = p, p = pp, pp = t;
            nq = mul_add(qq, q, a, nq);
            t = q, q = qq, qq = t;
        }
        leaf = PyTuple_New(4);
        if (leaf == NULL) {
            Py_CLEAR(out);
            goto done;
        }
        PyTuple_SET_ITEM(leaf, 0, limbs_to_py(p, np));
        PyTuple_SET_ITEM(leaf, 1, limbs_to_py(pp, np));
        PyTuple_SET_ITEM(leaf, 2, limbs_to_py(q, nq));
        PyTuple_SET_ITEM(leaf, 3, limbs_to_py(qq, nq));
        if (PyErr_Occurred() || PyList_Append(out, leaf) < 0) {
            Py_DECREF(leaf);
            Py_CLEAR(out);
            goto done;
        }
        Py_DECREF(leaf);
    }
done:
    PyMem_Free(mem);
    PyMem_Free(quot);
    Py_DECREF(seq);
    return out;
}
