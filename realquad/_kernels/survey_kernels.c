/*
 * Survey kernels: the numbers behind one survey row for many fields in one
 * call (survey_numbers of survey_kernels.py), so a chunk of fields costs one trip
 * from Python: the prime signature of the discriminant, the narrow class
 * number with the sign of the unit (class_kernels.c) and the regulator walk
 * (cfrac_kernels.c).
 */
#include "kernels.h"

/* Miller-Rabin to the first twelve prime bases: exact below 3.18 * 10^23
   (Sorenson and Webster, Math. Comp. 86 (2017), the bound psi_12; from
   memory), so for every n < 2^64. */
static int
is_prime_u64(uint64_t n)
{
    static const uint64_t bases[12] = {2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37};
    uint64_t d = n - 1, x;
    int s = 0, i, k;
    if (n < 2)
        return 0;
    for (i = 0; i < 12; i++)
        if (n % bases[i] == 0)
            return n == bases[i];
    while (d % 2 == 0)
        d /= 2, s++;
    for (i = 0; i < 12; i++) {
        x = powmod(bases[i], d, n);
        if (x == 1 || x == n - 1)
            continue;
        for (k = 1; k < s; k++) {
            x = mulmod_u64(x, x, n);
            if (x == n - 1)
                break;
        }
        if (k == s)
            return 0;
    }
    return 1;
}

/* A proper factor of the odd composite n (Pollard rho, Brent's cycle finding). */
static uint64_t
proper_factor(uint64_t n)
{
    uint64_t c, x, y, g, q, ys, k, i, m = 64, len;
    for (c = 1;; c++) {
        y = 2, g = 1, q = 1, x = 2, ys = 2;
        for (len = 1; g == 1; len *= 2) {
            x = y;
            for (i = 0; i < len; i++)
                y = (mulmod_u64(y, y, n) + c) % n;
            for (k = 0; k < len && g == 1; k += m) {
                ys = y;
                for (i = 0; i < m && i < len - k; i++) {
                    y = (mulmod_u64(y, y, n) + c) % n;
                    q = mulmod_u64(q, x > y ? x - y : y - x, n);
                }
                g = gcd_u64(q, n);
            }
        }
        if (g == n) /* the batch overshot: retrace one step at a time */
            do {
                ys = (mulmod_u64(ys, ys, n) + c) % n;
                g = gcd_u64(x > ys ? x - ys : ys - x, n);
            } while (g == 1);
        if (g != n)
            return g;
    }
}

/*
 * The number t of primes dividing D = disc Q(sqrt d) (d > 1 squarefree) and
 * whether none of them is 3 (mod 4), as _prime_signature of survey_kernels.py: trial
 * division of the odd part m of d while p^3 <= m, after which m has at most two
 * prime factors; a composite m = 1 (mod 4) is split by Pollard rho.
 */
static void
prime_signature(int64_t d, int *t, int *no_three)
{
    int64_t m = d % 2 ? d : d / 2, p;
    *t = d % 4 != 1, *no_three = 1; /* D = 4d: the prime 2 */
    for (p = 3; p * p * p <= m; p += 2)
        if (m % p == 0) {
            m /= p, ++*t;
            if (p % 4 == 3)
                *no_three = 0;
        }
    if (m == 1)
        return;
    if (is_prime_u64((uint64_t)m)) {
        ++*t;
        if (m % 4 == 3)
            *no_three = 0;
    } else if (m % 4 == 3) { /* two primes, exactly one = 3 (mod 4) */
        *t += 2, *no_three = 0;
    } else { /* two primes, both 1 or both 3 (mod 4) */
        *t += 2;
        if (proper_factor((uint64_t)m) % 4 == 3)
            *no_three = 0;
    }
}

/* survey_numbers of survey_kernels.py. */
PyObject *
k_survey_numbers(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    PyObject *seq = NULL, *out = NULL, *walk_args[2] = {NULL, NULL};
    int64_t *primes = NULL, max_forms, d, D, h_plus;
    Py_ssize_t nprimes, n, i;
    int t, no_three, j, done;
    if (check_nargs(nargs, 4, "survey_numbers") < 0 || get_limit(args[3], &max_forms) < 0)
        return NULL;
    seq = PySequence_Fast(args[0], "radicands must be a sequence");
    if (seq == NULL || prime_array(args[1], &primes, &nprimes) < 0)
        goto fail;
    n = PySequence_Fast_GET_SIZE(seq);
    out = PyList_New(n);
    if (out == NULL)
        goto fail;
    walk_args[1] = args[2];
    for (i = 0; i < n; i++) {
        PyObject *item, *walk;
        if (get_i64(PySequence_Fast_GET_ITEM(seq, i), &d, "a radicand") < 0)
            goto fail;
        if (d < 2 || d > (MAX_WORD >> 2)) {
            PyErr_SetString(d < 2 ? PyExc_ValueError : PyExc_OverflowError,
                            d < 2 ? "a radicand must be at least 2" : "the survey kernel takes d < 2^60");
            goto fail;
        }
        D = d % 4 == 1 ? d : 4 * d;
        prime_signature(d, &t, &no_three);
        done = class_numbers_core(D, 1, primes, nprimes, max_forms, &h_plus, &j);
        if (done < 0)
            goto fail;
        if (done == 0) {
            Py_INCREF(Py_None);
            PyList_SET_ITEM(out, i, Py_None);
            continue;
        }
        walk_args[0] = PyLong_FromLongLong((long long)D);
        if (walk_args[0] == NULL)
            goto fail;
        walk = k_principal_regulator(NULL, walk_args, 2);
        Py_CLEAR(walk_args[0]);
        if (walk == NULL)
            goto fail;
        item = Py_BuildValue("(LiiLiN)", (long long)D, t, no_three, (long long)h_plus, j, walk);
        if (item == NULL)
            goto fail;
        PyList_SET_ITEM(out, i, item);
        if ((i & 63) == 63 && PyErr_CheckSignals() < 0)
            goto fail;
    }
    Py_DECREF(seq);
    PyMem_Free(primes);
    return out;
fail:
    Py_XDECREF(seq);
    Py_XDECREF(out);
    PyMem_Free(primes);
    return NULL;
}
