/*
 * Infrastructure kernels: baby steps and the giant step on reduced principal
 * ideals, with their distances.
 */
#include "kernels.h"

#if defined(__linux__)
#include <sys/mman.h>
#endif

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

/* ------------------------------------------------------------------ */
/* infrastructure: one rho step on int64 (a, b, c), b^2 - 4ac = D     */
/* ------------------------------------------------------------------ */

/* For a reduced ideal [a, (b + sqrt D)/2] of D < 2^106: a <= r < 2^53, |b| <= r
   and c = (b^2 - D)/(4a) = -(the next norm), |c| < sqrt D. The rho step
   b~ = b - 2aq (q = floor((b + r)/2a)), a' = (D - b~^2)/(4a) = -(c - q(b - aq)),
   b' = -b~, c' = -a keeps every value below 2^54: no division of 128-bit numbers.
   The distance added is the twin's, bit for bit (a, b below 2^53 convert exactly). */
static inline double
ideal_rho_step(int64_t r, double sq, int64_t *a, int64_t *b, int64_t *c)
{
    int64_t two_a = 2 * *a, q = floordiv64(*b + r, two_a), bt = *b - two_a * q;
    int64_t a1 = -(*c - q * (*b - *a * q));
    *c = -*a;
    *a = a1;
    *b = -bt;
    if (*b >= 0)
        return log(((double)*b + sq) / (double)(2 * a1));
    return log((double)two_a / (sq - (double)*b));
}

/* (hi, lo) += x as an unevaluated double-double sum (TwoSum, then FastTwoSum), in the
   twin's order of operations: the running distance loses no bits to rounding. */
static inline void
dd_add(double *hi, double *lo, double x)
{
    double s = *hi + x, bp = s - *hi, e = (*hi - (s - bp)) + (x - bp), t;
    *lo += e;
    t = s + *lo;
    *lo -= t - s;
    *hi = t;
}

PyObject *
k_infrastructure_baby_steps(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    i128 D, r, a128, b128;
    int64_t a, b, c, width, count, k;
    double sq, dist;
    PyObject *keys = NULL, *dists = NULL, *item;
    int back = 0;
    if (check_nargs(nargs, 7, "infrastructure_baby_steps") < 0 || get_i128(args[0], &D, "D") < 0 ||
        get_i128(args[1], &r, "r") < 0 || get_i128(args[3], &a128, "a") < 0 || get_i128(args[4], &b128, "b") < 0 ||
        get_limit(args[6], &count) < 0)
        return NULL;
    sq = PyFloat_AsDouble(args[2]);
    if (sq == -1.0 && PyErr_Occurred())
        return NULL;
    dist = PyFloat_AsDouble(args[5]);
    if (dist == -1.0 && PyErr_Occurred())
        return NULL;
    if (D <= 0 || D >= ((i128)1 << INFRA_BITS) || r < 0 || r >= ((i128)1 << 53) || a128 <= 0 || a128 > r ||
        b128 < -r || b128 > r) {
        PyErr_SetString(PyExc_OverflowError, "the compiled baby steps take D < 2^106 and reduced ideals");
        return NULL;
    }
    a = (int64_t)a128, b = (int64_t)b128;
    c = (int64_t)floordiv(b128 * b128 - D, 4 * a128);
    keys = PyList_New(0);
    dists = PyList_New(0);
    if (keys == NULL || dists == NULL)
        goto fail;
    width = 2 * (int64_t)r + 2;
    for (k = 0; k < count; k++) {
        dist += ideal_rho_step((int64_t)r, sq, &a, &b, &c);
        if (a == 1) {
            back = 1;
            break;
        }
        item = py_from_i128((i128)a * width + b);
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
    return Py_BuildValue("(NNLLdi)", keys, dists, (long long)a, (long long)b, dist, back);
fail:
    Py_XDECREF(keys);
    Py_XDECREF(dists);
    return NULL;
}

/* ------------------------------------------------------------------ */
/* infrastructure: the giant step for D < 2^106                        */
/* ------------------------------------------------------------------ */

/*
 * infrastructure_giant_step of infrastructure_kernels.py for D < 2^106 and ideals with a, a2 < 2^53,
 * |b|, |b2| < 2^54 (every reduced ideal). The composition gives a3 = a a2/d^2 < 2^106
 * and b3 < 2^108; the reduction walks the form (a, b, c), b^2 - 4ac = D, whose
 * coefficients all stay below 2^108: c is updated by c + k(b + ak) under b -> b + 2ak
 * (the product k(b + ak) is a difference of two such c), and only the first c,
 * (b3^2 - D)/(4 a3), needs 256 bits (an exact division, done modulo 2^128). The
 * integers are the twin's (the ideal is unique); the float operations are the twin's,
 * in its order, on the same correctly rounded conversions, so the distance change is
 * the twin's bit for bit.
 */

#define INFRA_IDEAL_BITS 53

typedef struct {
    i128 D;
    int64_t r;
    double sq;
} infra_field;

/* The full product |x| |y| as (hi, lo), 128 bits each. */
static void
mul_u256(u128 x, u128 y, u128 *hi, u128 *lo)
{
    u128 x0 = (uint64_t)x, x1 = x >> 64, y0 = (uint64_t)y, y1 = y >> 64;
    u128 p00 = x0 * y0, p01 = x0 * y1, p10 = x1 * y0, p11 = x1 * y1;
    u128 mid = (p00 >> 64) + (uint64_t)p01 + (uint64_t)p10;
    *lo = (mid << 64) | (uint64_t)p00;
    *hi = p11 + (p01 >> 64) + (p10 >> 64) + (mid >> 64);
}

/* (x^2 - D)/m for m > 0 dividing x^2 - D, |x| < 2^127, the quotient below 2^126 in size:
   shift out the power of 2 of m, then multiply by the inverse of its odd part modulo 2^128. */
static i128
exact_quotient(i128 x, i128 D, i128 m)
{
    u128 hi, lo, inv, odd;
    int negative, e = 0;
    u128 ax = (u128)abs128(x);
    mul_u256(ax, ax, &hi, &lo);
    /* x^2 - D in sign and magnitude (D > 0, below 2^127) */
    if (hi == 0 && lo < (u128)D) {
        negative = 1;
        lo = (u128)D - lo;
    } else {
        negative = 0;
        if (lo < (u128)D)
            hi -= 1;
        lo -= (u128)D;
    }
    odd = (u128)m;
    while ((odd & 1) == 0) {
        odd >>= 1;
        e++;
    }
    if (e > 0)
        lo = (lo >> e) | (hi << (128 - e));
    inv = odd; /* odd * odd = 1 (mod 8); each Newton step doubles the correct bits */
    for (int k = 0; k < 6; k++)
        inv *= 2 - odd * inv;
    lo *= inv;
    return negative ? -(i128)lo : (i128)lo;
}

/* floor(x / y) for y > 0 when the quotient is small: a float estimate corrected exactly. */
/* x as a double, correctly rounded (round to nearest, ties to even) as Python's float(x):
   above 64 bits the bits shifted out are kept as a sticky bit below the 53 that remain. */
static inline double
i128_to_double(i128 x)
{
    u128 u;
    uint64_t hi, m;
    int shift;
    union {
        uint64_t bits;
        double d;
    } scale;
    if (x >= INT64_MIN && x <= INT64_MAX)
        return (double)(int64_t)x;
    u = x < 0 ? -(u128)x : (u128)x;
    hi = (uint64_t)(u >> 64);
    if (hi == 0)
        return x < 0 ? -(double)(uint64_t)u : (double)(uint64_t)u;
    shift = 64 - __builtin_clzll(hi);
    m = (uint64_t)(u >> shift) | (uint64_t)((u & (((u128)1 << shift) - 1)) != 0);
    scale.bits = (uint64_t)(1023 + shift) << 52;
    return (x < 0 ? -(double)m : (double)m) * scale.d;
}

/* x as a double, roughly (for estimates only). */
static inline double
i128_estimate(i128 x)
{
    return (double)(int64_t)(x >> 64) * 0x1p64 + (double)(uint64_t)x;
}

static inline i128
floor_quotient(i128 x, i128 y)
{
    double est = i128_estimate(x) / i128_estimate(y);
    i128 q, m;
    if (!(est > -0x1p50 && est < 0x1p50))
        return floordiv(x, y);
    q = (int64_t)est; /* truncated: off by at most one either way, corrected below */
    m = x - q * y;
    while (m < 0)
        m += y, q -= 1;
    while (m >= y)
        m -= y, q += 1;
    return q;
}

/* (g, u, v) with u x + v y = g = gcd(x, y), for 0 < x, y < 2^53: Euclid with each quotient
   from a double division (exact operands), corrected exactly — a 64-bit integer division
   costs several times more. The Bezout factors are the ones floor-quotient Euclid gives. */
static void
xgcd53(int64_t x, int64_t y, int64_t *g, int64_t *u, int64_t *v)
{
    int64_t X = x, Y = y, U0 = 1, V0 = 0, U1 = 0, V1 = 1, Q, R, T;
    while (Y != 0) {
        Q = (int64_t)((double)X / (double)Y);
        R = X - Q * Y;
        if (R < 0)
            R += Y, Q -= 1;
        else if (R >= Y)
            R -= Y, Q += 1;
        X = Y, Y = R;
        T = U0 - Q * U1, U0 = U1, U1 = T;
        T = V0 - Q * V1, V0 = V1, V1 = T;
    }
    *g = X, *u = U0, *v = V0;
}

/* reduce([a, b][a2, b2]); -1 with OverflowError set outside the ranges above. */
static int
giant_step_core(const infra_field *f, i128 a, i128 b, i128 a2, i128 b2, i128 *ao, i128 *bo, double *shift)
{
    const i128 D = f->D, r = f->r, lim = (i128)1 << INFRA_IDEAL_BITS;
    const double sq = f->sq;
    i128 g, y1, d, a3, b3, c, q, bt, ct, two_a, an;
    double prod;
    if (a <= 0 || a >= lim || a2 <= 0 || a2 >= lim || abs128(b) >= 2 * lim || abs128(b2) >= 2 * lim) {
        PyErr_SetString(PyExc_OverflowError, "the compiled giant step takes norms below 2^53");
        return -1;
    }
    {
        int64_t g64, x64, y64;
        xgcd53((int64_t)a, (int64_t)a2, &g64, &x64, &y64);
        g = g64, y1 = y64;
    }
    if (g == 1) {
        i128 k = 0;
        a3 = a * a2;
        if (a > 1) /* y1 a2 = 1 (mod a): y1 is pow(a2, -1, a) */
            k = floormod(floormod(floordiv(b - b2, 2), a) * floormod(y1, a), a);
        b3 = b2 + 2 * a2 * k;
        d = 1;
    } else {
        /* Cohen, Alg. 5.4.7, with every product reduced modulo v1 = a/d < 2^53 */
        i128 s = floordiv(b + b2, 2), n = b2 - s, c2, dd, x2, y2, v1, v2, rr, u1, v1b;
        xgcd128(a2, a, &dd, &u1, &v1b); /* u1 a2 + v1b a = dd = g */
        xgcd128(s, dd, &d, &x2, &y2);   /* x2 s + y2 dd = d */
        y2 = -y2;
        v1 = a / d;
        v2 = a2 / d;
        c2 = floordiv(b2 * b2 - D, 4 * a2);
        rr = floormod(floormod(u1, v1) * floormod(y2, v1), v1);
        rr = floormod(rr * floormod(n, v1) - floormod(x2, v1) * floormod(c2, v1), v1);
        b3 = b2 + 2 * v2 * rr;
        a3 = v1 * v2;
    }
    prod = i128_to_double(d); /* a a2 / (d a3) = d exactly */
    /* b3 centred modulo 2 a3 (the twin's first step does the same; the rest is invariant) */
    two_a = 2 * a3;
    b3 -= two_a * floor_quotient(b3 + a3 - 1, two_a);
    c = exact_quotient(b3, D, 4 * a3);
    a = a3, b = b3;
    while (a > r) { /* norms fall by a factor >= 4 per step */
        two_a = 2 * a;
        q = floor_quotient(b + a - 1, two_a); /* b~ = b - 2aq in (-a, a] */
        bt = b - two_a * q;
        ct = c - q * (b - a * q);
        an = ct < 0 ? -ct : ct;
        if (bt >= 0)
            prod *= i128_to_double(two_a) / (i128_to_double(bt) + sq);
        else
            prod *= (sq - i128_to_double(bt)) / i128_to_double(2 * an);
        c = ct < 0 ? -a : a;
        a = an, b = -bt;
    }
    for (;;) {
        two_a = 2 * a;
        q = floor_quotient(r - b, two_a); /* b -> r - ((r - b) mod 2a) = b + 2aq */
        c += q * (b + a * q);
        b += two_a * q;
        bt = two_a - b;
        if (bt < 0 || bt * bt < D) {
            *ao = a, *bo = b, *shift = log(prod);
            return 0;
        }
        an = -c; /* (D - b^2)/(4a) > 0: |b| < sqrt D here */
        if (b >= 0)
            prod *= i128_to_double(two_a) / (i128_to_double(b) + sq);
        else
            prod *= (sq - i128_to_double(b)) / i128_to_double(2 * an);
        c = -a;
        a = an, b = -b;
    }
}

static int
get_field(PyObject *D_obj, PyObject *r_obj, PyObject *sq_obj, infra_field *f, const char *what)
{
    i128 D, r;
    if (get_i128(D_obj, &D, "D") < 0 || get_i128(r_obj, &r, "r") < 0)
        return -1;
    f->sq = PyFloat_AsDouble(sq_obj);
    if (f->sq == -1.0 && PyErr_Occurred())
        return -1;
    if (D <= 0 || D >= ((i128)1 << INFRA_BITS) || r < 0 || r >= ((i128)1 << INFRA_IDEAL_BITS)) {
        PyErr_Format(PyExc_OverflowError, "the compiled %s takes D < 2^106", what);
        return -1;
    }
    f->D = D;
    f->r = (int64_t)r;
    return 0;
}

PyObject *
k_infrastructure_giant_step(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    infra_field f;
    i128 a, b, a2, b2, ao, bo;
    double shift;
    if (check_nargs(nargs, 7, "infrastructure_giant_step") < 0 || get_field(args[0], args[1], args[2], &f, "giant step") < 0 ||
        get_i128(args[3], &a, "a") < 0 || get_i128(args[4], &b, "b") < 0 || get_i128(args[5], &a2, "a2") < 0 ||
        get_i128(args[6], &b2, "b2") < 0)
        return NULL;
    if (giant_step_core(&f, a, b, a2, b2, &ao, &bo, &shift) < 0)
        return NULL;
    return Py_BuildValue("(LLd)", (long long)ao, (long long)bo, shift);
}

/* ------------------------------------------------------------------ */
/* infrastructure: the baby-step table and the giant-step search       */
/* ------------------------------------------------------------------ */

/*
 * An open-addressing hash table (linear probing) of reduced ideals (a, b) with their
 * distances, 24 bytes a slot, a = 0 marking a free slot; the number of slots is a power
 * of 2 and doubles when the table is 70 % full. It lives in a capsule; the twin's table
 * is a dict keyed by a (2r + 2) + b. Same contents, same answers.
 */

typedef struct {
    int64_t a, b;
    double d;
} infra_slot;

typedef struct {
    infra_field f;
    infra_slot *slots;
    uint64_t mask, count;
} infra_table;

#define INFRA_CAPSULE "realquad.infrastructure_table"
#define INFRA_MAX_LOAD 0.7
#define INFRA_PIPE 16

static inline uint64_t
slot_hash(int64_t a, int64_t b)
{
    uint64_t h = (uint64_t)a * 0x9E3779B97F4A7C15ULL ^ ((uint64_t)b * 0xC2B2AE3D27D4EB4FULL);
    h ^= h >> 31;
    h *= 0xD6E8FEB86659FD93ULL;
    return h ^ (h >> 32);
}

/* Slots come zeroed; large tables are mapped directly and asked for huge pages (on Linux),
   which spares most TLB misses of the random accesses. */
#define INFRA_MAPPED_BYTES ((size_t)1 << 21)

static infra_slot *
slots_alloc(uint64_t n)
{
#if defined(__linux__) && defined(MADV_HUGEPAGE)
    size_t bytes = (size_t)n * sizeof(infra_slot);
    if (bytes >= INFRA_MAPPED_BYTES) {
        void *p = mmap(NULL, bytes, PROT_READ | PROT_WRITE, MAP_PRIVATE | MAP_ANONYMOUS, -1, 0);
        if (p == MAP_FAILED)
            return NULL;
        (void)madvise(p, bytes, MADV_HUGEPAGE); /* a hint: no harm if refused */
        return p;
    }
#endif
    return PyMem_RawCalloc(n, sizeof(infra_slot));
}

static void
slots_free(infra_slot *p, uint64_t n)
{
    if (p == NULL)
        return;
#if defined(__linux__) && defined(MADV_HUGEPAGE)
    if ((size_t)n * sizeof(infra_slot) >= INFRA_MAPPED_BYTES) {
        munmap(p, (size_t)n * sizeof(infra_slot));
        return;
    }
#endif
    PyMem_RawFree(p);
}

static void
table_free(PyObject *capsule)
{
    infra_table *t = PyCapsule_GetPointer(capsule, INFRA_CAPSULE);
    if (t != NULL) {
        slots_free(t->slots, t->mask + 1);
        PyMem_RawFree(t);
    }
}

static infra_table *
get_table(PyObject *obj)
{
    return PyCapsule_GetPointer(obj, INFRA_CAPSULE); /* sets an exception on a wrong object */
}

static inline infra_slot *
table_find(const infra_table *t, int64_t a, int64_t b)
{
    uint64_t i = slot_hash(a, b) & t->mask;
    for (;;) {
        infra_slot *s = &t->slots[i];
        if (s->a == 0 || (s->a == a && s->b == b))
            return s;
        i = (i + 1) & t->mask;
    }
}

static int
table_resize(infra_table *t, uint64_t slots)
{
    infra_slot *old = t->slots, *fresh = slots_alloc(slots);
    uint64_t n = t->mask + 1, i;
    if (fresh == NULL) {
        PyErr_NoMemory();
        return -1;
    }
    t->slots = fresh;
    t->mask = slots - 1;
    if (old != NULL) {
        for (i = 0; i < n; i++)
            if (old[i].a != 0)
                *table_find(t, old[i].a, old[i].b) = old[i];
        slots_free(old, n);
    }
    return 0;
}

static inline int
table_put(infra_table *t, int64_t a, int64_t b, double d)
{
    infra_slot *s = table_find(t, a, b);
    if (s->a == 0) {
        if ((double)(t->count + 1) > INFRA_MAX_LOAD * (double)(t->mask + 1)) {
            if (table_resize(t, 2 * (t->mask + 1)) < 0)
                return -1;
            s = table_find(t, a, b);
        }
        t->count++;
        s->a = a, s->b = b;
    }
    s->d = d;
    return 0;
}

/* infrastructure_table_new(D, r, sq, capacity): a table for about capacity ideals, holding the order. */
PyObject *
k_infrastructure_table_new(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    infra_table *t;
    int64_t want;
    uint64_t slots = 1024;
    PyObject *capsule;
    if (check_nargs(nargs, 4, "infrastructure_table_new") < 0)
        return NULL;
    t = PyMem_RawCalloc(1, sizeof(infra_table));
    if (t == NULL)
        return PyErr_NoMemory();
    if (get_field(args[0], args[1], args[2], &t->f, "baby-step table") < 0 || get_limit(args[3], &want) < 0) {
        PyMem_RawFree(t);
        return NULL;
    }
    while (slots < ((uint64_t)1 << 40) && INFRA_MAX_LOAD * (double)slots < (double)want)
        slots *= 2;
    t->mask = 0; /* no slots yet */
    if (table_resize(t, slots) < 0) {
        PyMem_RawFree(t);
        return NULL;
    }
    /* the order itself, (1, b0) with b0 = r - ((r - D) mod 2), at distance 0 */
    table_put(t, 1, t->f.r - floormod64(t->f.r - (int64_t)(t->f.D & 1), 2), 0.0);
    capsule = PyCapsule_New(t, INFRA_CAPSULE, table_free);
    if (capsule == NULL) {
        slots_free(t->slots, t->mask + 1);
        PyMem_RawFree(t);
    }
    return capsule;
}

/* infrastructure_table_size(table): (ideals stored, bytes allocated). */
PyObject *
k_infrastructure_table_size(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    infra_table *t;
    if (check_nargs(nargs, 1, "infrastructure_table_size") < 0 || (t = get_table(args[0])) == NULL)
        return NULL;
    return Py_BuildValue("(KK)", (unsigned long long)t->count,
                         (unsigned long long)((t->mask + 1) * sizeof(infra_slot) + sizeof(infra_table)));
}

/* infrastructure_table_get(table, a, b): the stored distance of (a, b), or None. */
PyObject *
k_infrastructure_table_get(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    infra_table *t;
    int64_t a, b;
    infra_slot *s;
    if (check_nargs(nargs, 3, "infrastructure_table_get") < 0 || (t = get_table(args[0])) == NULL ||
        get_i64(args[1], &a, "a") < 0 || get_i64(args[2], &b, "b") < 0)
        return NULL;
    if (a <= 0 || a > t->f.r || b <= t->f.r - 2 * a || b > t->f.r) /* not a normalised reduced ideal */
        Py_RETURN_NONE;
    s = table_find(t, a, b);
    if (s->a == 0)
        Py_RETURN_NONE;
    return PyFloat_FromDouble(s->d);
}

/* infrastructure_table_extend(table, a, b, hi, lo, count): up to count baby steps from the
   reduced ideal (a, b) at distance hi + lo, storing each ideal passed with its distance hi;
   returns (a, b, hi, lo, back) as infrastructure_baby_steps does. */
PyObject *
k_infrastructure_table_extend(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    infra_table *t;
    int64_t a, b, c, count, k, i;
    double hi, lo;
    int back = 0;
    infra_slot pipe[INFRA_PIPE];
    if (check_nargs(nargs, 6, "infrastructure_table_extend") < 0 || (t = get_table(args[0])) == NULL ||
        get_i64(args[1], &a, "a") < 0 || get_i64(args[2], &b, "b") < 0 || get_limit(args[5], &count) < 0)
        return NULL;
    hi = PyFloat_AsDouble(args[3]);
    if (hi == -1.0 && PyErr_Occurred())
        return NULL;
    lo = PyFloat_AsDouble(args[4]);
    if (lo == -1.0 && PyErr_Occurred())
        return NULL;
    if (a <= 0 || a > t->f.r || b < -t->f.r || b > t->f.r) {
        PyErr_SetString(PyExc_OverflowError, "the compiled baby steps take reduced ideals");
        return NULL;
    }
    c = (int64_t)floordiv((i128)b * b - t->f.D, 4 * (i128)a);
    /* each ideal is stored INFRA_PIPE steps after it is found, its slot prefetched meanwhile;
       the order of the stores, and so the table, is unchanged */
    for (k = 0; k < count; k++) {
        infra_slot *due = &pipe[k % INFRA_PIPE];
        dd_add(&hi, &lo, ideal_rho_step(t->f.r, t->f.sq, &a, &b, &c));
        if (a == 1) {
            back = 1;
            break;
        }
        if (k >= INFRA_PIPE && table_put(t, due->a, due->b, due->d) < 0)
            return NULL;
        __builtin_prefetch(&t->slots[slot_hash(a, b) & t->mask], 1);
        due->a = a, due->b = b, due->d = hi;
        if ((k & 0xFFFFF) == 0xFFFFF && PyErr_CheckSignals() < 0)
            return NULL;
    }
    for (i = k > INFRA_PIPE ? k - INFRA_PIPE : 0; i < k; i++)
        if (table_put(t, pipe[i % INFRA_PIPE].a, pipe[i % INFRA_PIPE].b, pipe[i % INFRA_PIPE].d) < 0)
            return NULL;
    return Py_BuildValue("(LLddi)", (long long)a, (long long)b, hi, lo, back);
}

/*
 * infrastructure_giant_search(table, a, b, aG, bG, s, lo_step, hi_step, base, e0, e1,
 * clog, stop, budget, progress): giant steps (a, b) <- reduce((a, b)(aG, bG)) until one
 * meets the table, the search passes stop, or budget steps are made. Step j has distance
 * g = base + j s + C with C the sum of the distance changes c, C_error the sum of
 * ulp (|C| + clog); it is past stop when g - (e0 + j e1 + C_error + ulp g) > stop. Every
 * step length s + c must lie in (lo_step, hi_step). Returns (status, a, b, j, C, C_error,
 * found): status 0 budget spent, 1 (a, b) in the table at distance found, 2 its conjugate
 * in the table at distance found, 3 past stop, 4 a step length out of bounds.
 * progress(g) is called every 4096 steps, and Ctrl-C is seen as often.
 */
PyObject *
k_infrastructure_giant_search(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    infra_table *t;
    i128 a, b, aG, bG;
    int64_t budget, j = 0;
    i128 na = 0, nb = 0;
    double p[8], C = 0.0, C_error = 0.0, g, c, nc = 0.0, found = 0.0;
    const double ulp = DBL_EPSILON;
    int status = 0, i, ahead = 0;
    PyObject *progress;
    if (check_nargs(nargs, 15, "infrastructure_giant_search") < 0 || (t = get_table(args[0])) == NULL ||
        get_i128(args[1], &a, "a") < 0 || get_i128(args[2], &b, "b") < 0 || get_i128(args[3], &aG, "aG") < 0 ||
        get_i128(args[4], &bG, "bG") < 0 || get_limit(args[13], &budget) < 0)
        return NULL;
    for (i = 0; i < 8; i++) { /* s, lo_step, hi_step, base, e0, e1, clog, stop */
        p[i] = PyFloat_AsDouble(args[5 + i]);
        if (p[i] == -1.0 && PyErr_Occurred())
            return NULL;
    }
    progress = args[14];
    /* the step after the current one is computed while the current one's two slots are
       fetched from memory; it is used on the next turn, so the steps made are the same */
    while (j < budget) {
        infra_slot *hit;
        int64_t bc;
        if (ahead)
            a = na, b = nb, c = nc;
        else if (giant_step_core(&t->f, a, b, aG, bG, &a, &b, &c) < 0)
            return NULL;
        if (!(p[1] < p[0] + c && p[0] + c < p[2])) {
            status = 4;
            break;
        }
        j += 1;
        C += c;
        C_error += ulp * (fabs(C) + p[6]);
        g = p[3] + (double)j * p[0] + C;
        bc = t->f.r - floormod64(t->f.r + (int64_t)b, 2 * (int64_t)a);
        __builtin_prefetch(&t->slots[slot_hash((int64_t)a, (int64_t)b) & t->mask]);
        __builtin_prefetch(&t->slots[slot_hash((int64_t)a, bc) & t->mask]);
        ahead = j < budget;
        if (ahead && giant_step_core(&t->f, a, b, aG, bG, &na, &nb, &nc) < 0)
            return NULL;
        hit = table_find(t, (int64_t)a, (int64_t)b);
        if (hit->a != 0) {
            status = 1, found = hit->d;
            break;
        }
        hit = table_find(t, (int64_t)a, bc);
        if (hit->a != 0) {
            status = 2, found = hit->d;
            break;
        }
        if (g - (p[4] + (double)j * p[5] + C_error + ulp * g) > p[7]) {
            status = 3;
            break;
        }
        if ((j & 4095) == 0) {
            if (PyErr_CheckSignals() < 0)
                return NULL;
            if (progress != Py_None) {
                PyObject *res = PyObject_CallFunction(progress, "d", g);
                if (res == NULL)
                    return NULL;
                Py_DECREF(res);
            }
        }
    }
    return Py_BuildValue("(iLLLddd)", status, (long long)a, (long long)b, (long long)j, C, C_error, found);
}
