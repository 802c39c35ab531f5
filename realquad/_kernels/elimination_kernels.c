/*
 * Elimination kernels: eliminate_rows of elimination_kernels.py, structured
 * Gaussian elimination of sparse integer rows with pivots +-1 (the first stage
 * of the lattice algebra of index calculus).
 *
 * The same elimination as the twin, step for step: the heap of (weight,
 * column) pairs pops in the same order (its entries are totally ordered, equal
 * ones are identical), a column's pivot is its sparsest row with an entry +-1
 * and the smallest index among equals, the entry bounds top[i] are updated and
 * recomputed at the same moments, and the updates of each step are done in
 * increasing row order; so the log, the final rows, the core and the zero rows
 * are the twin's.
 *
 * Storage: each row is a sorted array of (column, value) pairs, rebuilt by one
 * merge per update (row - f * pivot), with, for each entry, its position in
 * the list of its column. A column's list holds exactly the active rows with
 * an entry there, each with that entry's value (kept equal to the row's by
 * every merge), so looking at a column is one pass over a contiguous array;
 * an entry leaves a list by moving the list's last element into its place
 * (that element's row learns its new position by a binary search).
 *
 * Range (beyond it OverflowError, and the twin runs): n < 2^31 and fewer than
 * 2^31 rows; entries, entry_limit and cost_limit within +-2^62; every entry
 * made by an update within int64 (it is at most entry_limit unless an input
 * entry is larger). A zero entry raises ValueError and a column outside
 * 0 .. n - 1 IndexError, as in the twin; rows must be dicts (TypeError).
 */
#include "kernels.h"

typedef struct {
    int32_t *col;
    int64_t *val;
    int32_t *pos; /* the entry's place in the list of its column */
    int32_t len, cap;
} erow;

typedef struct {
    int32_t *rid;
    int64_t *val;
    int32_t len, cap;
} wlist;

typedef struct {
    erow *rows;
    wlist *where;
    int64_t *top;
    char *alive, *active;
    uint64_t *heap;
    Py_ssize_t heap_len, heap_cap;
    int32_t m, n;
} state;

/* Append (row i, value v) to list c; its position, or -1 without memory. */
static int32_t
wl_push(state *s, int32_t c, int32_t i, int64_t v)
{
    wlist *l = &s->where[c];
    if (l->len == l->cap) {
        int32_t cap = l->cap ? 2 * l->cap : 4;
        int32_t *rid = realloc(l->rid, (size_t)cap * sizeof(int32_t));
        if (rid == NULL)
            return -1;
        l->rid = rid;
        int64_t *val = realloc(l->val, (size_t)cap * sizeof(int64_t));
        if (val == NULL)
            return -1;
        l->val = val;
        l->cap = cap;
    }
    l->rid[l->len] = i;
    l->val[l->len] = v;
    return l->len++;
}

static int
heap_push(state *s, uint64_t key)
{
    if (s->heap_len == s->heap_cap) {
        Py_ssize_t cap = s->heap_cap ? 2 * s->heap_cap : 64;
        uint64_t *h = realloc(s->heap, (size_t)cap * sizeof(uint64_t));
        if (h == NULL)
            return -1;
        s->heap = h;
        s->heap_cap = cap;
    }
    Py_ssize_t k = s->heap_len++;
    while (k > 0) {
        Py_ssize_t parent = (k - 1) / 2;
        if (s->heap[parent] <= key)
            break;
        s->heap[k] = s->heap[parent];
        k = parent;
    }
    s->heap[k] = key;
    return 0;
}

static uint64_t
heap_pop(state *s)
{
    uint64_t out = s->heap[0], last = s->heap[--s->heap_len];
    Py_ssize_t k = 0, len = s->heap_len;
    for (;;) {
        Py_ssize_t child = 2 * k + 1;
        if (child >= len)
            break;
        if (child + 1 < len && s->heap[child + 1] < s->heap[child])
            child++;
        if (s->heap[child] >= last)
            break;
        s->heap[k] = s->heap[child];
        k = child;
    }
    if (len > 0)
        s->heap[k] = last;
    return out;
}

#define KEY(w, c) (((uint64_t)(uint32_t)(w) << 32) | (uint32_t)(c))

/* The index of column c in row r, or -1. */
static int32_t
find(const erow *r, int32_t c)
{
    int32_t lo = 0, hi = r->len;
    while (lo < hi) {
        int32_t mid = (lo + hi) / 2;
        if (r->col[mid] < c)
            lo = mid + 1;
        else
            hi = mid;
    }
    return (lo < r->len && r->col[lo] == c) ? lo : -1;
}

/* Remove the element at position p of list c; the last one takes its place. */
static void
wl_remove(state *s, int32_t c, int32_t p)
{
    wlist *l = &s->where[c];
    int32_t last = --l->len;
    if (p != last) {
        int32_t i = l->rid[last];
        l->rid[p] = i;
        l->val[p] = l->val[last];
        erow *r = &s->rows[i];
        r->pos[find(r, c)] = p;
    }
}

typedef struct {
    int32_t i;
    int64_t x;
} item;

static int
cmp_item(const void *a, const void *b)
{
    int32_t x = ((const item *)a)->i, y = ((const item *)b)->i;
    return (x > y) - (x < y);
}

static int64_t
row_top(const erow *r)
{
    int64_t t = 0;
    for (int32_t k = 0; k < r->len; k++) {
        int64_t a = r->val[k] < 0 ? -r->val[k] : r->val[k];
        if (a > t)
            t = a;
    }
    return t;
}

static void
free_state(state *s)
{
    if (s->rows)
        for (int32_t i = 0; i < s->m; i++) {
            free(s->rows[i].col);
            free(s->rows[i].val);
            free(s->rows[i].pos);
        }
    if (s->where)
        for (int32_t j = 0; j < s->n; j++) {
            free(s->where[j].rid);
            free(s->where[j].val);
        }
    free(s->rows);
    free(s->where);
    free(s->top);
    free(s->alive);
    free(s->active);
    free(s->heap);
}

/* Parse the rows into sorted arrays; -1 with an exception set on failure. */
static int
read_rows(state *s, PyObject *rows)
{
    typedef struct {
        int32_t col;
        int64_t val;
    } pair;
    for (int32_t i = 0; i < s->m; i++) {
        PyObject *d = PyList_GET_ITEM(rows, i);
        if (!PyDict_Check(d)) {
            PyErr_SetString(PyExc_TypeError, "eliminate_rows: each row must be a dict");
            return -1;
        }
        Py_ssize_t len = PyDict_GET_SIZE(d), pos = 0, k = 0;
        pair *tmp = malloc((size_t)(len ? len : 1) * sizeof(pair));
        erow *r = &s->rows[i];
        r->col = malloc((size_t)(len ? len : 1) * sizeof(int32_t));
        r->val = malloc((size_t)(len ? len : 1) * sizeof(int64_t));
        r->pos = malloc((size_t)(len ? len : 1) * sizeof(int32_t));
        r->cap = (int32_t)(len ? len : 1);
        if (tmp == NULL || r->col == NULL || r->val == NULL || r->pos == NULL) {
            free(tmp);
            PyErr_NoMemory();
            return -1;
        }
        PyObject *key, *value;
        while (PyDict_Next(d, &pos, &key, &value)) {
            int64_t j, x;
            if (get_i64(key, &j, "a column") < 0 || get_i64(value, &x, "an entry") < 0) {
                free(tmp);
                return -1;
            }
            if (x > ((int64_t)1 << 62) || x < -((int64_t)1 << 62)) {
                free(tmp);
                PyErr_SetString(PyExc_OverflowError, "eliminate_rows: an entry beyond 2^62");
                return -1;
            }
            if (x == 0) {
                free(tmp);
                PyErr_Format(PyExc_ValueError, "row %d has a zero entry in column %lld", (int)i,
                             (long long)j);
                return -1;
            }
            if (j < 0 || j >= s->n) {
                free(tmp);
                PyErr_Format(PyExc_IndexError, "column %lld of row %d is outside 0 .. %d", (long long)j,
                             (int)i, (int)s->n - 1);
                return -1;
            }
            tmp[k].col = (int32_t)j;
            tmp[k].val = (int64_t)x;
            k++;
        }
        for (Py_ssize_t a = 1; a < k; a++) { /* insertion sort: rows are short */
            pair p = tmp[a];
            Py_ssize_t b = a;
            while (b > 0 && tmp[b - 1].col > p.col) {
                tmp[b] = tmp[b - 1];
                b--;
            }
            tmp[b] = p;
        }
        for (Py_ssize_t a = 0; a < k; a++) {
            r->col[a] = tmp[a].col;
            r->val[a] = tmp[a].val;
            r->pos[a] = wl_push(s, tmp[a].col, i, tmp[a].val);
            if (r->pos[a] < 0) {
                free(tmp);
                PyErr_NoMemory();
                return -1;
            }
        }
        r->len = (int32_t)k;
        free(tmp);
        s->top[i] = row_top(r);
    }
    return 0;
}

/* Room for k entries in row r. -1: no memory. */
static int
row_reserve(erow *r, int32_t k)
{
    if (k <= r->cap)
        return 0;
    int32_t *col = realloc(r->col, (size_t)k * sizeof(int32_t));
    if (col == NULL)
        return -1;
    r->col = col;
    int64_t *val = realloc(r->val, (size_t)k * sizeof(int64_t));
    if (val == NULL)
        return -1;
    r->val = val;
    int32_t *pos = realloc(r->pos, (size_t)k * sizeof(int32_t));
    if (pos == NULL)
        return -1;
    r->pos = pos;
    r->cap = k;
    return 0;
}

/* row i -= f * pivot (a merge); keeps the column lists and nonzeros. -1: no memory or overflow. */
static int
update_row(state *s, int32_t i, const erow *pv, int64_t f, int64_t *nonzeros, erow *scratch)
{
    erow *r = &s->rows[i];
    int32_t a = 0, b = 0, k = 0;
    while (a < r->len || b < pv->len) {
        if (b >= pv->len || (a < r->len && r->col[a] < pv->col[b])) {
            scratch->col[k] = r->col[a];
            scratch->val[k] = r->val[a];
            scratch->pos[k++] = r->pos[a++];
        } else if (a >= r->len || pv->col[b] < r->col[a]) {
            i128 y = -(i128)f * pv->val[b];
            if (y > INT64_MAX || y < -INT64_MAX) {
                PyErr_SetString(PyExc_OverflowError, "eliminate_rows: an entry beyond 64 bits");
                return -1;
            }
            int32_t j = pv->col[b++];
            int32_t p = wl_push(s, j, i, (int64_t)y);
            if (p < 0) {
                PyErr_NoMemory();
                return -1;
            }
            scratch->col[k] = j;
            scratch->val[k] = (int64_t)y;
            scratch->pos[k++] = p;
        } else {
            i128 y = (i128)r->val[a] - (i128)f * pv->val[b];
            if (y > INT64_MAX || y < -INT64_MAX) {
                PyErr_SetString(PyExc_OverflowError, "eliminate_rows: an entry beyond 64 bits");
                return -1;
            }
            int32_t j = r->col[a], p = r->pos[a];
            if (y) {
                s->where[j].val[p] = (int64_t)y;
                scratch->col[k] = j;
                scratch->val[k] = (int64_t)y;
                scratch->pos[k++] = p;
            } else {
                wl_remove(s, j, p);
            }
            a++;
            b++;
        }
    }
    if (row_reserve(r, k) < 0) {
        PyErr_NoMemory();
        return -1;
    }
    memcpy(r->col, scratch->col, (size_t)k * sizeof(int32_t));
    memcpy(r->val, scratch->val, (size_t)k * sizeof(int64_t));
    memcpy(r->pos, scratch->pos, (size_t)k * sizeof(int32_t));
    *nonzeros += (int64_t)k - r->len;
    r->len = k;
    return 0;
}

static PyObject *
int_list(const int32_t *xs, Py_ssize_t len)
{
    PyObject *out = PyList_New(len);
    if (out == NULL)
        return NULL;
    for (Py_ssize_t k = 0; k < len; k++) {
        PyObject *x = PyLong_FromLong(xs[k]);
        if (x == NULL) {
            Py_DECREF(out);
            return NULL;
        }
        PyList_SET_ITEM(out, k, x);
    }
    return out;
}

typedef struct {
    int32_t *x;
    Py_ssize_t len, cap;
} ibuf;

static int
ibuf_push(ibuf *b, int32_t x)
{
    if (b->len == b->cap) {
        Py_ssize_t cap = b->cap ? 2 * b->cap : 64;
        int32_t *p = realloc(b->x, (size_t)cap * sizeof(int32_t));
        if (p == NULL)
            return -1;
        b->x = p;
        b->cap = cap;
    }
    b->x[b->len++] = x;
    return 0;
}

/* The result tuple from the state and the logs (module notes); NULL with an exception set. */
static PyObject *
build_result(state *s, ibuf *cols, ibuf *pivots, ibuf *upd_start, ibuf *upd_row, int64_t *upd_f,
             ibuf *zero)
{
    PyObject *columns = NULL, *piv = NULL, *updates = NULL, *final = NULL, *core_cols = NULL,
             *core_rows = NULL, *zeros = NULL;
    int32_t *tmp = malloc((size_t)((s->n > s->m ? s->n : s->m) + 1) * sizeof(int32_t));
    if (tmp == NULL)
        return PyErr_NoMemory();
    columns = int_list(cols->x, cols->len);
    piv = int_list(pivots->x, pivots->len);
    updates = PyList_New(cols->len);
    final = PyList_New(s->m);
    if (columns == NULL || piv == NULL || updates == NULL || final == NULL)
        goto fail;
    for (Py_ssize_t t = 0; t < cols->len; t++) {
        int32_t from = upd_start->x[t], to = upd_start->x[t + 1];
        PyObject *l = PyList_New(to - from);
        if (l == NULL)
            goto fail;
        PyList_SET_ITEM(updates, t, l);
        for (int32_t k = from; k < to; k++) {
            PyObject *pair = Py_BuildValue("(iL)", (int)upd_row->x[k], (long long)upd_f[k]);
            if (pair == NULL)
                goto fail;
            PyList_SET_ITEM(l, k - from, pair);
        }
    }
    for (int32_t i = 0; i < s->m; i++) {
        PyObject *d = PyDict_New();
        if (d == NULL)
            goto fail;
        PyList_SET_ITEM(final, i, d);
        const erow *r = &s->rows[i];
        for (int32_t k = 0; k < r->len; k++) {
            PyObject *key = PyLong_FromLong(r->col[k]);
            PyObject *value = PyLong_FromLongLong(r->val[k]);
            int bad = key == NULL || value == NULL || PyDict_SetItem(d, key, value) < 0;
            Py_XDECREF(key);
            Py_XDECREF(value);
            if (bad)
                goto fail;
        }
    }
    Py_ssize_t k = 0;
    for (int32_t j = 0; j < s->n; j++)
        if (s->active[j])
            tmp[k++] = j;
    core_cols = int_list(tmp, k);
    k = 0;
    for (int32_t i = 0; i < s->m; i++)
        if (s->alive[i])
            tmp[k++] = i;
    core_rows = int_list(tmp, k);
    zeros = int_list(zero->x, zero->len);
    if (core_cols == NULL || core_rows == NULL || zeros == NULL)
        goto fail;
    free(tmp);
    return Py_BuildValue("(NNNNNNN)", columns, piv, updates, final, core_cols, core_rows, zeros);
fail:
    free(tmp);
    Py_XDECREF(columns);
    Py_XDECREF(piv);
    Py_XDECREF(updates);
    Py_XDECREF(final);
    Py_XDECREF(core_cols);
    Py_XDECREF(core_rows);
    Py_XDECREF(zeros);
    return NULL;
}

PyObject *
k_eliminate_rows(PyObject *self, PyObject *const *args, Py_ssize_t nargs)
{
    (void)self;
    if (nargs != 5) {
        PyErr_SetString(PyExc_TypeError,
                        "eliminate_rows(rows, n, entry_limit, cost_limit, density) takes 5 arguments");
        return NULL;
    }
    PyObject *rows = args[0];
    if (!PyList_Check(rows)) {
        PyErr_SetString(PyExc_TypeError, "eliminate_rows: rows must be a list");
        return NULL;
    }
    int64_t n, limit, cost;
    if (get_i64(args[1], &n, "n") < 0 || get_i64(args[2], &limit, "entry_limit") < 0 ||
        get_i64(args[3], &cost, "cost_limit") < 0)
        return NULL;
    double density = PyFloat_AsDouble(args[4]);
    if (density == -1.0 && PyErr_Occurred())
        return NULL;
    Py_ssize_t m = PyList_GET_SIZE(rows);
    if (n < 0 || n >= ((int64_t)1 << 31) || m >= ((Py_ssize_t)1 << 31) ||
        limit > ((int64_t)1 << 62) || limit < 0 || cost > ((int64_t)1 << 62) || cost < 0) {
        PyErr_SetString(PyExc_OverflowError, "eliminate_rows: sizes or limits out of range");
        return NULL;
    }
    state s;
    memset(&s, 0, sizeof s);
    s.m = (int32_t)m;
    s.n = (int32_t)n;
    ibuf cols = {0}, pivots = {0}, upd_start = {0}, upd_row = {0}, zero = {0};
    item *order = NULL;
    Py_ssize_t order_cap = 0;
    int64_t *upd_f = NULL;
    Py_ssize_t upd_cap = 0;
    erow scratch = {0};
    PyObject *result = NULL;
    size_t mm = (size_t)(m ? m : 1), nn = (size_t)(n ? n : 1);
    s.rows = calloc(mm, sizeof(erow));
    s.where = calloc(nn, sizeof(wlist));
    s.top = calloc(mm, sizeof(int64_t));
    s.alive = calloc(mm, 1);
    s.active = calloc(nn, 1);
    if (!s.rows || !s.where || !s.top || !s.alive || !s.active) {
        PyErr_NoMemory();
        goto done;
    }
    if (read_rows(&s, rows) < 0)
        goto done;
    int64_t nonzeros = 0;
    int32_t alive_count = s.m;
    for (int32_t i = 0; i < s.m; i++) {
        s.alive[i] = 1;
        nonzeros += s.rows[i].len;
    }
    for (int32_t j = 0; j < s.n; j++) {
        s.active[j] = 1;
        if (heap_push(&s, KEY(s.where[j].len, j)) < 0) {
            PyErr_NoMemory();
            goto done;
        }
    }
    if (ibuf_push(&upd_start, 0) < 0) {
        PyErr_NoMemory();
        goto done;
    }
    while (s.heap_len > 0) {
        uint64_t key = heap_pop(&s);
        int32_t w = (int32_t)(key >> 32), c = (int32_t)(key & 0xffffffffu);
        if (!s.active[c] || s.where[c].len != w) {
            if (s.active[c] && heap_push(&s, KEY(s.where[c].len, c)) < 0) {
                PyErr_NoMemory();
                goto done;
            }
            continue;
        }
        if (w > 1 &&
            (double)nonzeros > density * (double)(s.n - (int32_t)cols.len) * (double)alive_count)
            break;
        const wlist *l = &s.where[c];
        int32_t best = -1, size = 0;
        int64_t eps = 0;
        for (int32_t t = 0; t < w; t++) {
            int32_t i = l->rid[t];
            int64_t x = l->val[t];
            int32_t len = s.rows[i].len;
            if ((x == 1 || x == -1) && (best < 0 || len < size || (len == size && i < best))) {
                best = i;
                size = len;
                eps = x;
            }
        }
        if (best < 0 || (i128)(w - 1) * (size - 1) > cost)
            continue;
        for (int32_t t = 0; t < w; t++) {
            int32_t i = l->rid[t];
            int64_t x = l->val[t];
            if ((i128)(x < 0 ? -x : x) * s.top[best] + s.top[i] > limit)
                s.top[i] = row_top(&s.rows[i]);
        }
        int blocked = 0;
        if (w > 1)
            for (int32_t t = 0; t < w && !blocked; t++) {
                int32_t i = l->rid[t];
                int64_t x = l->val[t];
                if (i != best && (i128)(x < 0 ? -x : x) * s.top[best] + s.top[i] > limit)
                    blocked = 1;
            }
        if (blocked)
            continue;
        if (w - 1 > order_cap) {
            Py_ssize_t cap = w - 1 > 2 * order_cap ? w - 1 : 2 * order_cap;
            item *o = realloc(order, (size_t)cap * sizeof(item));
            if (o == NULL) {
                PyErr_NoMemory();
                goto done;
            }
            order = o;
            order_cap = cap;
        }
        Py_ssize_t count = 0;
        for (int32_t t = 0; t < w; t++)
            if (l->rid[t] != best) {
                order[count].i = l->rid[t];
                order[count++].x = l->val[t];
            }
        qsort(order, (size_t)count, sizeof(item), cmp_item);
        const erow *pv = &s.rows[best];
        for (int32_t k = 0; k < pv->len; k++) /* the pivot leaves the active part */
            wl_remove(&s, pv->col[k], pv->pos[k]);
        s.alive[best] = 0;
        alive_count--;
        nonzeros -= pv->len;
        for (Py_ssize_t t = 0; t < count; t++) {
            int32_t i = order[t].i;
            erow *r = &s.rows[i];
            int64_t f = order[t].x * eps;
            if (row_reserve(&scratch, r->len + pv->len) < 0) {
                PyErr_NoMemory();
                goto done;
            }
            if (upd_row.len == upd_cap) {
                Py_ssize_t cap = upd_cap ? 2 * upd_cap : 256;
                int64_t *p = realloc(upd_f, (size_t)cap * sizeof(int64_t));
                if (p == NULL) {
                    PyErr_NoMemory();
                    goto done;
                }
                upd_f = p;
                upd_cap = cap;
            }
            upd_f[upd_row.len] = f;
            if (ibuf_push(&upd_row, i) < 0) {
                PyErr_NoMemory();
                goto done;
            }
            s.top[i] += (f < 0 ? -f : f) * s.top[best];
            if (update_row(&s, i, pv, f, &nonzeros, &scratch) < 0)
                goto done;
            if (r->len == 0) {
                s.alive[i] = 0;
                alive_count--;
                if (ibuf_push(&zero, i) < 0) {
                    PyErr_NoMemory();
                    goto done;
                }
            }
        }
        s.active[c] = 0;
        if (ibuf_push(&cols, c) < 0 || ibuf_push(&pivots, best) < 0 ||
            ibuf_push(&upd_start, (int32_t)upd_row.len) < 0) {
            PyErr_NoMemory();
            goto done;
        }
        for (int32_t k = 0; k < pv->len; k++) {
            int32_t j = pv->col[k];
            if (s.active[j] && heap_push(&s, KEY(s.where[j].len, j)) < 0) {
                PyErr_NoMemory();
                goto done;
            }
        }
    }
    result = build_result(&s, &cols, &pivots, &upd_start, &upd_row, upd_f, &zero);
done:
    free_state(&s);
    free(cols.x);
    free(pivots.x);
    free(upd_start.x);
    free(upd_row.x);
    free(zero.x);
    free(order);
    free(upd_f);
    free(scratch.col);
    free(scratch.val);
    free(scratch.pos);
    return result;
}
