/*
 * Binary quadratic form kernels: rho, reduction, cycles, the extended gcd and
 * Dirichlet composition (Cohen, Def. 5.4.6; Buchmann and Vollmer, ch. 6).
 */
#include "kernels.h"

/* ------------------------------------------------------------------ */
/* binary quadratic forms                                              */
/* ------------------------------------------------------------------ */

PyObject *
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

PyObject *
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

PyObject *
k_form_reduce(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t a, b, c, D, r;
    if (check_nargs(nargs, 5, "form_reduce") < 0 || get_form(args, &a, &b, &c, &D, &r) < 0)
        return NULL;
    if (reduce_form(&a, &b, &c, D, r) < 0)
        return NULL;
    return Py_BuildValue("(LLL)", (long long)a, (long long)b, (long long)c);
}

PyObject *
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

PyObject *
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

/* form_compose of form_kernels.py on int64 inputs; -1 with an exception set on failure. */
int
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

PyObject *
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

PyObject *
k_form_compose_reduce(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    int64_t a1, b1, a2, b2, D, r, A, B, C;
    if (check_nargs(nargs, 6, "form_compose_reduce") < 0 || get_i64(args[0], &a1, "a1") < 0 ||
        get_i64(args[1], &b1, "b1") < 0 || get_i64(args[2], &a2, "a2") < 0 || get_i64(args[3], &b2, "b2") < 0 ||
        get_i64(args[4], &D, "D") < 0 || get_i64(args[5], &r, "r") < 0)
        return NULL;
    if (compose(a1, b1, a2, b2, D, &A, &B, &C) < 0)
        return NULL;
    if (reduce_form(&A, &B, &C, D, r) < 0)
        return NULL;
    return Py_BuildValue("(LLL)", (long long)A, (long long)B, (long long)C);
}
