/*
 * Modewright's dense linear algebra on the machine's OpenBLAS and LAPACK(E):
 * a plain Node-API addon (node_api.h, no C++ wrapper). Every matrix is a
 * column-major Float64Array; outputs are allocated by the caller
 * (grading/linalg/openblas.ts) and written in place, so nothing is copied
 * beyond what LAPACK itself destroys. Every call is synchronous: it runs in the
 * thread that calls it (an engine worker), never hands work to the event loop.
 *
 * Argument checks throw JavaScript errors (TypeError for a wrong type,
 * RangeError for a wrong size or a non-finite entry, Error for LAPACK's
 * info != 0 with its meaning); nothing here aborts the process.
 */
#define NAPI_VERSION 8
#include <node_api.h>
#include <cblas.h>
#include <lapacke.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define MSG 512

/* ------------------------------------------------------------------ helpers */

static napi_value throw_kind(napi_env env, char kind, const char *msg) {
  bool pending = false;
  napi_is_exception_pending(env, &pending);
  if (pending) return NULL;
  if (kind == 'T') napi_throw_type_error(env, "ERR_MODEWRIGHT_LINALG_TYPE", msg);
  else if (kind == 'R') napi_throw_range_error(env, "ERR_MODEWRIGHT_LINALG_RANGE", msg);
  else napi_throw_error(env, "ERR_MODEWRIGHT_LAPACK", msg);
  return NULL;
}

#define FAIL(kind, ...) do { char m_[MSG]; snprintf(m_, MSG, __VA_ARGS__); throw_kind(env, kind, m_); goto fail; } while (0)

static bool get_args(napi_env env, napi_callback_info info, size_t want, napi_value *argv, const char *fn) {
  size_t argc = want;
  if (napi_get_cb_info(env, info, &argc, argv, NULL, NULL) != napi_ok) return false;
  if (argc < want) {
    char m[MSG];
    snprintf(m, MSG, "%s: expected %zu arguments, got %zu", fn, want, argc);
    throw_kind(env, 'T', m);
    return false;
  }
  return true;
}

/* A non-negative integer dimension below 2^31 (OpenBLAS here uses 32-bit integers). */
static bool get_dim(napi_env env, napi_value v, const char *fn, const char *name, int *out) {
  napi_valuetype t;
  napi_typeof(env, v, &t);
  char m[MSG];
  if (t != napi_number) {
    snprintf(m, MSG, "%s: %s must be a number", fn, name);
    throw_kind(env, 'T', m);
    return false;
  }
  double d;
  napi_get_value_double(env, v, &d);
  if (!(d >= 0 && d <= 2147483647.0) || d != floor(d)) {
    snprintf(m, MSG, "%s: %s must be a non-negative integer below 2^31, got %g", fn, name, d);
    throw_kind(env, 'R', m);
    return false;
  }
  *out = (int)d;
  return true;
}

static bool get_number(napi_env env, napi_value v, const char *fn, const char *name, double *out) {
  napi_valuetype t;
  napi_typeof(env, v, &t);
  if (t != napi_number) {
    char m[MSG];
    snprintf(m, MSG, "%s: %s must be a number", fn, name);
    throw_kind(env, 'T', m);
    return false;
  }
  napi_get_value_double(env, v, out);
  return true;
}

/* rows*cols as size_t, refusing products that do not fit a 32-bit LAPACK index of a whole matrix. */
static bool entries(napi_env env, const char *fn, const char *name, int rows, int cols, size_t *out) {
  uint64_t n = (uint64_t)rows * (uint64_t)cols;
  if (n > (uint64_t)INT32_MAX * 8u) {
    char m[MSG];
    snprintf(m, MSG, "%s: %s of %d×%d is too large for this library", fn, name, rows, cols);
    throw_kind(env, 'R', m);
    return false;
  }
  *out = (size_t)n;
  return true;
}

/*
 * A Float64Array of at least `need` entries (longer views are allowed: pooled
 * working arrays may be larger than the matrix they hold). `optional`: null and
 * undefined give *data = NULL.
 */
static bool get_f64(napi_env env, napi_value v, const char *fn, const char *name, size_t need, const char *shape,
                    double **data, size_t *len, bool optional) {
  char m[MSG];
  napi_valuetype t;
  napi_typeof(env, v, &t);
  if (optional && (t == napi_null || t == napi_undefined)) {
    *data = NULL;
    if (len) *len = 0;
    return true;
  }
  bool is_ta = false;
  napi_is_typedarray(env, v, &is_ta);
  napi_typedarray_type type = napi_int8_array;
  size_t length = 0;
  void *ptr = NULL;
  if (is_ta) napi_get_typedarray_info(env, v, &type, &length, &ptr, NULL, NULL);
  if (!is_ta || type != napi_float64_array) {
    snprintf(m, MSG, "%s: %s must be a Float64Array (column-major %s)", fn, name, shape);
    throw_kind(env, 'T', m);
    return false;
  }
  if (length < need) {
    snprintf(m, MSG, "%s: %s has %zu entries; a %s matrix needs %zu", fn, name, length, shape, need);
    throw_kind(env, 'R', m);
    return false;
  }
  *data = (double *)ptr;
  if (len) *len = length;
  return true;
}

/*
 * Index of the first non-finite entry of x[0..n), or -1. One pass first over eight
 * independent sums of x*0 (NaN only for Inf/NaN): eight chains keep the adds from
 * waiting on each other, so the scan runs at memory speed (one chain waited ~4 cycles
 * per entry: 16.4M entries took ~20 ms). Only when a sum is not 0 is the entry located.
 */
static long first_nonfinite(const double *x, size_t n) {
  double a0 = 0.0, a1 = 0.0, a2 = 0.0, a3 = 0.0, a4 = 0.0, a5 = 0.0, a6 = 0.0, a7 = 0.0;
  size_t i = 0;
  for (; i + 8 <= n; i += 8) {
    a0 += x[i] * 0.0; a1 += x[i + 1] * 0.0; a2 += x[i + 2] * 0.0; a3 += x[i + 3] * 0.0;
    a4 += x[i + 4] * 0.0; a5 += x[i + 5] * 0.0; a6 += x[i + 6] * 0.0; a7 += x[i + 7] * 0.0;
  }
  for (; i < n; i++) a0 += x[i] * 0.0;
  if (((a0 + a1) + (a2 + a3)) + ((a4 + a5) + (a6 + a7)) == 0.0) return -1;
  for (i = 0; i < n; i++) if (!isfinite(x[i])) return (long)i;
  return -1;
}

static bool check_finite(napi_env env, const char *fn, const char *name, const double *x, int rows, int cols) {
  long at = first_nonfinite(x, (size_t)rows * (size_t)cols);
  if (at < 0) return true;
  char m[MSG];
  long r = rows > 0 ? at % rows : 0, c = rows > 0 ? at / rows : 0;
  snprintf(m, MSG, "%s: %s has a non-finite entry (%g at row %ld, column %ld of %d×%d)", fn, name, x[at], r + 1, c + 1, rows, cols);
  throw_kind(env, 'R', m);
  return false;
}

static bool check_lapack(napi_env env, const char *fn, const char *routine, lapack_int info, const char *meaning) {
  if (info == 0) return true;
  char m[MSG];
  if (info == LAPACK_WORK_MEMORY_ERROR || info == LAPACK_TRANSPOSE_MEMORY_ERROR)
    snprintf(m, MSG, "%s: %s could not allocate its workspace (out of memory)", fn, routine);
  else if (info < 0)
    snprintf(m, MSG, "%s: %s rejected argument %d (info = %d; an internal error of the caller)", fn, routine, (int)-info, (int)info);
  else
    snprintf(m, MSG, "%s: %s failed, info = %d: %s", fn, routine, (int)info, meaning);
  throw_kind(env, 'L', m);
  return false;
}

static napi_value undefined(napi_env env) {
  napi_value u;
  napi_get_undefined(env, &u);
  return u;
}

static napi_value number(napi_env env, double d) {
  napi_value v;
  napi_create_double(env, d, &v);
  return v;
}

/*
 * LAPACK on matrices of order below this runs on one OpenBLAS thread: their
 * BLAS-2 steps (dsytrd's dsymv, dgeev's Hessenberg work) synchronise threads
 * once per column, which gains little with two cores and loses badly when the
 * cores are shared with other work (measured: 500×500 leading eigenpairs 219 ms
 * on one thread, 607 ms on two, on a loaded 2-core machine). The large products
 * keep the configured count.
 */
#define LAPACK_ONE_THREAD_BELOW 1500

/*
 * Except the tridiagonal reduction of the partial route (dsytrd): from this order its
 * matrix no longer fits one core's 2 MB L2 cache, and with two threads each core keeps
 * half of it (measured on the quiet 2-core VM: k = 500 6.3 ms on one thread, 9.3 on two;
 * k = 700 18.7 / 12.9; k = 1000 50 / 34–45). With one BLAS thread per engine worker (the
 * server's rule on small machines) nothing changes.
 */
#define TRIDIAGONAL_THREADS_FROM 640

static int single_thread_for(int order) {
  int saved = openblas_get_num_threads();
  if (saved > 1 && order < LAPACK_ONE_THREAD_BELOW) openblas_set_num_threads(1);
  return saved;
}

static void restore_threads(int saved) {
  if (openblas_get_num_threads() != saved) openblas_set_num_threads(saved);
}

/*
 * Products of fewer multiply-adds than this run on one thread as well: below it
 * the threads' start-up and synchronisation cost about what they save (the
 * reduced operators and eigenfunction products of kernel EDMD, 1e6–1e8
 * multiply-adds); the Gram products of the benchmark workloads (6.6e8 and 1.6e10)
 * keep the configured count. On this 2-core VM the end-to-end effect is within
 * run-to-run noise; the rule mainly keeps small calls from waking idle threads.
 */
#define PRODUCT_ONE_THREAD_BELOW 2.0e8

static int single_thread_for_flops(double flops) {
  int saved = openblas_get_num_threads();
  if (saved > 1 && flops < PRODUCT_ONE_THREAD_BELOW) openblas_set_num_threads(1);
  return saved;
}

/* ------------------------------------------------------------------ products */

/* gram(d, n, k, out): out (k×k) = DᵀD for D n×k, by dsyrk on the lower triangle, mirrored exactly. */
static napi_value Gram(napi_env env, napi_callback_info info) {
  const char *fn = "gram";
  napi_value argv[4];
  int n, k;
  double *d, *out;
  size_t nd, nk;
  char shape[64], oshape[64];
  if (!get_args(env, info, 4, argv, fn)) return NULL;
  if (!get_dim(env, argv[1], fn, "n", &n) || !get_dim(env, argv[2], fn, "k", &k)) return NULL;
  if (!entries(env, fn, "D", n, k, &nd) || !entries(env, fn, "DᵀD", k, k, &nk)) return NULL;
  snprintf(shape, sizeof shape, "%d×%d", n, k);
  snprintf(oshape, sizeof oshape, "%d×%d", k, k);
  if (!get_f64(env, argv[0], fn, "D", nd, shape, &d, NULL, false)) return NULL;
  if (!get_f64(env, argv[3], fn, "out", nk, oshape, &out, NULL, false)) return NULL;
  if (!check_finite(env, fn, "D", d, n, k)) return NULL;
  if (k == 0) return undefined(env);
  if (n == 0) {
    memset(out, 0, nk * sizeof(double));
    return undefined(env);
  }
  int saved_threads = single_thread_for_flops((double)n * k * (k + 1) / 2.0);
  cblas_dsyrk(CblasColMajor, CblasLower, CblasTrans, k, n, 1.0, d, n, 0.0, out, k);
  restore_threads(saved_threads);
  for (int j = 1; j < k; j++)
    for (int i = 0; i < j; i++) out[i + (size_t)j * k] = out[j + (size_t)i * k];
  return undefined(env);
}

/* cross(a, b, n, ka, kb, out): out (ka×kb) = AᵀB for A n×ka, B n×kb (dgemm). */
static napi_value Cross(napi_env env, napi_callback_info info) {
  const char *fn = "cross";
  napi_value argv[6];
  int n, ka, kb;
  double *a, *b, *out;
  size_t na, nb, no;
  char sa[64], sb[64], so[64];
  if (!get_args(env, info, 6, argv, fn)) return NULL;
  if (!get_dim(env, argv[2], fn, "n", &n) || !get_dim(env, argv[3], fn, "ka", &ka) || !get_dim(env, argv[4], fn, "kb", &kb)) return NULL;
  if (!entries(env, fn, "A", n, ka, &na) || !entries(env, fn, "B", n, kb, &nb) || !entries(env, fn, "AᵀB", ka, kb, &no)) return NULL;
  snprintf(sa, sizeof sa, "%d×%d", n, ka);
  snprintf(sb, sizeof sb, "%d×%d", n, kb);
  snprintf(so, sizeof so, "%d×%d", ka, kb);
  if (!get_f64(env, argv[0], fn, "A", na, sa, &a, NULL, false)) return NULL;
  if (!get_f64(env, argv[1], fn, "B", nb, sb, &b, NULL, false)) return NULL;
  if (!get_f64(env, argv[5], fn, "out", no, so, &out, NULL, false)) return NULL;
  if (!check_finite(env, fn, "A", a, n, ka) || !check_finite(env, fn, "B", b, n, kb)) return NULL;
  if (ka == 0 || kb == 0) return undefined(env);
  if (n == 0) {
    memset(out, 0, no * sizeof(double));
    return undefined(env);
  }
  int saved_threads = single_thread_for_flops((double)ka * kb * n);
  cblas_dgemm(CblasColMajor, CblasTrans, CblasNoTrans, ka, kb, n, 1.0, a, n, b, n, 0.0, out, ka);
  restore_threads(saved_threads);
  return undefined(env);
}

/* product(a, p, q, b, s, out): out (p×s) = A·B for A p×q, B q×s (dgemm). */
static napi_value Product(napi_env env, napi_callback_info info) {
  const char *fn = "product";
  napi_value argv[6];
  int p, q, s;
  double *a, *b, *out;
  size_t na, nb, no;
  char sa[64], sb[64], so[64];
  if (!get_args(env, info, 6, argv, fn)) return NULL;
  if (!get_dim(env, argv[1], fn, "p", &p) || !get_dim(env, argv[2], fn, "q", &q) || !get_dim(env, argv[4], fn, "s", &s)) return NULL;
  if (!entries(env, fn, "A", p, q, &na) || !entries(env, fn, "B", q, s, &nb) || !entries(env, fn, "AB", p, s, &no)) return NULL;
  snprintf(sa, sizeof sa, "%d×%d", p, q);
  snprintf(sb, sizeof sb, "%d×%d", q, s);
  snprintf(so, sizeof so, "%d×%d", p, s);
  if (!get_f64(env, argv[0], fn, "A", na, sa, &a, NULL, false)) return NULL;
  if (!get_f64(env, argv[3], fn, "B", nb, sb, &b, NULL, false)) return NULL;
  if (!get_f64(env, argv[5], fn, "out", no, so, &out, NULL, false)) return NULL;
  if (!check_finite(env, fn, "A", a, p, q) || !check_finite(env, fn, "B", b, q, s)) return NULL;
  if (p == 0 || s == 0) return undefined(env);
  if (q == 0) {
    memset(out, 0, no * sizeof(double));
    return undefined(env);
  }
  int saved_threads = single_thread_for_flops((double)p * s * q);
  cblas_dgemm(CblasColMajor, CblasNoTrans, CblasNoTrans, p, s, q, 1.0, a, p, b, q, 0.0, out, p);
  restore_threads(saved_threads);
  return undefined(env);
}

/* ------------------------------------------------------------------ symmetric eigen */

/* Largest-magnitude entry of each column made positive (ties within 1e-12 relative: the first), as the TypeScript solver does. */
static void normalise_signs(double *z, int k, int r) {
  for (int c = 0; c < r; c++) {
    double *col = z + (size_t)c * k, best = 0;
    int at = 0;
    for (int i = 0; i < k; i++) {
      double v = fabs(col[i]);
      if (v > best * (1 + 1e-12)) {
        best = v;
        at = i;
      }
    }
    if (col[at] < 0) for (int i = 0; i < k; i++) col[i] = -col[i];
  }
}

/*
 * symmetricEigen(a, k, r, valuesCount, values, vectors): the leading r
 * eigenpairs (descending) of the symmetric k×k matrix a (lower triangle read,
 * a itself left alone), plus eigenvalues r..valuesCount-1 without vectors.
 * Many vectors: dsyevd on a copy. Few: the partial route below. Where they cross (quiet
 * 2-core VM, one thread for dsyevd, the partial route's reduction on two from order 640;
 * dsyevd / partial in ms): k = 400: 11.7 / 10.5 (r = 50), 16.3 (r = 100); k = 500: 22.4 /
 * 18.7 (50), 28.7 (100); k = 640: 48.9 / 48.3 (150), 58.2 (200); k = 800: 85 / 76 (200),
 * 88 (250); k = 1000: 172 / 98 (150), 127 (250). So dsyevd when r > k/8 below order 640
 * and when r > k/4 from there (one dsyevd grows past one core's cache; the partial
 * route's cost grows with r).
 * Few: one dsytrd, the values by
 * dsterf (all) when more values than vectors are asked, the leading r by
 * bisection (dstebz) and inverse iteration (dstein), back-transformed by
 * dormtr: LAPACK's own partial route (what dsyevr/dsyevx do for a subset),
 * with a single tridiagonalisation.
 */
static napi_value SymmetricEigen(napi_env env, napi_callback_info info) {
  const char *fn = "symmetricEigen";
  napi_value argv[6];
  int k, r, vc;
  double *a, *values, *vectors;
  double *w = NULL, *d = NULL, *e = NULL, *tau = NULL, *d2 = NULL, *e2 = NULL, *wv = NULL, *z = NULL;
  lapack_int *iblock = NULL, *isplit = NULL, *ifail = NULL;
  size_t nk, nz;
  char sk[64], sv[64], sl[64];
  if (!get_args(env, info, 6, argv, fn)) return NULL;
  if (!get_dim(env, argv[1], fn, "k", &k) || !get_dim(env, argv[2], fn, "r", &r) || !get_dim(env, argv[3], fn, "valuesCount", &vc)) return NULL;
  if (r > k || vc < r || vc > k) {
    char m[MSG];
    snprintf(m, MSG, "%s: asked for %d eigenvalues with %d eigenvectors of a %d×%d matrix; expected r ≤ valuesCount ≤ k", fn, vc, r, k, k);
    throw_kind(env, 'R', m);
    return NULL;
  }
  if (!entries(env, fn, "A", k, k, &nk) || !entries(env, fn, "vectors", k, r, &nz)) return NULL;
  snprintf(sk, sizeof sk, "%d×%d", k, k);
  snprintf(sv, sizeof sv, "%d×%d", k, r);
  snprintf(sl, sizeof sl, "%d×1", vc);
  if (!get_f64(env, argv[0], fn, "A", nk, sk, &a, NULL, false)) return NULL;
  if (!get_f64(env, argv[4], fn, "values", (size_t)vc, sl, &values, NULL, false)) return NULL;
  if (!get_f64(env, argv[5], fn, "vectors", nz, sv, &vectors, NULL, false)) return NULL;
  /* Only the lower triangle is read: check that. */
  for (int j = 0; j < k; j++) {
    for (int i = j; i < k; i++) {
      double x = a[i + (size_t)j * k];
      if (!isfinite(x)) {
        char m[MSG];
        snprintf(m, MSG, "%s: A has a non-finite entry (%g at row %d, column %d of %d×%d)", fn, x, i + 1, j + 1, k, k);
        throw_kind(env, 'R', m);
        return NULL;
      }
    }
  }
  if (vc == 0 || k == 0) return undefined(env);
  lapack_int info_;
  int saved_threads = openblas_get_num_threads();
  /* Many vectors: see the route rule above (r > k/8 below TRIDIAGONAL_THREADS_FROM, r > k/4 from there). */
  bool many = k < TRIDIAGONAL_THREADS_FROM ? 8 * r > k : 4 * r > k;
  if (many) {
    single_thread_for(k);
    w = malloc(sizeof(double) * (size_t)k);
    z = malloc(sizeof(double) * nk);
    if (!w || !z) FAIL('L', "%s: out of memory for a %d×%d eigendecomposition", fn, k, k);
    memcpy(z, a, sizeof(double) * nk);
    info_ = LAPACKE_dsyevd(LAPACK_COL_MAJOR, 'V', 'L', k, z, k, w);
    if (!check_lapack(env, fn, "dsyevd", info_, "the divide-and-conquer algorithm failed to converge (an eigenvalue could not be computed)")) goto fail;
    for (int i = 0; i < vc; i++) values[i] = w[k - 1 - i];
    for (int c = 0; c < r; c++) memcpy(vectors + (size_t)c * k, z + (size_t)(k - 1 - c) * k, sizeof(double) * (size_t)k);
    normalise_signs(vectors, k, r);
    goto done;
  }
  z = malloc(sizeof(double) * nk); /* dsytrd's reflectors */
  d = malloc(sizeof(double) * (size_t)k);
  e = malloc(sizeof(double) * (size_t)k);
  tau = malloc(sizeof(double) * (size_t)k);
  if (!z || !d || !e || !tau) FAIL('L', "%s: out of memory for a %d×%d eigendecomposition", fn, k, k);
  memcpy(z, a, sizeof(double) * nk);
  /* The reduction keeps the configured threads from TRIDIAGONAL_THREADS_FROM on (see there); the rest runs on one. */
  if (saved_threads > 1 && k < TRIDIAGONAL_THREADS_FROM) openblas_set_num_threads(1);
  info_ = LAPACKE_dsytrd(LAPACK_COL_MAJOR, 'L', k, z, k, d, e, tau);
  if (!check_lapack(env, fn, "dsytrd", info_, "tridiagonal reduction failed")) goto fail;
  single_thread_for(k);
  if (vc > r) {
    d2 = malloc(sizeof(double) * (size_t)k);
    e2 = malloc(sizeof(double) * (size_t)k);
    if (!d2 || !e2) FAIL('L', "%s: out of memory", fn);
    memcpy(d2, d, sizeof(double) * (size_t)k);
    memcpy(e2, e, sizeof(double) * (size_t)(k > 1 ? k - 1 : 1));
    info_ = LAPACKE_dsterf(k, d2, e2);
    if (!check_lapack(env, fn, "dsterf", info_, "the QL/QR iteration failed to find all eigenvalues in 30·k iterations")) goto fail;
    for (int i = r; i < vc; i++) values[i] = d2[k - 1 - i]; /* ascending → descending */
  }
  if (r > 0) {
    lapack_int found = 0, nsplit = 0;
    w = calloc((size_t)k, sizeof(double)); /* LAPACKE_dstein checks all k entries of w for NaN, not only the r found */
    iblock = malloc(sizeof(lapack_int) * (size_t)k);
    isplit = malloc(sizeof(lapack_int) * (size_t)k);
    ifail = malloc(sizeof(lapack_int) * (size_t)r);
    wv = malloc(sizeof(double) * nz);
    if (!w || !iblock || !isplit || !ifail || !wv) FAIL('L', "%s: out of memory", fn);
    /*
     * abstol 0: dstebz's default, ulp·‖T‖₁ (what scipy's eigh passes to dsyevx). The values
     * carry dsytrd's absolute error ~ulp·‖A‖ whatever the tolerance, so bisecting further
     * (2·safmin, to full relative accuracy of T's tiny values) bought nothing and cost
     * 2–3× the bisection (k = 1000, 152 values: 44 → 21 ms).
     */
    double abstol = 0.0;
    info_ = LAPACKE_dstebz('I', 'B', k, 0, 0, k - r + 1, k, abstol, d, e, &found, &nsplit, w, iblock, isplit);
    if (!check_lapack(env, fn, "dstebz", info_, "bisection did not converge for some eigenvalues, or could not separate close ones (1: not all converged; 2: the count in the index range is off; 3: both)")) goto fail;
    if (found != r) FAIL('L', "%s: dstebz found %d eigenvalues where %d were asked (eigenvalues too close to separate)", fn, (int)found, r);
    info_ = LAPACKE_dstein(LAPACK_COL_MAJOR, k, d, e, r, w, iblock, isplit, wv, k, ifail);
    if (!check_lapack(env, fn, "dstein", info_, "inverse iteration did not converge for that many eigenvectors in 5 iterations")) goto fail;
    info_ = LAPACKE_dormtr(LAPACK_COL_MAJOR, 'L', 'L', 'N', k, r, z, k, tau, wv, k);
    if (!check_lapack(env, fn, "dormtr", info_, "applying the reflectors failed")) goto fail;
    /* dstebz with order 'B' groups by block: sort descending, moving the vectors along (stable for ties). */
    int *order = malloc(sizeof(int) * (size_t)r);
    if (!order) FAIL('L', "%s: out of memory", fn);
    for (int i = 0; i < r; i++) order[i] = i;
    for (int i = 1; i < r; i++) {
      int t = order[i], j = i;
      while (j > 0 && w[order[j - 1]] < w[t]) { order[j] = order[j - 1]; j--; }
      order[j] = t;
    }
    for (int c = 0; c < r; c++) {
      values[c] = w[order[c]];
      memcpy(vectors + (size_t)c * k, wv + (size_t)order[c] * k, sizeof(double) * (size_t)k);
    }
    free(order);
    normalise_signs(vectors, k, r);
    /* Values past r come from dsterf: never above the r-th from bisection (they can differ in the last bit). */
    for (int i = r; i < vc; i++) if (values[i] > values[r - 1]) values[i] = values[r - 1];
  }
done:
  restore_threads(saved_threads);
  free(w); free(d); free(e); free(tau); free(d2); free(e2); free(wv); free(z); free(iblock); free(isplit); free(ifail);
  return undefined(env);
fail:
  restore_threads(saved_threads);
  free(w); free(d); free(e); free(tau); free(d2); free(e2); free(wv); free(z); free(iblock); free(isplit); free(ifail);
  return NULL;
}

/* ------------------------------------------------------------------ general eigen */

/*
 * generalEigen(a, k, wr, wi, vl, vr): dgeev on a copy of the real k×k matrix
 * a. vl and vr (k×k) may be null: no left / right vectors. LAPACK's block form:
 * a complex pair (wi[j] > 0) has vector columns j (real part) and j+1 (imaginary part).
 */
static napi_value GeneralEigen(napi_env env, napi_callback_info info) {
  const char *fn = "generalEigen";
  napi_value argv[6];
  int k;
  double *a, *wr, *wi, *vl, *vr, *copy = NULL;
  size_t nk;
  char sk[64], sl[64];
  if (!get_args(env, info, 6, argv, fn)) return NULL;
  if (!get_dim(env, argv[1], fn, "k", &k)) return NULL;
  if (!entries(env, fn, "A", k, k, &nk)) return NULL;
  snprintf(sk, sizeof sk, "%d×%d", k, k);
  snprintf(sl, sizeof sl, "%d×1", k);
  if (!get_f64(env, argv[0], fn, "A", nk, sk, &a, NULL, false)) return NULL;
  if (!get_f64(env, argv[2], fn, "wr", (size_t)k, sl, &wr, NULL, false)) return NULL;
  if (!get_f64(env, argv[3], fn, "wi", (size_t)k, sl, &wi, NULL, false)) return NULL;
  if (!get_f64(env, argv[4], fn, "vl", nk, sk, &vl, NULL, true)) return NULL;
  if (!get_f64(env, argv[5], fn, "vr", nk, sk, &vr, NULL, true)) return NULL;
  if (!check_finite(env, fn, "A", a, k, k)) return NULL;
  if (k == 0) return undefined(env);
  copy = malloc(sizeof(double) * nk);
  if (!copy) FAIL('L', "%s: out of memory for a %d×%d matrix", fn, k, k);
  memcpy(copy, a, sizeof(double) * nk);
  int saved_threads = single_thread_for(k);
  lapack_int info_ = LAPACKE_dgeev(LAPACK_COL_MAJOR, vl ? 'V' : 'N', vr ? 'V' : 'N', k, copy, k, wr, wi, vl, k, vr, k);
  restore_threads(saved_threads);
  if (!check_lapack(env, fn, "dgeev", info_,
                    "the QR algorithm failed to compute all the eigenvalues; no eigenvectors were computed (values info+1…k converged)")) goto fail;
  free(copy);
  return undefined(env);
fail:
  free(copy);
  return NULL;
}

/* ------------------------------------------------------------------ SVD */

/* svd(a, rows, cols, s, u, vt): thin SVD by dgesdd ('S') of a copy: s (k), u (rows×k), vt (k×cols), k = min(rows, cols). */
static napi_value Svd(napi_env env, napi_callback_info info) {
  const char *fn = "svd";
  napi_value argv[6];
  int rows, cols;
  double *a, *s, *u, *vt, *copy = NULL;
  size_t na, nu, nv;
  char sa[64], ss[64], su[64], sv[64];
  if (!get_args(env, info, 6, argv, fn)) return NULL;
  if (!get_dim(env, argv[1], fn, "rows", &rows) || !get_dim(env, argv[2], fn, "cols", &cols)) return NULL;
  int k = rows < cols ? rows : cols;
  if (!entries(env, fn, "A", rows, cols, &na) || !entries(env, fn, "U", rows, k, &nu) || !entries(env, fn, "Vᵀ", k, cols, &nv)) return NULL;
  snprintf(sa, sizeof sa, "%d×%d", rows, cols);
  snprintf(ss, sizeof ss, "%d×1", k);
  snprintf(su, sizeof su, "%d×%d", rows, k);
  snprintf(sv, sizeof sv, "%d×%d", k, cols);
  if (!get_f64(env, argv[0], fn, "A", na, sa, &a, NULL, false)) return NULL;
  if (!get_f64(env, argv[3], fn, "s", (size_t)k, ss, &s, NULL, false)) return NULL;
  if (!get_f64(env, argv[4], fn, "u", nu, su, &u, NULL, false)) return NULL;
  if (!get_f64(env, argv[5], fn, "vt", nv, sv, &vt, NULL, false)) return NULL;
  if (!check_finite(env, fn, "A", a, rows, cols)) return NULL;
  if (k == 0) return undefined(env);
  copy = malloc(sizeof(double) * na);
  if (!copy) FAIL('L', "%s: out of memory for a %d×%d matrix", fn, rows, cols);
  memcpy(copy, a, sizeof(double) * na);
  int saved_threads = single_thread_for(k);
  lapack_int info_ = LAPACKE_dgesdd(LAPACK_COL_MAJOR, 'S', rows, cols, copy, rows, s, u, rows, vt, k);
  restore_threads(saved_threads);
  if (!check_lapack(env, fn, "dgesdd", info_, "the bidiagonal SVD (dbdsdc) did not converge")) goto fail;
  free(copy);
  return undefined(env);
fail:
  free(copy);
  return NULL;
}

/* ------------------------------------------------------------------ least squares */

/*
 * leastSquares(a, rows, cols, b, nrhs, rcond, x, s) → rank: minimum-norm
 * solution of min ‖A X − B‖_F by dgelsd (SVD; singular values ≤ rcond·σ₁
 * count as zero; rcond < 0: machine precision). x is cols×nrhs, s the
 * min(rows, cols) singular values. A and B are left alone.
 */
static napi_value LeastSquares(napi_env env, napi_callback_info info) {
  const char *fn = "leastSquares";
  napi_value argv[8];
  int rows, cols, nrhs;
  double rcond, *a, *b, *x, *s, *ca = NULL, *cb = NULL;
  size_t na, nb, nx;
  char sa[64], sb[64], sx[64], ss[64];
  if (!get_args(env, info, 8, argv, fn)) return NULL;
  if (!get_dim(env, argv[1], fn, "rows", &rows) || !get_dim(env, argv[2], fn, "cols", &cols) || !get_dim(env, argv[4], fn, "nrhs", &nrhs)) return NULL;
  if (!get_number(env, argv[5], fn, "rcond", &rcond)) return NULL;
  if (isnan(rcond) || rcond >= 1) {
    char m[MSG];
    snprintf(m, MSG, "%s: rcond must be below 1 (negative: machine precision), got %g", fn, rcond);
    throw_kind(env, 'R', m);
    return NULL;
  }
  int k = rows < cols ? rows : cols, ldb = rows > cols ? rows : cols;
  if (ldb < 1) ldb = 1;
  if (!entries(env, fn, "A", rows, cols, &na) || !entries(env, fn, "B", rows, nrhs, &nb) || !entries(env, fn, "X", cols, nrhs, &nx)) return NULL;
  snprintf(sa, sizeof sa, "%d×%d", rows, cols);
  snprintf(sb, sizeof sb, "%d×%d", rows, nrhs);
  snprintf(sx, sizeof sx, "%d×%d", cols, nrhs);
  snprintf(ss, sizeof ss, "%d×1", k);
  if (!get_f64(env, argv[0], fn, "A", na, sa, &a, NULL, false)) return NULL;
  if (!get_f64(env, argv[3], fn, "B", nb, sb, &b, NULL, false)) return NULL;
  if (!get_f64(env, argv[6], fn, "x", nx, sx, &x, NULL, false)) return NULL;
  if (!get_f64(env, argv[7], fn, "s", (size_t)k, ss, &s, NULL, false)) return NULL;
  if (!check_finite(env, fn, "A", a, rows, cols) || !check_finite(env, fn, "B", b, rows, nrhs)) return NULL;
  if (k == 0 || nrhs == 0) {
    memset(x, 0, nx * sizeof(double));
    return number(env, 0);
  }
  ca = malloc(sizeof(double) * na);
  cb = calloc((size_t)ldb * (size_t)nrhs, sizeof(double));
  if (!ca || !cb) FAIL('L', "%s: out of memory for a %d×%d problem", fn, rows, cols);
  memcpy(ca, a, sizeof(double) * na);
  for (int j = 0; j < nrhs; j++) memcpy(cb + (size_t)j * ldb, b + (size_t)j * rows, sizeof(double) * (size_t)rows);
  lapack_int rank = 0;
  int saved_threads = single_thread_for(k);
  lapack_int info_ = LAPACKE_dgelsd(LAPACK_COL_MAJOR, rows, cols, nrhs, ca, rows, cb, ldb, s, rcond, &rank);
  restore_threads(saved_threads);
  if (!check_lapack(env, fn, "dgelsd", info_, "the SVD did not converge (that many off-diagonal entries of the bidiagonal form did not reach zero)")) goto fail;
  for (int j = 0; j < nrhs; j++) memcpy(x + (size_t)j * cols, cb + (size_t)j * ldb, sizeof(double) * (size_t)cols);
  free(ca);
  free(cb);
  return number(env, (double)rank);
fail:
  free(ca);
  free(cb);
  return NULL;
}

/* ------------------------------------------------------------------ threads, identity */

/* setThreads(n): OpenBLAS's thread count (process-wide in OpenBLAS; see grading/linalg/openblas.ts for the rule). */
static napi_value SetThreads(napi_env env, napi_callback_info info) {
  napi_value argv[1];
  int n;
  if (!get_args(env, info, 1, argv, "setThreads")) return NULL;
  if (!get_dim(env, argv[0], "setThreads", "n", &n)) return NULL;
  if (n < 1 || n > 1024) {
    throw_kind(env, 'R', "setThreads: n must be between 1 and 1024");
    return NULL;
  }
  openblas_set_num_threads(n);
  return undefined(env);
}

/*
 * firstNonFinite(x, length): index of the first entry of x[0..length) that is NaN or
 * ±Inf, or -1. The engine's input check on the OpenBLAS backend (one pass at memory
 * speed instead of a JavaScript loop).
 */
static napi_value FirstNonFinite(napi_env env, napi_callback_info info) {
  const char *fn = "firstNonFinite";
  napi_value argv[2];
  int len;
  double *x;
  if (!get_args(env, info, 2, argv, fn)) return NULL;
  if (!get_dim(env, argv[1], fn, "length", &len)) return NULL;
  if (!get_f64(env, argv[0], fn, "x", (size_t)len, "vector", &x, NULL, false)) return NULL;
  return number(env, (double)first_nonfinite(x, (size_t)len));
}

static napi_value Threads(napi_env env, napi_callback_info info) {
  return number(env, (double)openblas_get_num_threads());
}

static napi_value Config(napi_env env, napi_callback_info info) {
  char buf[MSG];
  snprintf(buf, MSG, "%s; core %s; parallel %d", openblas_get_config(), openblas_get_corename(), openblas_get_parallel());
  napi_value v;
  napi_create_string_utf8(env, buf, NAPI_AUTO_LENGTH, &v);
  return v;
}

static napi_value Init(napi_env env, napi_value exports) {
  napi_property_descriptor props[] = {
    { "gram", NULL, Gram, NULL, NULL, NULL, napi_enumerable, NULL },
    { "cross", NULL, Cross, NULL, NULL, NULL, napi_enumerable, NULL },
    { "product", NULL, Product, NULL, NULL, NULL, napi_enumerable, NULL },
    { "symmetricEigen", NULL, SymmetricEigen, NULL, NULL, NULL, napi_enumerable, NULL },
    { "generalEigen", NULL, GeneralEigen, NULL, NULL, NULL, napi_enumerable, NULL },
    { "svd", NULL, Svd, NULL, NULL, NULL, napi_enumerable, NULL },
    { "leastSquares", NULL, LeastSquares, NULL, NULL, NULL, napi_enumerable, NULL },
    { "setThreads", NULL, SetThreads, NULL, NULL, NULL, napi_enumerable, NULL },
    { "firstNonFinite", NULL, FirstNonFinite, NULL, NULL, NULL, napi_enumerable, NULL },
    { "threads", NULL, Threads, NULL, NULL, NULL, napi_enumerable, NULL },
    { "config", NULL, Config, NULL, NULL, NULL, napi_enumerable, NULL },
  };
  napi_define_properties(env, exports, sizeof props / sizeof props[0], props);
  return exports;
}

NAPI_MODULE(NODE_GYP_MODULE_NAME, Init)
