/*
 * Character kernels: Kronecker symbols for a batch of moduli (Cohen, Alg. 1.4.10).
 */
#include "kernels.h"

/* ------------------------------------------------------------------ */
/* Kronecker symbols                                                   */
/* ------------------------------------------------------------------ */

int
kronecker_i64(int64_t a, int64_t n)
{
    int k = 1, v;
    uint64_t un, ua;
    int a_negative = a < 0;
    if (n == 0)
        return (a == 1 || a == -1) ? 1 : 0;
    if (!(a & 1) && !(n & 1))
        return 0;
    if (n < 0) {
        un = (uint64_t)0 - (uint64_t)n;
        if (a_negative)
            k = -k;
    } else {
        un = (uint64_t)n;
    }
    v = __builtin_ctzll(un);
    un >>= v;
    if (v & 1) {
        int a8 = (int)(a & 7); /* two's complement: a mod 8 */
        if (a8 == 3 || a8 == 5)
            k = -k;
    }
    /* now un is odd and positive: Jacobi symbol (a/un) */
    if (a_negative) {
        ua = (uint64_t)0 - (uint64_t)a;
        if ((un & 3) == 3)
            k = -k;
    } else {
        ua = (uint64_t)a;
    }
    ua %= un;
    while (ua) {
        uint64_t t;
        v = __builtin_ctzll(ua);
        ua >>= v;
        if ((v & 1) && ((un & 7) == 3 || (un & 7) == 5))
            k = -k;
        if (ua & un & 2)
            k = -k;
        t = un % ua;
        un = ua;
        ua = t;
    }
    return un == 1 ? k : 0;
}

PyObject *
k_kronecker_symbols(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t a, n;
    PyObject *seq, *out;
    Py_ssize_t len, i;
    if (check_nargs(nargs, 2, "kronecker_symbols") < 0 || get_i64(args[0], &a, "a") < 0)
        return NULL;
    seq = PySequence_Fast(args[1], "moduli must be a sequence");
    if (seq == NULL)
        return NULL;
    len = PySequence_Fast_GET_SIZE(seq);
    out = PyList_New(len);
    if (out == NULL) {
        Py_DECREF(seq);
        return NULL;
    }
    for (i = 0; i < len; i++) {
        if (get_i64(PySequence_Fast_GET_ITEM(seq, i), &n, "a modulus") < 0) {
            Py_DECREF(seq);
            Py_DECREF(out);
            return NULL;
        }
        PyList_SET_ITEM(out, i, PyLong_FromLong(kronecker_i64(a, n)));
    }
    Py_DECREF(seq);
    return out;
}
