/*
 * Sieve kernels: sieve_family of sieve_kernels.py, the sieve of a family of
 * polynomials sharing their leading coefficient (self-initialising quadratic
 * sieve: polynomial k + 1 differs from polynomial k by one shift of every root).
 *
 * The arguments are checked and copied into C arrays once per call (one
 * allocation), the primes left in ordered by how they are sieved. Each keeps
 * the sieve offsets o = (r + M) mod p of its roots r, the index of the first
 * x = o - M with x = r (mod p); they move with the roots, o <- (o -+ shift)
 * mod p, in 32-bit words (o + shift < 2p < 2^32). Per polynomial the primes
 * p >= SIEVE_LARGE add their logarithm across the whole byte array in a fixed
 * number ceil(2M / p) of strides each (a stride past the end lands on a spare
 * byte: no mispredicted loop exits); the smaller ones block by block
 * (SIEVE_BLOCK bytes, inside the first-level data cache), carrying their next
 * positions from block to block; each block is then scanned sixteen bytes at
 * a time for sums >= threshold, and only for those x are the hits worked out:
 * (x + M) mod p against the offsets, for every prime left in, by a
 * multiply-and-shift remainder (D. Lemire, O. Kaser and N. Kurz, "Faster
 * remainder by direct computation", Software: Practice and Experience 49
 * (2019), the 32-bit case) instead of a division.
 *
 * Range (beyond it OverflowError, and the twin runs): for every prime left in
 * (roots1[j] >= 0), 1 <= p < 2^31, both roots in [0, p) and 0 <= logs[j] <= 255;
 * 1 <= M <= 2^26; shifts and roots within int64. Malformed input raises what
 * the twin raises: IndexError for roots1 shorter than primes, for logs, roots2
 * or a used row of shifts too short to reach a prime left in, and for a step
 * outside +-1 .. +-len(shifts) (0 picks the last row, as the twin's indexing
 * does); TypeError for what is not an integer; ValueError for a prime p <= 0
 * left in (the twin divides by zero or indexes outside its array). Longer
 * lists are read up to len(primes), as by the twin; a prime left out is not
 * read at all. As for the twin, the caller keeps every sum <= 255: the sums
 * are bytes.
 */
#include "kernels.h"

#define SIEVE_BLOCK ((uint32_t)1 << 15) /* bytes sieved at a time by the small primes */
#define SIEVE_LARGE ((uint32_t)1 << 13) /* the larger primes add across the whole array */
#define SIEVE_MAX_M ((int64_t)1 << 26)
#define SIEVE_MAX_PRIME ((int64_t)1 << 31)

/* A prime below SIEVE_LARGE: its next positions a < c (two roots) or a (one root). */
typedef struct {
    uint32_t p, a, c, lg;
} small_prime;

/* x mod p for x, p < 2^32 and magic = floor((2^64 - 1) / p) + 1 (Lemire, Kaser and Kurz). */
static inline uint32_t
fastmod32(uint32_t x, uint64_t magic, uint32_t p)
{
    return (uint32_t)(((u128)(magic * x) * p) >> 64);
}

static inline uint32_t
min_u32(uint32_t x, uint32_t y)
{
    return x < y ? x : y;
}

/* (o + add) mod p for o < p and add <= p: one subtraction chosen by a minimum (wraps when o + add < p). */
static inline uint32_t
add_mod(uint32_t o, uint32_t add, uint32_t p)
{
    uint32_t t = o + add;
    return min_u32(t, t - p);
}

/* The offsets of polynomial k + 1: each up by its shift sh (up) or down by it (up by p - sh), four
   at a time in vector words (where the target has them); o + add < 2p < 2^32. */
typedef uint32_t words4 __attribute__((vector_size(16)));

static void
move_roots(uint32_t *O1, uint32_t *O2, const uint32_t *P, const uint32_t *sh, uint32_t nu, int up)
{
    uint32_t t = 0;
    words4 p, a, o1, o2;
    for (; t + 4 <= nu; t += 4) {
        memcpy(&p, P + t, 16), memcpy(&a, sh + t, 16), memcpy(&o1, O1 + t, 16), memcpy(&o2, O2 + t, 16);
        if (!up)
            a = p - a;
        o1 += a, o2 += a;
        o1 -= p & (words4)(o1 >= p);
        o2 -= p & (words4)(o2 >= p);
        memcpy(O1 + t, &o1, 16), memcpy(O2 + t, &o2, 16);
    }
    for (; t < nu; t++) {
        uint32_t add = up ? sh[t] : P[t] - sh[t];
        O1[t] = add_mod(O1[t], add, P[t]);
        O2[t] = add_mod(O2[t], add, P[t]);
    }
}

/* A step -> the row l of shifts it uses and whether the roots move up (r + shift); -1 with IndexError. */
static int
step_row(PyObject *obj, Py_ssize_t nshifts, Py_ssize_t *l, int *up)
{
    int overflow = 0;
    long long v;
    PyObject *index = PyNumber_Index(obj);
    if (index == NULL)
        return -1;
    v = PyLong_AsLongLongAndOverflow(index, &overflow);
    Py_DECREF(index);
    if (v == -1 && PyErr_Occurred())
        return -1;
    if (overflow || v > (long long)nshifts || v < -(long long)nshifts || (v == 0 && nshifts == 0)) {
        PyErr_SetString(PyExc_IndexError, "a step names a row beyond the shifts");
        return -1;
    }
    /* r <- r + shift for a step -(l + 1), and for 0, which names shifts[-1] as in the twin */
    *up = v <= 0;
    *l = v == 0 ? nshifts - 1 : (Py_ssize_t)(v > 0 ? v : -v) - 1;
    return 0;
}

/* The threshold clamped to int64 (any integer is a threshold). */
static int
get_threshold(PyObject *obj, int64_t *out)
{
    int overflow = 0;
    long long v;
    PyObject *index = PyNumber_Index(obj);
    if (index == NULL)
        return -1;
    v = PyLong_AsLongLongAndOverflow(index, &overflow);
    Py_DECREF(index);
    if (overflow)
        v = overflow > 0 ? LLONG_MAX : LLONG_MIN;
    else if (v == -1 && PyErr_Occurred())
        return -1;
    *out = (int64_t)v;
    return 0;
}

/* Indices i in [start, end) with s[i] >= T, in increasing order, into cand; their count. Sixteen
   bytes are compared at a time (GCC and Clang vector extensions: SIMD where the target has it). */
typedef uint8_t bytes16 __attribute__((vector_size(16)));
typedef int8_t mask16 __attribute__((vector_size(16)));

static uint32_t
scan_block(const uint8_t *s, uint32_t start, uint32_t end, int64_t T, uint32_t *cand)
{
    uint32_t count = 0, i = start, q;
    bytes16 v[4], tv = (bytes16){0} + (uint8_t)(T > 0 && T < 256 ? T : 0);
    mask16 m;
    uint64_t any[2];
    if (T > 255)
        return 0;
    if (T <= 0) {
        for (; i < end; i++)
            cand[count++] = i;
        return count;
    }
    for (; i + 64 <= end; i += 64) {
        memcpy(v, s + i, 64);
        m = (mask16)(v[0] >= tv) | (mask16)(v[1] >= tv) | (mask16)(v[2] >= tv) | (mask16)(v[3] >= tv);
        memcpy(any, &m, 16);
        if ((any[0] | any[1]) == 0)
            continue;
        for (q = i; q < i + 64; q++)
            if (s[q] >= T)
                cand[count++] = q;
    }
    for (; i < end; i++)
        if (s[i] >= T)
            cand[count++] = i;
    return count;
}

/* The primes left in, by how they are sieved: small (p < SIEVE_LARGE) with two roots or one, larger with
   two roots or one (a fixed number of steps each, no branch), not sieved (logarithm 0). */
enum { SMALL_TWO, SMALL_ONE, LARGE_TWO, LARGE_ONE, UNSIEVED, KINDS };

static inline int
kind(uint32_t p, uint8_t lg, uint32_t o1, uint32_t o2)
{
    if (lg == 0)
        return UNSIEVED;
    return (p < SIEVE_LARGE ? SMALL_TWO : LARGE_TWO) + (o1 == o2);
}

/* Add lg at i, i + p, ... below S in `steps` = ceil(S / p) strides; a stride past the end lands on one
   of the 64 spare bytes after the array (spread, so that they form no chain of dependent additions). */
static inline void
sieve_large(uint8_t *sieve, uint32_t S, uint32_t i, uint32_t p, uint32_t steps, uint8_t lg, uint32_t spare)
{
    uint32_t m;
    for (m = 0; m < steps; m++, i += p)
        sieve[i < S ? i : spare] += lg;
}

/* sieve_family of sieve_kernels.py. */
PyObject *
k_sieve_family(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    PyObject *s_primes = NULL, *s_logs = NULL, *s_r1 = NULL, *s_r2 = NULL, *s_shifts = NULL,
             *s_steps = NULL, *row = NULL, *out = NULL;
    char *memory = NULL;
    int64_t M, T, v, r1, r2, p, lg;
    Py_ssize_t n, nlogs, nr2, nsteps, nshifts, nslots = 0, slot_bound, nu = 0, j, k, l, last_j = -1;
    uint32_t S, t, q, start, end, first[KINDS + 1] = {0}, fill[KINDS];
    /* the one allocation; the per-prime arrays are indexed in the order of kind (then of j) */
    uint64_t *magic;
    uint32_t *P, *O1, *O2, *J, *reach, *where, *scratch, *hits, *shift, *cand;
    int32_t *code, *slot_of;
    uint8_t *LG, *sieve;
    small_prime *sm;
    size_t total = 0;

    if (check_nargs(nargs, 8, "sieve_family") < 0 || get_i64(args[6], &M, "M") < 0 ||
        get_threshold(args[7], &T) < 0)
        return NULL;
    if (M < 1 || M > SIEVE_MAX_M) {
        PyErr_SetString(PyExc_OverflowError, "the compiled sieve takes 1 <= M <= 2^26");
        return NULL;
    }
    S = (uint32_t)(2 * M);
    s_primes = PySequence_Fast(args[0], "primes must be a sequence");
    s_logs = s_primes ? PySequence_Fast(args[1], "logs must be a sequence") : NULL;
    s_r1 = s_logs ? PySequence_Fast(args[2], "roots1 must be a sequence") : NULL;
    s_r2 = s_r1 ? PySequence_Fast(args[3], "roots2 must be a sequence") : NULL;
    s_shifts = s_r2 ? PySequence_Fast(args[4], "shifts must be a sequence") : NULL;
    s_steps = s_shifts ? PySequence_Fast(args[5], "steps must be a sequence") : NULL;
    if (s_steps == NULL)
        goto fail;
    n = PySequence_Fast_GET_SIZE(s_primes);
    nlogs = PySequence_Fast_GET_SIZE(s_logs);
    nr2 = PySequence_Fast_GET_SIZE(s_r2);
    nshifts = PySequence_Fast_GET_SIZE(s_shifts);
    nsteps = PySequence_Fast_GET_SIZE(s_steps);
    if (PySequence_Fast_GET_SIZE(s_r1) < n) {
        PyErr_SetString(PyExc_IndexError, "roots1 is shorter than primes");
        goto fail;
    }
    if (n >= ((Py_ssize_t)1 << 31) || nsteps >= ((Py_ssize_t)1 << 31) || nshifts >= ((Py_ssize_t)1 << 31)) {
        PyErr_SetString(PyExc_OverflowError, "the compiled sieve takes fewer than 2^31 primes and steps");
        goto fail;
    }
    slot_bound = nsteps < nshifts ? nsteps : nshifts;
    {
        /* the arrays of the one allocation: counts and widths, each part starting 64-aligned */
        enum { MAGIC, SM, AP, AO1, AO2, AJ, REACH, WHERE, SCRATCH, HITS, SHIFT, CAND, CODE, SLOT_OF, ALG, SIEVE,
               PARTS };
        const size_t count[PARTS] = {
            [MAGIC] = (size_t)n, [SM] = (size_t)n, [AP] = (size_t)n, [AO1] = (size_t)n, [AO2] = (size_t)n,
            [AJ] = (size_t)n, [REACH] = (size_t)n, [WHERE] = (size_t)n, [SCRATCH] = (size_t)n, [HITS] = (size_t)n,
            [SHIFT] = (size_t)slot_bound * (size_t)n, [CAND] = SIEVE_BLOCK, [CODE] = (size_t)nsteps,
            [SLOT_OF] = (size_t)nshifts, [ALG] = (size_t)n, [SIEVE] = (size_t)S + 64};
        const size_t width[PARTS] = {
            [MAGIC] = sizeof(uint64_t), [SM] = sizeof(small_prime), [AP] = 4, [AO1] = 4, [AO2] = 4, [AJ] = 4,
            [REACH] = 4, [WHERE] = 4, [SCRATCH] = 4, [HITS] = 4, [SHIFT] = 4, [CAND] = 4, [CODE] = 4,
            [SLOT_OF] = 4, [ALG] = 1, [SIEVE] = 1};
        size_t offset[PARTS], bytes;
        int part;
        for (part = 0; part < PARTS; part++) {
            offset[part] = total;
            if (__builtin_mul_overflow(count[part], width[part], &bytes) || bytes > SIZE_MAX - 64 ||
                __builtin_add_overflow(total, (bytes + 63) & ~(size_t)63, &total)) {
                PyErr_NoMemory();
                goto fail;
            }
        }
        memory = (char *)PyMem_Malloc(total);
        if (memory == NULL) {
            PyErr_NoMemory();
            goto fail;
        }
        magic = (uint64_t *)(memory + offset[MAGIC]);
        sm = (small_prime *)(memory + offset[SM]);
        P = (uint32_t *)(memory + offset[AP]);
        O1 = (uint32_t *)(memory + offset[AO1]);
        O2 = (uint32_t *)(memory + offset[AO2]);
        J = (uint32_t *)(memory + offset[AJ]);
        reach = (uint32_t *)(memory + offset[REACH]);
        where = (uint32_t *)(memory + offset[WHERE]);
        scratch = (uint32_t *)(memory + offset[SCRATCH]);
        hits = (uint32_t *)(memory + offset[HITS]);
        shift = (uint32_t *)(memory + offset[SHIFT]);
        cand = (uint32_t *)(memory + offset[CAND]);
        code = (int32_t *)(memory + offset[CODE]);
        slot_of = (int32_t *)(memory + offset[SLOT_OF]);
        LG = (uint8_t *)(memory + offset[ALG]);
        sieve = (uint8_t *)(memory + offset[SIEVE]);
    }

    /* the primes left in, first in the order of j */
    for (j = 0; j < n; j++) {
        if (get_i64(PySequence_Fast_GET_ITEM(s_r1, j), &r1, "a root") < 0)
            goto fail;
        if (r1 < 0)
            continue;
        if (get_i64(PySequence_Fast_GET_ITEM(s_primes, j), &p, "a prime") < 0)
            goto fail;
        if (p <= 0) {
            PyErr_SetString(PyExc_ValueError, "a prime left in must be positive");
            goto fail;
        }
        if (j >= nlogs || j >= nr2) {
            PyErr_SetString(PyExc_IndexError,
                            j >= nlogs ? "logs is shorter than primes" : "roots2 is shorter than primes");
            goto fail;
        }
        if (get_i64(PySequence_Fast_GET_ITEM(s_logs, j), &lg, "a logarithm") < 0 ||
            get_i64(PySequence_Fast_GET_ITEM(s_r2, j), &r2, "a root") < 0)
            goto fail;
        if (p >= SIEVE_MAX_PRIME || lg < 0 || lg > 255 || r1 >= p || r2 < 0 || r2 >= p) {
            PyErr_SetString(PyExc_OverflowError,
                            "the compiled sieve takes primes below 2^31, roots in [0, p) and logarithms 0..255");
            goto fail;
        }
        P[nu] = (uint32_t)p;
        O1[nu] = (uint32_t)((r1 + M) % p);
        O2[nu] = (uint32_t)((r2 + M) % p);
        LG[nu] = (uint8_t)lg;
        J[nu] = (uint32_t)j;
        nu++;
        last_j = j;
    }

    /* then in the order of kind: where[u] is the place of the u-th prime left in (in the order of j) */
    for (t = 0; t < (uint32_t)nu; t++)
        first[kind(P[t], LG[t], O1[t], O2[t]) + 1]++;
    for (q = 0; q < KINDS; q++)
        first[q + 1] += first[q], fill[q] = first[q];
    for (t = 0; t < (uint32_t)nu; t++)
        where[t] = fill[kind(P[t], LG[t], O1[t], O2[t])]++;
#define PERMUTE(array, type)                                                                           \
    do {                                                                                               \
        type *tmp = (type *)scratch;                                                                   \
        for (t = 0; t < (uint32_t)nu; t++)                                                             \
            tmp[where[t]] = array[t];                                                                  \
        memcpy(array, tmp, (size_t)nu * sizeof(type));                                                \
    } while (0)
    PERMUTE(P, uint32_t);
    PERMUTE(O1, uint32_t);
    PERMUTE(O2, uint32_t);
    PERMUTE(J, uint32_t);
    PERMUTE(LG, uint8_t);
#undef PERMUTE
    for (t = 0; t < (uint32_t)nu; t++) {
        magic[t] = UINT64_MAX / P[t] + 1;
        reach[t] = (S - 1) / P[t] + 1; /* ceil(S / p): the strides of a root across the array */
    }
    for (t = first[SMALL_TWO]; t < first[LARGE_TWO]; t++)
        sm[t].p = P[t], sm[t].lg = LG[t];

    /* the steps, and the rows of shifts they use reduced modulo each prime */
    for (l = 0; l < nshifts; l++)
        slot_of[l] = -1;
    for (k = 0; k < nsteps; k++) {
        int up;
        if (step_row(PySequence_Fast_GET_ITEM(s_steps, k), nshifts, &l, &up) < 0)
            goto fail;
        if (slot_of[l] < 0 && nu > 0) { /* (with no prime left in the twin reads no row either) */
            uint32_t *to;
            slot_of[l] = (int32_t)nslots++;
            to = shift + (size_t)slot_of[l] * (size_t)nu;
            row = PySequence_Fast(PySequence_Fast_GET_ITEM(s_shifts, l), "a row of shifts must be a sequence");
            if (row == NULL)
                goto fail;
            if (PySequence_Fast_GET_SIZE(row) <= last_j) {
                PyErr_SetString(PyExc_IndexError, "a row of shifts is shorter than primes");
                goto fail;
            }
            for (t = 0; t < (uint32_t)nu; t++) {
                if (get_i64(PySequence_Fast_GET_ITEM(row, J[t]), &v, "a shift") < 0)
                    goto fail;
                to[t] = (uint32_t)floormod64(v, (int64_t)P[t]);
            }
            Py_CLEAR(row);
        }
        code[k] = nu == 0 ? 0 : up ? -(slot_of[l] + 1) : slot_of[l] + 1;
    }

    out = PyList_New(0);
    if (out == NULL)
        goto fail;
    for (k = 0; k <= nsteps; k++) {
        if (k > 0 && nu > 0) { /* the roots of polynomial k: up by the row's shift, or down (up by p - shift) */
            int32_t c = code[k - 1];
            const uint32_t *sh = shift + (size_t)((c < 0 ? -c : c) - 1) * (size_t)nu;
            move_roots(O1, O2, P, sh, (uint32_t)nu, c < 0);
        }
        memset(sieve, 0, (size_t)S + 64); /* with the spare bytes */
        for (t = first[LARGE_TWO]; t < first[LARGE_ONE]; t++) {
            sieve_large(sieve, S, O1[t], P[t], reach[t], LG[t], S + (t & 31));
            sieve_large(sieve, S, O2[t], P[t], reach[t], LG[t], S + 32 + (t & 31));
        }
        for (t = first[LARGE_ONE]; t < first[UNSIEVED]; t++)
            sieve_large(sieve, S, O1[t], P[t], reach[t], LG[t], S + (t & 63));
        for (t = first[SMALL_TWO]; t < first[SMALL_ONE]; t++) {
            uint32_t a = O1[t], c = O2[t];
            sm[t].a = a < c ? a : c, sm[t].c = a < c ? c : a;
        }
        for (t = first[SMALL_ONE]; t < first[LARGE_TWO]; t++)
            sm[t].a = O1[t];
        for (start = 0; start < S; start = end) {
            uint32_t count, u;
            end = S - start > SIEVE_BLOCK ? start + SIEVE_BLOCK : S;
            for (t = first[SMALL_TWO]; t < first[SMALL_ONE]; t++) {
                uint32_t pp = sm[t].p, a = sm[t].a, c = sm[t].c; /* a < c < a + p */
                uint8_t lgq = (uint8_t)sm[t].lg;
                while (c < end) {
                    sieve[a] += lgq, sieve[c] += lgq;
                    a += pp, c += pp;
                }
                if (a < end) { /* then c < a + p: the order turns */
                    sieve[a] += lgq;
                    sm[t].a = c, sm[t].c = a + pp;
                } else {
                    sm[t].a = a, sm[t].c = c;
                }
            }
            for (t = first[SMALL_ONE]; t < first[LARGE_TWO]; t++) {
                uint32_t pp = sm[t].p, a = sm[t].a;
                uint8_t lgq = (uint8_t)sm[t].lg;
                for (; a < end; a += pp)
                    sieve[a] += lgq;
                sm[t].a = a;
            }
            count = scan_block(sieve, start, end, T, cand);
            for (u = 0; u < count; u++) {
                uint32_t i = cand[u], nh = 0, h;
                PyObject *list, *tuple, *item;
                for (q = 0; q < (uint32_t)nu; q++) { /* in the order of j */
                    uint32_t pp = P[where[q]], r = i < pp ? i : fastmod32(i, magic[where[q]], pp);
                    if (r == O1[where[q]] || r == O2[where[q]])
                        hits[nh++] = J[where[q]];
                }
                list = PyList_New(nh);
                if (list == NULL)
                    goto fail;
                for (h = 0; h < nh; h++) {
                    item = PyLong_FromUnsignedLong(hits[h]);
                    if (item == NULL) {
                        Py_DECREF(list);
                        goto fail;
                    }
                    PyList_SET_ITEM(list, h, item);
                }
                tuple = PyTuple_New(3);
                if (tuple == NULL) {
                    Py_DECREF(list);
                    goto fail;
                }
                PyTuple_SET_ITEM(tuple, 2, list);
                if ((item = PyLong_FromSsize_t(k)) == NULL) {
                    Py_DECREF(tuple);
                    goto fail;
                }
                PyTuple_SET_ITEM(tuple, 0, item);
                if ((item = PyLong_FromLongLong((long long)i - (long long)M)) == NULL) {
                    Py_DECREF(tuple);
                    goto fail;
                }
                PyTuple_SET_ITEM(tuple, 1, item);
                if (PyList_Append(out, tuple) < 0) {
                    Py_DECREF(tuple);
                    goto fail;
                }
                Py_DECREF(tuple);
            }
        }
        if (PyErr_CheckSignals() < 0)
            goto fail;
    }
    PyMem_Free(memory);
    Py_DECREF(s_primes), Py_DECREF(s_logs), Py_DECREF(s_r1), Py_DECREF(s_r2), Py_DECREF(s_shifts),
        Py_DECREF(s_steps);
    return out;
fail:
    PyMem_Free(memory);
    Py_XDECREF(row);
    Py_XDECREF(out);
    Py_XDECREF(s_primes), Py_XDECREF(s_logs), Py_XDECREF(s_r1), Py_XDECREF(s_r2), Py_XDECREF(s_shifts),
        Py_XDECREF(s_steps);
    return NULL;
}
