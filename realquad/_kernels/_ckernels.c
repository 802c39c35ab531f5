/*
 * realquad._kernels._ckernels: the compiled word-size kernels.
 *
 * Each function here is the compiled counterpart of the function of the same
 * name in _pure.py and returns the same results (principal_regulator: the
 * same quantity with its own rigorous error bound, see below). Every
 * integer is range-checked: an argument or a result outside the range a
 * kernel handles raises OverflowError, and the Python caller falls back to
 * the pure twin; nothing overflows silently.
 *
 * Continued fraction (principal_*): D < 2^63. For the reduced quadratic
 * irrationals (P + sqrt D)/Q met on the principal cycle, 0 <= P <= floor(sqrt D)
 * and 0 < Q < 2 sqrt D, so every intermediate fits in 64 bits; the one product
 * a (P_k - P_{k+1}) equals Q_{k+1} - Q_{k-1} and is as small.
 *
 * Forms (form_*, extended_gcd): any int64 arguments; arithmetic in __int128
 * with every product and sum checked.
 *
 * References: M. J. Jacobson Jr. and H. C. Williams, Solving the Pell
 * Equation, Springer 2009, ch. 3-5 (the continued fraction of omega and the
 * palindrome of its period); J. Buchmann and U. Vollmer, Binary Quadratic
 * Forms, Springer 2007, ch. 6 (rho, reduction, cycles); H. Cohen, A Course in
 * Computational Algebraic Number Theory, Springer 1993, Alg. 1.4.10
 * (Kronecker symbol) and Def. 5.4.6 (composition).
 */
#define PY_SSIZE_T_CLEAN
#include <Python.h>

#include <float.h>
#include <math.h>
#include <stdint.h>
#include <string.h>

#if !defined(__SIZEOF_INT128__)
#error "realquad's compiled kernels need a C compiler with __int128 (GCC or Clang on a 64-bit platform)"
#endif

typedef __int128 i128;
typedef unsigned __int128 u128;

#define MAX_CFRAC ((int64_t)INT64_MAX)
#define MAX_WORD ((int64_t)(((uint64_t)1 << 62) - 1))

/* ------------------------------------------------------------------ */
/* argument helpers                                                    */
/* ------------------------------------------------------------------ */

static int
get_i64(PyObject *obj, int64_t *out, const char *what)
{
    int overflow = 0;
    long long v;
    if (!PyLong_Check(obj)) {
        /* gmpy2 integers and other __index__ types */
        PyObject *index = PyNumber_Index(obj);
        if (index == NULL) {
            PyErr_Format(PyExc_TypeError, "%s must be an integer", what);
            return -1;
        }
        v = PyLong_AsLongLongAndOverflow(index, &overflow);
        Py_DECREF(index);
    } else {
        v = PyLong_AsLongLongAndOverflow(obj, &overflow);
    }
    if (overflow) {
        PyErr_Format(PyExc_OverflowError, "%s is outside the compiled kernels' 64-bit range", what);
        return -1;
    }
    if (v == -1 && PyErr_Occurred())
        return -1;
    *out = (int64_t)v;
    return 0;
}

/* A step limit: values beyond int64 are clamped (they cannot be reached). */
static int
get_limit(PyObject *obj, int64_t *out)
{
    int overflow = 0;
    long long v;
    if (!PyLong_Check(obj)) {
        PyErr_SetString(PyExc_TypeError, "max_steps must be an integer");
        return -1;
    }
    v = PyLong_AsLongLongAndOverflow(obj, &overflow);
    if (overflow > 0)
        v = LLONG_MAX;
    else if (overflow < 0)
        v = LLONG_MIN;
    else if (v == -1 && PyErr_Occurred())
        return -1;
    *out = (int64_t)v;
    return 0;
}

static int
check_nargs(Py_ssize_t nargs, Py_ssize_t want, const char *name)
{
    if (nargs != want) {
        PyErr_Format(PyExc_TypeError, "%s() takes exactly %zd arguments (%zd given)", name, want, nargs);
        return -1;
    }
    return 0;
}

static PyObject *
i128_to_py(i128 v)
{
    if (v < (i128)INT64_MIN || v > (i128)INT64_MAX) {
        PyErr_SetString(PyExc_OverflowError, "a result is outside the compiled kernels' 64-bit range");
        return NULL;
    }
    return PyLong_FromLongLong((long long)v);
}

static int
fits_i64(i128 v)
{
    return v >= (i128)INT64_MIN && v <= (i128)INT64_MAX;
}

static PyObject *
overflow(void)
{
    PyErr_SetString(PyExc_OverflowError, "an intermediate value is outside the compiled kernels' range");
    return NULL;
}

/* Python's floor division and modulo, on __int128 (floordiv, floormod; b != 0, |a|, |b| < 2^126)
   and on int64 (floordiv64, floormod64; b != 0, not INT64_MIN / -1: the fast path, since a
   128-bit division is slow). */
#define FLOOR_OPERATIONS(suffix, type)                                                                 \
    static inline type floordiv##suffix(type a, type b)                                                \
    {                                                                                                  \
        type q = a / b;                                                                                \
        if ((a % b != 0) && ((a < 0) != (b < 0)))                                                      \
            q -= 1;                                                                                    \
        return q;                                                                                      \
    }                                                                                                  \
    static inline type floormod##suffix(type a, type b)                                                \
    {                                                                                                  \
        type m = a % b;                                                                                \
        if (m != 0 && ((m < 0) != (b < 0)))                                                            \
            m += b;                                                                                    \
        return m;                                                                                      \
    }

FLOOR_OPERATIONS(, i128)
FLOOR_OPERATIONS(64, int64_t)

#define SMALL62(x) ((x) > -((i128)1 << 62) && (x) < ((i128)1 << 62))

static uint64_t
isqrt_u64(uint64_t n)
{
    uint64_t r = (uint64_t)sqrtl((long double)n);
    while ((u128)r * r > n)
        r--;
    while ((u128)(r + 1) * (r + 1) <= n)
        r++;
    return r;
}

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

static PyObject *
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

static PyObject *
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

static PyObject *
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

static PyObject *
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

/* ------------------------------------------------------------------ */
/* Kronecker symbols                                                   */
/* ------------------------------------------------------------------ */

static int
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

static PyObject *
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

/* ------------------------------------------------------------------ */
/* binary quadratic forms                                              */
/* ------------------------------------------------------------------ */

static inline i128
abs128(i128 x)
{
    return x < 0 ? -x : x;
}

/* form_rho_b on int64 inputs (no overflow in i128); -1 on division by zero. */
static inline int
rho_b(i128 b, i128 c, i128 r, i128 *t)
{
    i128 m = abs128(c);
    if (m == 0) {
        PyErr_SetString(PyExc_ZeroDivisionError, "integer modulo by zero");
        return -1;
    }
    if (SMALL62(b) && SMALL62(c) && SMALL62(r)) {
        int64_t m64 = (int64_t)m, b64 = (int64_t)b, r64 = (int64_t)r, x;
        if (m64 <= r64) {
            *t = r64 - floormod64(r64 + b64, 2 * m64);
        } else {
            x = floormod64(-b64, 2 * m64);
            *t = x > m64 ? x - 2 * m64 : x;
        }
        return 0;
    }
    if (m <= r) {
        *t = r - floormod(r + b, 2 * m);
    } else {
        i128 x = floormod(-b, 2 * m);
        *t = x > m ? x - 2 * m : x;
    }
    return 0;
}

static inline int
is_reduced(i128 a, i128 b, i128 r)
{
    i128 m = 2 * abs128(a);
    return 0 < b && b <= r && r - b < m && m <= r + b;
}

/* One rho step (a, b, c) -> (c, t, (t^2 - D)/(4c)), all kept in int64; -1 on error. */
static inline int
rho_step(int64_t *a, int64_t *b, int64_t *c, int64_t D, int64_t r)
{
    i128 t, nc;
    if (rho_b(*b, *c, r, &t) < 0)
        return -1;
    if (t > -(1LL << 31) && t < (1LL << 31) && *c > -(1LL << 60) && *c < (1LL << 60))
        nc = floordiv64((int64_t)t * (int64_t)t - D, 4 * *c); /* t² < 2⁶², D ≥ 0 or small */
    else
        nc = floordiv(t * t - (i128)D, 4 * (i128)*c);
    if (!fits_i64(t) || !fits_i64(nc)) {
        overflow();
        return -1;
    }
    *a = *c;
    *b = (int64_t)t;
    *c = (int64_t)nc;
    return 0;
}

static PyObject *
k_form_rho_b(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t b, c, r;
    i128 t;
    if (check_nargs(nargs, 3, "form_rho_b") < 0 || get_i64(args[0], &b, "b") < 0 ||
        get_i64(args[1], &c, "c") < 0 || get_i64(args[2], &r, "r") < 0)
        return NULL;
    if (rho_b(b, c, r, &t) < 0)
        return NULL;
    return i128_to_py(t);
}

static PyObject *
k_form_is_reduced(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t a, b, r;
    if (check_nargs(nargs, 3, "form_is_reduced") < 0 || get_i64(args[0], &a, "a") < 0 ||
        get_i64(args[1], &b, "b") < 0 || get_i64(args[2], &r, "r") < 0)
        return NULL;
    return PyBool_FromLong(is_reduced(a, b, r));
}

static int
get_form(PyObject *const *args, int64_t *a, int64_t *b, int64_t *c, int64_t *D, int64_t *r)
{
    return (get_i64(args[0], a, "a") < 0 || get_i64(args[1], b, "b") < 0 || get_i64(args[2], c, "c") < 0 ||
            get_i64(args[3], D, "D") < 0 || get_i64(args[4], r, "r") < 0)
               ? -1
               : 0;
}

static PyObject *
k_form_reduce(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t a, b, c, D, r;
    unsigned long count = 0;
    if (check_nargs(nargs, 5, "form_reduce") < 0 || get_form(args, &a, &b, &c, &D, &r) < 0)
        return NULL;
    while (!is_reduced(a, b, r)) {
        if (rho_step(&a, &b, &c, D, r) < 0)
            return NULL;
        if ((++count & 0xFFFFF) == 0 && PyErr_CheckSignals() < 0)
            return NULL;
    }
    return Py_BuildValue("(LLL)", (long long)a, (long long)b, (long long)c);
}

static PyObject *
k_form_cycle(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t a, b, c, D, r, a0, b0, steps, k;
    PyObject *out, *pair;
    if (check_nargs(nargs, 6, "form_cycle") < 0 || get_form(args, &a, &b, &c, &D, &r) < 0 ||
        get_limit(args[5], &steps) < 0)
        return NULL;
    out = PyList_New(0);
    if (out == NULL)
        return NULL;
    a0 = a, b0 = b;
    pair = Py_BuildValue("(LL)", (long long)a, (long long)b);
    if (pair == NULL || PyList_Append(out, pair) < 0)
        goto fail;
    Py_DECREF(pair);
    for (k = 0; k < steps; k++) {
        pair = NULL;
        if (rho_step(&a, &b, &c, D, r) < 0)
            goto fail;
        if (a == a0 && b == b0)
            return out;
        pair = Py_BuildValue("(LL)", (long long)a, (long long)b);
        if (pair == NULL || PyList_Append(out, pair) < 0)
            goto fail;
        Py_DECREF(pair);
        if ((k & 0xFFFFF) == 0xFFFFF && PyErr_CheckSignals() < 0)
            goto fail;
    }
    Py_DECREF(out);
    Py_RETURN_NONE;
fail:
    Py_XDECREF(pair);
    Py_DECREF(out);
    return NULL;
}

/* Checked __int128 arithmetic: any overflow sets *bad. */
static inline i128
mul_c(i128 x, i128 y, int *bad)
{
    i128 z;
    if (__builtin_mul_overflow(x, y, &z))
        *bad = 1;
    return z;
}

static inline i128
add_c(i128 x, i128 y, int *bad)
{
    i128 z;
    if (__builtin_add_overflow(x, y, &z))
        *bad = 1;
    return z;
}

/* extended_gcd of _pure.py, step for step (floor divmod); inputs |x|, |y| < 2^126. */
/* The extended Euclidean loop of the twin on one integer type (floor quotients). */
#define XGCD_BODY(type, div)                                                                           \
    do {                                                                                               \
        type X = (type)x, Y = (type)y, U0 = 1, V0 = 0, U1 = 0, V1 = 1, Q, R, T;                        \
        while (Y != 0) {                                                                               \
            Q = div(X, Y);                                                                             \
            R = X - Q * Y;                                                                             \
            X = Y, Y = R;                                                                              \
            T = U0 - Q * U1, U0 = U1, U1 = T;                                                          \
            T = V0 - Q * V1, V0 = V1, V1 = T;                                                          \
        }                                                                                              \
        if (X < 0)                                                                                     \
            *g = -(i128)X, *u = -(i128)U0, *v = -(i128)V0;                                             \
        else                                                                                           \
            *g = X, *u = U0, *v = V0;                                                                  \
    } while (0)

static void
xgcd128(i128 x, i128 y, i128 *g, i128 *u, i128 *v)
{
    if (SMALL62(x) && SMALL62(y)) /* Bezout factors stay below max(|x|, |y|): int64 suffices */
        XGCD_BODY(int64_t, floordiv64);
    else
        XGCD_BODY(i128, floordiv);
}

static PyObject *
k_extended_gcd(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t x, y;
    i128 g, u, v;
    PyObject *G, *U, *V;
    if (check_nargs(nargs, 2, "extended_gcd") < 0 || get_i64(args[0], &x, "x") < 0 ||
        get_i64(args[1], &y, "y") < 0)
        return NULL;
    xgcd128(x, y, &g, &u, &v);
    if (!fits_i64(g) || !fits_i64(u) || !fits_i64(v))
        return overflow();
    G = PyLong_FromLongLong((long long)g);
    U = PyLong_FromLongLong((long long)u);
    V = PyLong_FromLongLong((long long)v);
    return Py_BuildValue("(NNN)", G, U, V);
}

static inline i128
div_any(i128 a, i128 b)
{
    return (SMALL62(a) && SMALL62(b)) ? (i128)floordiv64((int64_t)a, (int64_t)b) : floordiv(a, b);
}

static inline i128
mod_any(i128 a, i128 b)
{
    return (SMALL62(a) && SMALL62(b)) ? (i128)floormod64((int64_t)a, (int64_t)b) : floormod(a, b);
}

/* form_compose of _pure.py on int64 inputs; -1 with an exception set on failure. */
static int
compose(int64_t a1, int64_t b1, int64_t a2, int64_t b2, int64_t D, int64_t *Ao, int64_t *Bo, int64_t *Co)
{
    i128 s, g, x, y, e, p, w, u, v, A, B, m, C, sum;
    int bad = 0;
    s = floordiv((i128)b1 + b2, 2);
    xgcd128(a1, a2, &g, &x, &y);
    xgcd128(g, s, &e, &p, &w);
    u = mul_c(p, x, &bad);
    v = mul_c(p, y, &bad);
    if (e == 0) {
        PyErr_SetString(PyExc_ZeroDivisionError, "integer division or modulo by zero");
        return -1;
    }
    A = div_any((i128)a1 * a2, mul_c(e, e, &bad));
    sum = mul_c(mul_c(u, a1, &bad), b2, &bad);
    sum = add_c(sum, mul_c(mul_c(v, a2, &bad), b1, &bad), &bad);
    sum = add_c(sum, floordiv(mul_c(w, (i128)b1 * b2 + D, &bad), 2), &bad);
    if (bad) {
        overflow();
        return -1;
    }
    B = div_any(sum, e);
    m = 2 * abs128(A);
    if (m == 0) {
        PyErr_SetString(PyExc_ZeroDivisionError, "integer division or modulo by zero");
        return -1;
    }
    B = mod_any(B, m);
    if (B > m / 2)
        B -= m;
    if (!fits_i64(A) || !fits_i64(B)) {
        overflow();
        return -1;
    }
    C = div_any(B * B - D, 4 * A);
    if (!fits_i64(C)) {
        overflow();
        return -1;
    }
    *Ao = (int64_t)A, *Bo = (int64_t)B, *Co = (int64_t)C;
    return 0;
}

static PyObject *
k_form_compose(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t a1, b1, a2, b2, D, A, B, C;
    if (check_nargs(nargs, 5, "form_compose") < 0 || get_i64(args[0], &a1, "a1") < 0 ||
        get_i64(args[1], &b1, "b1") < 0 || get_i64(args[2], &a2, "a2") < 0 || get_i64(args[3], &b2, "b2") < 0 ||
        get_i64(args[4], &D, "D") < 0)
        return NULL;
    if (compose(a1, b1, a2, b2, D, &A, &B, &C) < 0)
        return NULL;
    return Py_BuildValue("(LLL)", (long long)A, (long long)B, (long long)C);
}

static PyObject *
k_form_compose_reduce(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t a1, b1, a2, b2, D, r, A, B, C;
    unsigned long count = 0;
    if (check_nargs(nargs, 6, "form_compose_reduce") < 0 || get_i64(args[0], &a1, "a1") < 0 ||
        get_i64(args[1], &b1, "b1") < 0 || get_i64(args[2], &a2, "a2") < 0 || get_i64(args[3], &b2, "b2") < 0 ||
        get_i64(args[4], &D, "D") < 0 || get_i64(args[5], &r, "r") < 0)
        return NULL;
    if (compose(a1, b1, a2, b2, D, &A, &B, &C) < 0)
        return NULL;
    while (!is_reduced(A, B, r)) {
        if (rho_step(&A, &B, &C, D, r) < 0)
            return NULL;
        if ((++count & 0xFFFFF) == 0 && PyErr_CheckSignals() < 0)
            return NULL;
    }
    return Py_BuildValue("(LLL)", (long long)A, (long long)B, (long long)C);
}

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

static PyObject *
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

static PyObject *
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
static PyObject *
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
static PyObject *
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

/* ------------------------------------------------------------------ */
/* infrastructure: baby steps on reduced principal ideals              */
/* ------------------------------------------------------------------ */

/* D below 2^106 keeps every a, b below 2^53, so each int-to-double conversion
   is exact and the distances are bit for bit those of the twin (same libm log,
   no contraction into fused multiply-adds). */
#define INFRA_BITS 106

static int
get_i128(PyObject *obj, i128 *out, const char *what)
{
    int overflow = 0;
    long long v;
    unsigned long long lo;
    PyObject *hi_obj, *index, *shift;
    index = PyNumber_Index(obj);
    if (index == NULL)
        return -1;
    v = PyLong_AsLongLongAndOverflow(index, &overflow);
    if (!overflow) {
        Py_DECREF(index);
        if (v == -1 && PyErr_Occurred())
            return -1;
        *out = v;
        return 0;
    }
    lo = PyLong_AsUnsignedLongLongMask(index);
    shift = PyLong_FromLong(64);
    hi_obj = shift ? PyNumber_Rshift(index, shift) : NULL;
    Py_XDECREF(shift);
    Py_DECREF(index);
    if (hi_obj == NULL)
        return -1;
    v = PyLong_AsLongLongAndOverflow(hi_obj, &overflow);
    Py_DECREF(hi_obj);
    if (overflow || v > ((long long)1 << 61) || v < -((long long)1 << 61)) {
        PyErr_Format(PyExc_OverflowError, "%s is outside the compiled kernels' 128-bit range", what);
        return -1;
    }
    *out = ((i128)v << 64) | (i128)lo;
    return 0;
}

static PyObject *
py_from_i128(i128 v)
{
    unsigned char bytes[16];
    int j;
    u128 u = (u128)v;
    if (fits_i64(v))
        return PyLong_FromLongLong((long long)v);
    for (j = 0; j < 16; j++)
        bytes[j] = (unsigned char)(u >> (8 * j));
#if PY_VERSION_HEX >= 0x030D0000
    return PyLong_FromNativeBytes(bytes, 16, Py_ASNATIVEBYTES_LITTLE_ENDIAN);
#else
    return _PyLong_FromByteArray(bytes, 16, 1, 1);
#endif
}

static PyObject *
k_infrastructure_baby_steps(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    i128 D, r, a, b, width, two_a, bt;
    double sq, dist;
    int64_t count, k;
    PyObject *keys = NULL, *dists = NULL, *item;
    int back = 0;
    if (check_nargs(nargs, 7, "infrastructure_baby_steps") < 0 || get_i128(args[0], &D, "D") < 0 ||
        get_i128(args[1], &r, "r") < 0 || get_i128(args[3], &a, "a") < 0 || get_i128(args[4], &b, "b") < 0 ||
        get_limit(args[6], &count) < 0)
        return NULL;
    sq = PyFloat_AsDouble(args[2]);
    if (sq == -1.0 && PyErr_Occurred())
        return NULL;
    dist = PyFloat_AsDouble(args[5]);
    if (dist == -1.0 && PyErr_Occurred())
        return NULL;
    if (D <= 0 || D >= ((i128)1 << INFRA_BITS) || r < 0 || r >= ((i128)1 << 53) || a <= 0 || a >= ((i128)1 << 53) ||
        b <= -((i128)1 << 53) || b >= ((i128)1 << 53)) {
        PyErr_SetString(PyExc_OverflowError, "the compiled baby steps take D < 2^106 and reduced ideals");
        return NULL;
    }
    keys = PyList_New(0);
    dists = PyList_New(0);
    if (keys == NULL || dists == NULL)
        goto fail;
    width = 2 * r + 2;
    for (k = 0; k < count; k++) {
        two_a = 2 * a;
        bt = floormod(b + r, two_a) - r;
        a = floordiv(D - bt * bt, 2 * two_a);
        b = -bt;
        if (a <= 0 || a >= ((i128)1 << 53) || b <= -((i128)1 << 53) || b >= ((i128)1 << 53)) {
            overflow();
            goto fail;
        }
        if (b >= 0)
            dist += log(((double)b + sq) / (double)(2 * a));
        else
            dist += log((double)two_a / (sq - (double)b));
        if (a == 1) {
            back = 1;
            break;
        }
        item = py_from_i128(a * width + b);
        if (item == NULL || PyList_Append(keys, item) < 0) {
            Py_XDECREF(item);
            goto fail;
        }
        Py_DECREF(item);
        item = PyFloat_FromDouble(dist);
        if (item == NULL || PyList_Append(dists, item) < 0) {
            Py_XDECREF(item);
            goto fail;
        }
        Py_DECREF(item);
        if ((k & 0xFFFFF) == 0xFFFFF && PyErr_CheckSignals() < 0)
            goto fail;
    }
    return Py_BuildValue("(NNNNdi)", keys, dists, py_from_i128(a), py_from_i128(b), dist, back);
fail:
    Py_XDECREF(keys);
    Py_XDECREF(dists);
    return NULL;
}

/*
 * infrastructure_giant_step of _pure.py for D < 2^62 and ideals of norm below
 * 2^31 (every reduced ideal): then a·a2 < 2^62, the centred b below it, b² <
 * 2^124, and the float operations are the twin's, in its order, on the same
 * correctly rounded conversions, so the result is the twin's bit for bit.
 */
static PyObject *
k_infrastructure_giant_step(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t D64, r64, a64, b64, a264, b264;
    i128 D, r, a, b, a2, b2, a3, b3, d, two_a, bt, n, t, g, x1, y1, x2, w, s, inv, k, sum;
    double sq, prod;
    int bad = 0;
    const i128 limit = (i128)1 << 31;
    if (check_nargs(nargs, 7, "infrastructure_giant_step") < 0 || get_i64(args[0], &D64, "D") < 0 ||
        get_i64(args[1], &r64, "r") < 0 || get_i64(args[3], &a64, "a") < 0 || get_i64(args[4], &b64, "b") < 0 ||
        get_i64(args[5], &a264, "a2") < 0 || get_i64(args[6], &b264, "b2") < 0)
        return NULL;
    sq = PyFloat_AsDouble(args[2]);
    if (sq == -1.0 && PyErr_Occurred())
        return NULL;
    D = D64, r = r64, a = a64, b = b64, a2 = a264, b2 = b264;
    if (D <= 0 || D > MAX_WORD || r < 0 || r >= limit || a <= 0 || a >= limit || a2 <= 0 || a2 >= limit ||
        abs128(b) >= 2 * limit || abs128(b2) >= 2 * limit) {
        PyErr_SetString(PyExc_OverflowError, "the compiled giant step takes D < 2^62 and norms below 2^31");
        return NULL;
    }
    xgcd128(a, a2, &g, &x1, &y1);
    if (g == 1) {
        a3 = a * a2;
        if (a > 1) {
            i128 gi, ui, vi;
            xgcd128(floormod(a2, a), a, &gi, &ui, &vi); /* pow(a2, -1, a) */
            inv = floormod(ui, a);
            k = floormod(floordiv(b - b2, 2) * inv, a);
        } else {
            k = 0;
        }
        b3 = b2 + 2 * a2 * k;
        d = 1;
    } else {
        s = floordiv(b + b2, 2);
        xgcd128(g, s, &d, &x2, &w);
        a3 = floordiv(a * a2, d * d);
        sum = mul_c(mul_c(mul_c(x1, x2, &bad), a, &bad), b2, &bad);
        sum = add_c(sum, mul_c(mul_c(mul_c(y1, x2, &bad), a2, &bad), b, &bad), &bad);
        sum = add_c(sum, mul_c(w, floordiv(b * b2 + D, 2), &bad), &bad);
        if (bad)
            return overflow();
        b3 = floormod(floordiv(sum, d), 2 * a3);
    }
    prod = (double)d; /* a a2 / (d a3) = d exactly */
    a = a3, b = b3;
    while (a > r) { /* norms fall by a factor >= 4 per step */
        two_a = 2 * a;
        bt = floormod(b, two_a);
        if (bt > a)
            bt -= two_a;
        n = D - bt * bt;
        if (bt >= 0)
            prod *= (double)two_a / ((double)bt + sq);
        else
            prod *= (sq - (double)bt) * (double)two_a / (double)abs128(n);
        a = floordiv(abs128(n), 2 * two_a), b = -bt;
    }
    for (;;) {
        two_a = 2 * a;
        b = r - floormod(r - b, two_a);
        t = two_a - b;
        if (t < 0 || t * t < D)
            return Py_BuildValue("(LLd)", (long long)a, (long long)b, log(prod));
        n = D - b * b;
        if (b >= 0)
            prod *= (double)two_a / ((double)b + sq);
        else
            prod *= (sq - (double)b) * (double)two_a / (double)n;
        a = floordiv(n, 2 * two_a), b = -b;
    }
}

/* ------------------------------------------------------------------ */
/* module                                                              */
/* ------------------------------------------------------------------ */

static PyMethodDef methods[] = {
    {"principal_half_cycle", (PyCFunction)(void (*)(void))k_principal_half_cycle, METH_FASTCALL,
     "Walk the continued fraction of omega to the symmetry point of the principal cycle."},
    {"principal_period", (PyCFunction)(void (*)(void))k_principal_period, METH_FASTCALL,
     "Period length, parity and q_mid of the principal cycle."},
    {"principal_regulator", (PyCFunction)(void (*)(void))k_principal_regulator, METH_FASTCALL,
     "The half-cycle walk with the regulator accumulated in long double, with an error bound."},
    {"convergent_leaves", (PyCFunction)(void (*)(void))k_convergent_leaves, METH_FASTCALL,
     "Exact products of [[a, 1], [1, 0]] over blocks of chunk partial quotients."},
    {"kronecker_symbols", (PyCFunction)(void (*)(void))k_kronecker_symbols, METH_FASTCALL,
     "The Kronecker symbols (a/n) for a sequence of moduli n."},
    {"form_rho_b", (PyCFunction)(void (*)(void))k_form_rho_b, METH_FASTCALL,
     "The normalised middle coefficient of the rho step."},
    {"form_is_reduced", (PyCFunction)(void (*)(void))k_form_is_reduced, METH_FASTCALL,
     "Whether (a, b, *) is reduced: |sqrt D - 2|a|| < b < sqrt D."},
    {"form_reduce", (PyCFunction)(void (*)(void))k_form_reduce, METH_FASTCALL,
     "Apply rho until the form is reduced."},
    {"form_cycle", (PyCFunction)(void (*)(void))k_form_cycle, METH_FASTCALL,
     "The rho cycle of a reduced form, or None beyond max_steps."},
    {"extended_gcd", (PyCFunction)(void (*)(void))k_extended_gcd, METH_FASTCALL,
     "(g, u, v) with u x + v y = g = gcd(x, y) >= 0."},
    {"form_compose", (PyCFunction)(void (*)(void))k_form_compose, METH_FASTCALL,
     "Dirichlet composition of two forms of discriminant D (not reduced)."},
    {"prime_form_b", (PyCFunction)(void (*)(void))k_prime_form_b, METH_FASTCALL,
     "The b (0 <= b <= p) of a primitive form (p, b, c) of discriminant D, or -1."},
    {"form_class_candidates", (PyCFunction)(void (*)(void))k_form_class_candidates, METH_FASTCALL,
     "Generators of the narrow class group: J, then forms of prime-power norm q with 4q^2 < D."},
    {"form_class_table", (PyCFunction)(void (*)(void))k_form_class_table, METH_FASTCALL,
     "All narrow classes of D reached from the principal cycle by the candidates, or None."},
    {"form_class_numbers", (PyCFunction)(void (*)(void))k_form_class_numbers, METH_FASTCALL,
     "(h+, 1 if (-1, b0, c0) is principal else 0) from the cycles of reduced forms, or None."},
    {"infrastructure_baby_steps", (PyCFunction)(void (*)(void))k_infrastructure_baby_steps, METH_FASTCALL,
     "Up to count baby steps (rho) on reduced principal ideals, with binary64 distances."},
    {"infrastructure_giant_step", (PyCFunction)(void (*)(void))k_infrastructure_giant_step, METH_FASTCALL,
     "reduce([a, b][a2, b2]) on reduced principal ideals, with the distance change."},
    {"form_compose_reduce", (PyCFunction)(void (*)(void))k_form_compose_reduce, METH_FASTCALL,
     "Dirichlet composition of two forms of discriminant D, reduced."},
    {NULL, NULL, 0, NULL},
};

static struct PyModuleDef module = {
    PyModuleDef_HEAD_INIT, "_ckernels", "realquad's compiled word-size kernels (see _pure.py for the twins).", -1,
    methods,
};

PyMODINIT_FUNC
PyInit__ckernels(void)
{
    PyObject *m = PyModule_Create(&module);
    if (m == NULL)
        return NULL;
    if (PyModule_AddObject(m, "MAX_CFRAC_DISCRIMINANT", PyLong_FromLongLong(MAX_CFRAC)) < 0 ||
        PyModule_AddObject(m, "MAX_WORD_DISCRIMINANT", PyLong_FromLongLong(MAX_WORD)) < 0 ||
        PyModule_AddIntConstant(m, "LONG_DOUBLE_MANTISSA_BITS", LDBL_MANT_DIG) < 0) {
        Py_DECREF(m);
        return NULL;
    }
    return m;
}
