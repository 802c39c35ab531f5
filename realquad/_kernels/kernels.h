/*
 * realquad._kernels._ckernels: the compiled word-size kernels.
 *
 * Each kernel (declared at the end of this header) is the compiled counterpart
 * of the function of the same name in the twin (the .py file of the same name as the .c file) and returns the same results
 * (principal_regulator: the same quantity with its own rigorous error bound,
 * see cfrac_kernels.c). Every integer is range-checked: an argument or a
 * result outside the range a kernel handles raises OverflowError, and the
 * Python caller falls back to the pure twin; nothing overflows silently.
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
 *
 * The sources, compiled into the one extension module realquad._kernels._ckernels:
 * kernels.h (this file: common includes, argument and overflow helpers, floor
 * division, checked __int128 arithmetic, Euclid, rho, prototypes);
 * cfrac_kernels.c (principal_*, convergent_leaves); character_kernels.c
 * (kronecker_symbols); form_kernels.c (form_*, extended_gcd, composition);
 * prime_form_kernels.c (prime forms, square roots mod p, class candidates);
 * class_kernels.c (class numbers, relations and table: cycles of reduced
 * forms in a hash table); definite_kernels.c (positive definite forms: reduction,
 * composition, the class group of D < 0 by one reduced form per class; shares definite.h
 * with definite_structure_kernels.c, the structures of many class groups whose orders are
 * known); survey_kernels.c (survey_numbers: many fields per
 * call); infrastructure_kernels.c (baby and giant steps, the baby-step table
 * and the giant-step search); sieve_kernels.c (sieve_family: a family of
 * sieve polynomials, the hot loop of the relation search); elimination_kernels.c
 * (eliminate_rows: structured Gaussian elimination of the relation matrix); _ckernels.c (the
 * method table and the module).
 */
#ifndef REALQUAD_KERNELS_H
#define REALQUAD_KERNELS_H

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

/* Functions shared between the kernel sources: not exported from the module's shared object. */
#if defined(__GNUC__)
#define KERNEL_PRIVATE __attribute__((visibility("hidden")))
#else
#define KERNEL_PRIVATE
#endif

/* ------------------------------------------------------------------ */
/* argument helpers                                                    */
/* ------------------------------------------------------------------ */

static inline int
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
static inline int
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

static inline int
check_nargs(Py_ssize_t nargs, Py_ssize_t want, const char *name)
{
    if (nargs != want) {
        PyErr_Format(PyExc_TypeError, "%s() takes exactly %zd arguments (%zd given)", name, want, nargs);
        return -1;
    }
    return 0;
}

static inline PyObject *
i128_to_py(i128 v)
{
    if (v < (i128)INT64_MIN || v > (i128)INT64_MAX) {
        PyErr_SetString(PyExc_OverflowError, "a result is outside the compiled kernels' 64-bit range");
        return NULL;
    }
    return PyLong_FromLongLong((long long)v);
}

static inline int
fits_i64(i128 v)
{
    return v >= (i128)INT64_MIN && v <= (i128)INT64_MAX;
}

static inline PyObject *
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

static inline uint64_t
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
/* modular arithmetic and Euclid on words (prime forms, survey)        */
/* ------------------------------------------------------------------ */

static inline uint64_t
mulmod_u64(uint64_t a, uint64_t b, uint64_t m)
{
    return (uint64_t)((u128)a * b % m);
}

/* b^e mod m; below 2^32 the products fit a word and need no 128-bit division. */
static inline uint64_t
powmod(uint64_t b, uint64_t e, uint64_t m)
{
    uint64_t r = 1 % m;
    b %= m;
    if (m >> 32 == 0) {
        while (e) {
            if (e & 1)
                r = r * b % m;
            b = b * b % m;
            e >>= 1;
        }
        return r;
    }
    while (e) {
        if (e & 1)
            r = mulmod_u64(r, b, m);
        b = mulmod_u64(b, b, m);
        e >>= 1;
    }
    return r;
}

static inline uint64_t
gcd_u64(uint64_t x, uint64_t y)
{
    while (y) {
        uint64_t t = x % y;
        x = y, y = t;
    }
    return x;
}

static inline int64_t
gcd64(int64_t x, int64_t y)
{
    return (int64_t)gcd_u64((uint64_t)(x < 0 ? -x : x), (uint64_t)(y < 0 ? -y : y));
}

/* ------------------------------------------------------------------ */
/* binary quadratic forms: rho (form and class kernels)                */
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

/* Apply rho until (a, b, c) is reduced (checking for signals now and then); -1 on error. */
static inline int
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

/* extended_gcd of the twins, step for step (floor divmod); inputs |x|, |y| < 2^126. */
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

static inline void
xgcd128(i128 x, i128 y, i128 *g, i128 *u, i128 *v)
{
    if (SMALL62(x) && SMALL62(y)) /* Bezout factors stay below max(|x|, |y|): int64 suffices */
        XGCD_BODY(int64_t, floordiv64);
    else
        XGCD_BODY(i128, floordiv);
}

/* form_compose of the twins on int64 inputs (form_kernels.c); -1 with an exception set on failure. */
KERNEL_PRIVATE int
compose(int64_t a1, int64_t b1, int64_t a2, int64_t b2, int64_t D, int64_t *Ao, int64_t *Bo, int64_t *Co);

/* ------------------------------------------------------------------ */
/* the kernels (METH_FASTCALL), one section per source file            */
/* ------------------------------------------------------------------ */

#define KERNEL(name) KERNEL_PRIVATE PyObject *name(PyObject *self, PyObject *const *args, Py_ssize_t nargs)

/* cfrac_kernels.c */
KERNEL(k_principal_half_cycle);
KERNEL(k_principal_period);
KERNEL(k_principal_regulator);
KERNEL(k_convergent_leaves);
/* character_kernels.c */
KERNEL(k_kronecker_symbols);
KERNEL_PRIVATE int kronecker_i64(int64_t a, int64_t n);
/* form_kernels.c */
KERNEL(k_form_rho_b);
KERNEL(k_form_is_reduced);
KERNEL(k_form_reduce);
KERNEL(k_form_cycle);
KERNEL(k_extended_gcd);
KERNEL(k_form_compose);
KERNEL(k_form_compose_reduce);
/* prime_form_kernels.c */
KERNEL(k_prime_form_b);
KERNEL(k_form_class_candidates);
/* class_kernels.c */
KERNEL(k_form_class_numbers);
KERNEL(k_form_class_table);
KERNEL(k_form_class_relations);
/* prime_form_kernels.c: the candidates of the class walks */
KERNEL_PRIVATE int prime_array(PyObject *primes, int64_t **out, Py_ssize_t *len);
KERNEL_PRIVATE int candidates(int64_t D, int64_t conductor, const int64_t *primes, Py_ssize_t len, int lift,
                              int64_t **out, int64_t *count);
KERNEL_PRIVATE int64_t prime_b(int64_t D, int64_t p);
KERNEL_PRIVATE int class_kernel_args(PyObject *const *args, int64_t *D, int64_t *conductor);
KERNEL_PRIVATE int class_numbers_core(int64_t D, int64_t conductor, const int64_t *primes, Py_ssize_t nprimes,
                                      int64_t max_forms, int64_t *h_plus, int *j_principal);
/* definite_kernels.c */
KERNEL(k_definite_reduce);
KERNEL(k_definite_compose_reduce);
KERNEL(k_definite_class_candidates);
KERNEL(k_definite_class_table);
KERNEL(k_definite_class_relations);
KERNEL(k_definite_class_number);
KERNEL(k_definite_structures);
/* survey_kernels.c */
KERNEL(k_survey_numbers);
/* infrastructure_kernels.c */
KERNEL(k_infrastructure_baby_steps);
KERNEL(k_infrastructure_giant_step);
/* infrastructure_kernels.c: the baby-step table and the giant-step search */
KERNEL(k_infrastructure_table_new);
KERNEL(k_infrastructure_table_size);
KERNEL(k_infrastructure_table_get);
KERNEL(k_infrastructure_table_extend);
KERNEL(k_infrastructure_giant_search);
/* sieve_kernels.c */
KERNEL(k_sieve_family);
/* elimination_kernels.c */
KERNEL(k_eliminate_rows);

#undef KERNEL

#endif /* REALQUAD_KERNELS_H */
