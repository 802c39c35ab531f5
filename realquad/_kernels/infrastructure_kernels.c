/*
 * Infrastructure kernels: baby steps and the giant step on reduced principal
 * ideals, with their distances.
 */
#include "kernels.h"

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

PyObject *
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
PyObject *
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
