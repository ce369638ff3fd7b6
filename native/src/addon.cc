// tacet_linalg: a thin N-API binding to OpenBLAS/LAPACK for the dense engine.
//
// Storage convention (same as server/engine/linalg/backend.ts): every matrix is a Float64Array in
// column-major order, element (i, j) at data[i + j * rows]; that is LAPACK's order, so inputs are
// read in place and only outputs are allocated. All calls are synchronous: the engine runs in its own
// worker process, so blocking its event loop while LAPACK works costs nothing.
//
// Exports
//   symmetricEigen(n, a, vectors, above?, algorithm?, overwrite?) -> { values, vectors }
//       all pairs: dsytrd + dstedc + a blocked back-transformation (values only: dsyevd, or
//       dsyevd_2stage from n = 3500); with `above`, dsyevr (RANGE='V': eigenpairs with eigenvalue in
//       (above, Gershgorin bound]); only the lower triangle of a is read; values ascending; vectors
//       n × values.length column-major, or null when vectors is false.
//   multiply(m, n, k, a, transA, b, transB) -> c (m × n)            dgemm: C = op(A) op(B)
//   gram(rows, cols, a) -> c (cols × cols, both triangles)          dsyrk: C = Aᵀ A (ssyrk, exactly, when
//       every entry of a is 0 or ±h for one h; see SignPatternGram)
//   solveTriangular(n, t, nrhs, b, lower, unitDiag, transpose) -> x dtrsm: T X = B or Tᵀ X = B
//   cholesky(n, a) -> l | null                                       dpotrf: A = L Lᵀ, L lower (upper
//       part zero); null when A is not positive definite; only the lower triangle of a is read
//   skewSpectrum(n, a, overwrite?) -> { sigma, vectors }                a real antisymmetric A of even n
//       (strict lower triangle read): sigma (n/2, descending) are its singular values, each twice;
//       vectors n × n with columns 2k, 2k+1 = a_k, b_k orthonormal and A a_k = σ_k b_k, A b_k = −σ_k a_k,
//       so they are also eigenvectors of AᵀA for σ_k². See SkewSpectrum.
//   info() -> { blasConfig, threads }
//   setThreads(n)                                                    openblas_set_num_threads
#include <napi.h>
#include <cblas.h>

#include <algorithm>
#include <cmath>
#include <cstring>
#include <limits>
#include <string>
#include <vector>

// LAPACK's Fortran entry points, declared here so that the build needs only libopenblas-dev (Debian's
// OpenBLAS exports them; LAPACKE's header lives in another package). gfortran passes the length of
// each CHARACTER argument as a trailing hidden size_t, declared explicitly for correctness.
extern "C" {
void dsyevd_(const char* jobz, const char* uplo, const int* n, double* a, const int* lda, double* w,
             double* work, const int* lwork, int* iwork, const int* liwork, int* info, size_t jobz_len,
             size_t uplo_len);
void dsyevr_(const char* jobz, const char* range, const char* uplo, const int* n, double* a,
             const int* lda, const double* vl, const double* vu, const int* il, const int* iu,
             const double* abstol, int* m, double* w, double* z, const int* ldz, int* isuppz,
             double* work, const int* lwork, int* iwork, const int* liwork, int* info, size_t jobz_len,
             size_t range_len, size_t uplo_len);
void dsyevd_2stage_(const char* jobz, const char* uplo, const int* n, double* a, const int* lda, double* w,
                    double* work, const int* lwork, int* iwork, const int* liwork, int* info, size_t jobz_len,
                    size_t uplo_len);
void dsytrd_(const char* uplo, const int* n, double* a, const int* lda, double* d, double* e, double* tau,
             double* work, const int* lwork, int* info, size_t uplo_len);
void dstedc_(const char* compz, const int* n, double* d, double* e, double* z, const int* ldz, double* work,
             const int* lwork, int* iwork, const int* liwork, int* info, size_t compz_len);
void dpotrf_(const char* uplo, const int* n, double* a, const int* lda, int* info, size_t uplo_len);
void dlarft_(const char* direct, const char* storev, const int* n, const int* k, const double* v, const int* ldv,
             const double* tau, double* t, const int* ldt, size_t direct_len, size_t storev_len);
void dlarfb_(const char* side, const char* trans, const char* direct, const char* storev, const int* m,
             const int* n, const int* k, const double* v, const int* ldv, const double* t, const int* ldt,
             double* c, const int* ldc, double* work, const int* ldwork, size_t side_len, size_t trans_len,
             size_t direct_len, size_t storev_len);
void dlarfg_(const int* n, double* alpha, double* x, const int* incx, double* tau);
void dbdsdc_(const char* uplo, const char* compq, const int* n, double* d, double* e, double* u, const int* ldu,
             double* vt, const int* ldvt, double* q, int* iq, double* work, int* iwork, int* info, size_t uplo_len,
             size_t compq_len);
}

// the structured engine's kernels, in structured.cc
void RegisterStructuredKernels(Napi::Env env, Napi::Object exports);

namespace {

// Largest dimension accepted: LAPACK's LP64 integers index n*n elements, which must stay below 2^31.
constexpr double kMaxElements = 2147483647.0;

int DimensionArg(const Napi::CallbackInfo& info, size_t index, const char* name) {
  if (!info[index].IsNumber()) {
    throw Napi::TypeError::New(info.Env(), std::string(name) + " must be a number");
  }
  double v = info[index].As<Napi::Number>().DoubleValue();
  if (!(v >= 0) || v != std::floor(v) || v > 2147483647.0) {
    throw Napi::RangeError::New(info.Env(), std::string(name) + " must be a non-negative integer, got " +
                                                 std::to_string(v));
  }
  return static_cast<int>(v);
}

const double* MatrixArg(const Napi::CallbackInfo& info, size_t index, const char* name, double expected) {
  if (!info[index].IsTypedArray() ||
      info[index].As<Napi::TypedArray>().TypedArrayType() != napi_float64_array) {
    throw Napi::TypeError::New(info.Env(), std::string(name) + " must be a Float64Array");
  }
  auto arr = info[index].As<Napi::Float64Array>();
  if (static_cast<double>(arr.ElementLength()) != expected) {
    throw Napi::RangeError::New(info.Env(), std::string(name) + " has " + std::to_string(arr.ElementLength()) +
                                                 " elements, expected " + std::to_string(static_cast<long long>(expected)));
  }
  if (expected > kMaxElements) {
    throw Napi::RangeError::New(info.Env(), std::string(name) + " is too large for 32-bit LAPACK indexing");
  }
  return arr.Data();
}

bool BoolArg(const Napi::CallbackInfo& info, size_t index) {
  return info.Length() > index && info[index].ToBoolean().Value();
}

void CheckInfo(Napi::Env env, const char* routine, int code) {
  if (code == 0) return;
  std::string message = std::string(routine) + " failed with info = " + std::to_string(code);
  if (code > 0) message += " (the algorithm did not converge)";
  else message += " (argument " + std::to_string(-code) + " was illegal)";
  throw Napi::Error::New(env, message);
}

// LAPACK does not detect NaN or infinity in the triangle it reads and would return meaningless results.
void CheckLowerTriangleFinite(Napi::Env env, int n, const double* a) {
  for (int j = 0; j < n; ++j) {
    const double* col = a + static_cast<size_t>(j) * n;
    for (int i = j; i < n; ++i) {
      if (!std::isfinite(col[i])) {
        throw Napi::RangeError::New(env, "matrix entry (" + std::to_string(i) + ", " + std::to_string(j) +
                                             ") is not finite");
      }
    }
  }
}

// Upper bound on every eigenvalue of the symmetric matrix held in the lower triangle (Gershgorin).
double GershgorinUpperBound(int n, const double* a) {
  std::vector<double> radius(n, 0.0);
  double bound = -std::numeric_limits<double>::infinity();
  for (int j = 0; j < n; ++j) {
    const double* col = a + static_cast<size_t>(j) * n;
    for (int i = j + 1; i < n; ++i) {
      double v = std::fabs(col[i]);
      radius[i] += v;
      radius[j] += v;
    }
  }
  for (int j = 0; j < n; ++j) bound = std::max(bound, a[static_cast<size_t>(j) * n + j] + radius[j]);
  return bound;
}

// Below this size the one-stage dsyevd is faster for eigenvalues only; above it dsyevd_2stage, whose
// dense → band reduction is BLAS3 (measured on OpenBLAS 0.3.21, 2 cores: n = 2000 0.58 s against 1.34 s,
// n = 4000 6.3 s against 4.3 s).
constexpr int kTwoStageValuesFrom = 3500;

// Reflector block for the back-transformation. LAPACK's dormtr takes its block size from ilaenv (32
// in OpenBLAS 0.3.21), which keeps the products narrow; 128 makes them wide enough for dgemm to run at
// speed (n = 2000 on 2 cores: 0.40 s against dormtr's 0.57–0.67 s, the same result to rounding).
constexpr int kBackTransformBlock = 128;

using SyevdDriver = decltype(&dsyevd_);

// One dsyevd-family call with its workspace query: jobz 'N' (values) or 'V' (values and vectors,
// which overwrite `a`); `a` is overwritten either way.
void RunSyevd(Napi::Env env, SyevdDriver driver, char jobz, int n, double* a, double* values) {
  const char uplo = 'L';
  int lda = std::max(1, n), info = 0, lwork = -1, liwork = -1, iwork_query = 0;
  double work_query = 0;
  driver(&jobz, &uplo, &n, a, &lda, values, &work_query, &lwork, &iwork_query, &liwork, &info, 1, 1);
  CheckInfo(env, "dsyevd (workspace query)", info);
  lwork = std::max(1, static_cast<int>(work_query));
  liwork = std::max(1, iwork_query);
  std::vector<double> work(lwork);
  std::vector<int> iwork(liwork);
  driver(&jobz, &uplo, &n, a, &lda, values, work.data(), &lwork, iwork.data(), &liwork, &info, 1, 1);
  CheckInfo(env, "dsyevd", info);
}

// Eigenvalues only: dsyevd (JOBZ = 'N') or dsyevd_2stage by size; `a` is overwritten.
void EigenvaluesOnly(Napi::Env env, int n, double* a, double* values) {
  RunSyevd(env, n >= kTwoStageValuesFrom ? dsyevd_2stage_ : dsyevd_, 'N', n, a, values);
}

// Whole spectrum with vectors by LAPACK's own dsyevd (kept for comparison: algorithm "dsyevd").
void EigenpairsByDsyevd(Napi::Env env, int n, double* a_then_vectors, double* values) {
  RunSyevd(env, dsyevd_, 'V', n, a_then_vectors, values);
}

void ApplyTridiagonalQ(int n, const double* a, const double* tau, double* c);

// Whole spectrum with vectors, the steps of dsyevd with a wider back-transformation: Householder
// tridiagonalisation Qᵀ A Q = T (dsytrd, lower), divide and conquer on T (dstedc, COMPZ = 'I'), then
// the eigenvectors Q Z by blocks of kBackTransformBlock reflectors (dlarft + dlarfb), last block first.
// `a` (lower triangle) is overwritten by the reflectors; `vectors` (n × n) receives the eigenvectors.
void EigenpairsByTridiagonal(Napi::Env env, int n, double* a, double* values, double* vectors) {
  if (n == 0) return;
  const char uplo = 'L';
  int lda = n, info = 0, lwork = -1;
  std::vector<double> offDiagonal(std::max(1, n - 1));
  std::vector<double> tau(std::max(1, n - 1));
  double work_query = 0;
  dsytrd_(&uplo, &n, a, &lda, values, offDiagonal.data(), tau.data(), &work_query, &lwork, &info, 1);
  CheckInfo(env, "dsytrd (workspace query)", info);
  lwork = std::max(1, static_cast<int>(work_query));
  {
    std::vector<double> work(lwork);
    dsytrd_(&uplo, &n, a, &lda, values, offDiagonal.data(), tau.data(), work.data(), &lwork, &info, 1);
    CheckInfo(env, "dsytrd", info);
  }
  {
    const char compz = 'I';
    int ldz = n, liwork = -1, iwork_query = 0;
    lwork = -1;
    dstedc_(&compz, &n, values, offDiagonal.data(), vectors, &ldz, &work_query, &lwork, &iwork_query, &liwork,
            &info, 1);
    CheckInfo(env, "dstedc (workspace query)", info);
    lwork = std::max(1, static_cast<int>(work_query));
    liwork = std::max(1, iwork_query);
    std::vector<double> work(lwork);
    std::vector<int> iwork(liwork);
    dstedc_(&compz, &n, values, offDiagonal.data(), vectors, &ldz, work.data(), &lwork, iwork.data(), &liwork,
            &info, 1);
    CheckInfo(env, "dstedc", info);
  }
  ApplyTridiagonalQ(n, a, tau.data(), vectors);
}

// Applies Q = H(1) ⋯ H(n−1), stored as dsytrd ('L') leaves it in `a` (reflector i: v(i+1) = 1, v(i+2:n) in
// A(i+2:n, i), scale tau[i]), to the n × n matrix c from the left, by blocks of kBackTransformBlock
// reflectors (dlarft + dlarfb), last block first.
void ApplyTridiagonalQ(int n, const double* a, const double* tau, double* c) {
  const int rows = n - 1, reflectors = n - 1, block = kBackTransformBlock, lda = n;
  if (reflectors <= 0) return;
  std::vector<double> t(static_cast<size_t>(block) * block);
  std::vector<double> work(static_cast<size_t>(n) * block);
  const double* v = a + 1;
  double* rowsBelowFirst = c + 1;
  for (int first = ((reflectors - 1) / block) * block; first >= 0; first -= block) {
    int count = std::min(block, reflectors - first);
    int length = rows - first;
    const double* vBlock = v + first + static_cast<size_t>(first) * lda;
    dlarft_("F", "C", &length, &count, vBlock, &lda, tau + first, t.data(), &block, 1, 1);
    dlarfb_("L", "N", "F", "C", &length, &n, &count, vBlock, &lda, t.data(), &block, rowsBelowFirst + first, &n,
            work.data(), &n, 1, 1, 1, 1);
  }
}

// y(lo:n) = A v over the indices lo..n−1 for an antisymmetric A held in its strict lower triangle: one
// pass over the triangle, K columns at a time (y_i += A_ij v_j below the diagonal, y_j −= A_ij v_i for
// its mirror), so each entry is read once, as dsymv does for a symmetric matrix. This is most of the
// reduction's time; the build targets plain x86-64, so the loop exists for AVX2 + FMA (chosen at run
// time when the CPU has them; 8 columns, as fast as OpenBLAS's dsymv at n = 2000) and generic.
typedef double Double4 __attribute__((vector_size(32)));

template <int K, bool kVector>
__attribute__((always_inline)) inline void SkewTriangleTimesVectorBody(int n, int lo, const double* __restrict a,
                                                                       const double* __restrict v,
                                        double* __restrict y) {
  for (int i = lo; i < n; ++i) y[i] = 0;
  int j = lo;
  for (; j + K - 1 < n; j += K) {
    const double* col[K];
    double vj[K], s[K];
    for (int q = 0; q < K; ++q) {
      col[q] = a + static_cast<size_t>(j + q) * n;
      vj[q] = v[j + q];
      s[q] = 0;
    }
    // inside the K × K diagonal block
    for (int r = j + 1; r < j + K; ++r) {
      for (int q = 0; j + q < r; ++q) {
        y[r] += col[q][r] * vj[q];
        s[q] += col[q][r] * v[r];
      }
    }
    int i = j + K;
    if (kVector) {
      for (; i < n && (i & 3); ++i) {
        for (int q = 0; q < K; ++q) {
          y[i] += col[q][i] * vj[q];
          s[q] += col[q][i] * v[i];
        }
      }
      Double4 w[K], t[K];
      for (int q = 0; q < K; ++q) {
        w[q] = Double4{vj[q], vj[q], vj[q], vj[q]};
        t[q] = Double4{0, 0, 0, 0};
      }
      for (; i + 3 < n; i += 4) {
        Double4 vi, yi;
        std::memcpy(&vi, v + i, sizeof vi);
        std::memcpy(&yi, y + i, sizeof yi);
        for (int q = 0; q < K; ++q) {
          Double4 aq;
          std::memcpy(&aq, col[q] + i, sizeof aq);
          yi += aq * w[q];
          t[q] += aq * vi;
        }
        std::memcpy(y + i, &yi, sizeof yi);
      }
      for (int q = 0; q < K; ++q) s[q] += (t[q][0] + t[q][1]) + (t[q][2] + t[q][3]);
    }
    for (; i < n; ++i) {
      for (int q = 0; q < K; ++q) {
        y[i] += col[q][i] * vj[q];
        s[q] += col[q][i] * v[i];
      }
    }
    for (int q = 0; q < K; ++q) y[j + q] -= s[q];
  }
  for (; j < n; ++j) {
    const double* c = a + static_cast<size_t>(j) * n;
    double t = 0;
    for (int i = j + 1; i < n; ++i) {
      y[i] += c[i] * v[j];
      t += c[i] * v[i];
    }
    y[j] -= t;
  }
}

__attribute__((target("avx2,fma"))) void SkewTriangleTimesVectorAvx2(int n, int lo, const double* a, const double* v,
                                                                      double* y) {
  SkewTriangleTimesVectorBody<8, true>(n, lo, a, v, y);
}

void SkewTriangleTimesVectorGeneric(int n, int lo, const double* a, const double* v, double* y) {
  SkewTriangleTimesVectorBody<4, false>(n, lo, a, v, y);
}

void SkewTriangleTimesVector(int n, int lo, const double* a, const double* v, double* y) {
  static const bool avx2 = __builtin_cpu_supports("avx2") && __builtin_cpu_supports("fma");
  if (avx2) SkewTriangleTimesVectorAvx2(n, lo, a, v, y);
  else SkewTriangleTimesVectorGeneric(n, lo, a, v, y);
}

// Panel width of the skew tridiagonal reduction (as dsytrd's 32–64; 64 was the faster at n = 2000).
constexpr int kSkewPanel = 64;

// Householder reduction of a real antisymmetric A to antisymmetric tridiagonal form, Qᵀ A Q = T, reading
// and writing only the strict lower triangle, which it leaves holding the reflectors in dsytrd's 'L'
// layout (so ApplyTridiagonalQ forms Q Z); sub[c] = T(c+1, c). For antisymmetric A and H = I − τ v vᵀ,
// vᵀ A v = 0, so H A H = A + v pᵀ − p vᵀ with p = τ A v: a rank-2 update without dsytrd's correction
// term. Panels of kSkewPanel reflectors are accumulated as V and P (A is A + V Pᵀ − P Vᵀ until the
// panel's end) and applied to the trailing lower triangle by dgemm on block columns.
void SkewTridiagonal(int n, double* a, double* sub, double* tau) {
  const int nb = kSkewPanel;
  std::vector<double> vPanel(static_cast<size_t>(n) * nb), pPanel(static_cast<size_t>(n) * nb), y(n), w(2 * nb);
  const int one = 1;
  for (int k0 = 0; k0 < n - 1; k0 += nb) {
    const int panel = std::min(nb, n - 1 - k0);
    std::fill(vPanel.begin(), vPanel.end(), 0.0);
    std::fill(pPanel.begin(), pPanel.end(), 0.0);
    double* V = vPanel.data();
    double* P = pPanel.data();
    for (int j = 0; j < panel; ++j) {
      const int c = k0 + j;
      double* col = a + static_cast<size_t>(c) * n;
      int len = n - c - 1;
      if (j > 0) {
        // column c as the panel's earlier reflectors left it: + V P(c, :)ᵀ − P V(c, :)ᵀ
        cblas_dgemv(CblasColMajor, CblasNoTrans, len, j, 1.0, V + c + 1, n, P + c, n, 1.0, col + c + 1, 1);
        cblas_dgemv(CblasColMajor, CblasNoTrans, len, j, -1.0, P + c + 1, n, V + c, n, 1.0, col + c + 1, 1);
      }
      double alpha = col[c + 1];
      double t = 0;
      if (len > 1) dlarfg_(&len, &alpha, col + c + 2, &one, &t);
      sub[c] = alpha;
      tau[c] = t;
      double* v = V + static_cast<size_t>(j) * n;
      v[c + 1] = 1.0;
      for (int i = c + 2; i < n; ++i) v[i] = col[i];
      if (t == 0) continue;
      // p = τ (A v + V (Pᵀ v) − P (Vᵀ v)) on the indices past c
      SkewTriangleTimesVector(n, c + 1, a, v, y.data());
      if (j > 0) {
        cblas_dgemv(CblasColMajor, CblasTrans, len, j, 1.0, P + c + 1, n, v + c + 1, 1, 0.0, w.data(), 1);
        cblas_dgemv(CblasColMajor, CblasTrans, len, j, 1.0, V + c + 1, n, v + c + 1, 1, 0.0, w.data() + nb, 1);
        cblas_dgemv(CblasColMajor, CblasNoTrans, len, j, 1.0, V + c + 1, n, w.data(), 1, 1.0, y.data() + c + 1, 1);
        cblas_dgemv(CblasColMajor, CblasNoTrans, len, j, -1.0, P + c + 1, n, w.data() + nb, 1, 1.0, y.data() + c + 1, 1);
      }
      double* p = P + static_cast<size_t>(j) * n;
      for (int i = c + 1; i < n; ++i) p[i] = t * y[i];
    }
    // the trailing lower triangle (indices from k0 + panel) takes the panel's V Pᵀ − P Vᵀ
    const int start = k0 + panel;
    constexpr int kColumns = 128;
    for (int jb = start; jb < n; jb += kColumns) {
      const int cols = std::min(kColumns, n - jb);
      const int rows = n - jb;
      double* block = a + jb + static_cast<size_t>(jb) * n;
      cblas_dgemm(CblasColMajor, CblasNoTrans, CblasTrans, rows, cols, panel, 1.0, V + jb, n, P + jb, n, 1.0, block, n);
      cblas_dgemm(CblasColMajor, CblasNoTrans, CblasTrans, rows, cols, panel, -1.0, P + jb, n, V + jb, n, 1.0, block, n);
    }
  }
}

// The normal form of a real antisymmetric A (n even) in real arithmetic: the tridiagonal T = Qᵀ A Q of
// SkewTridiagonal, with t_c = T(c+1, c), maps the even positions into the odd ones by the upper
// bidiagonal Bd (n/2 × n/2, diagonal t_0, t_2, …, superdiagonal −t_1, −t_3, …) and back by −Bdᵀ. With
// the SVD Bd = U Σ Vᵀ (dbdsdc), a_k = Q (v_k on the even positions) and b_k = Q (u_k on the odd ones)
// give A a_k = σ_k b_k and A b_k = −σ_k a_k. Against the eigendecomposition of AᵀA this needs no Gram
// product, its divide and conquer runs on n/2 instead of n, and each σ comes out to about ε‖A‖
// absolutely instead of ε‖A‖²/σ.
Napi::Value SkewSpectrum(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  int n = DimensionArg(info, 0, "n");
  const double* a = MatrixArg(info, 1, "a", static_cast<double>(n) * n);
  if (n % 2 != 0) throw Napi::RangeError::New(env, "skewSpectrum needs an even n, got " + std::to_string(n));
  for (int j = 0; j < n; ++j) {
    const double* col = a + static_cast<size_t>(j) * n;
    for (int i = j + 1; i < n; ++i) {
      if (!std::isfinite(col[i])) {
        throw Napi::RangeError::New(env, "matrix entry (" + std::to_string(i) + ", " + std::to_string(j) +
                                             ") is not finite");
      }
    }
  }
  const size_t nn = static_cast<size_t>(n) * n;
  const int half = n / 2;
  auto sigma = Napi::Float64Array::New(env, half);
  auto vectors = Napi::Float64Array::New(env, nn);
  auto result = Napi::Object::New(env);
  result.Set("sigma", sigma);
  result.Set("vectors", vectors);
  if (n == 0) return result;
  std::vector<double> scratch;
  double* work_a = const_cast<double*>(a);
  if (!BoolArg(info, 2)) {
    scratch.assign(a, a + nn);
    work_a = scratch.data();
  }
  std::vector<double> sub(n, 0.0), tau(n, 0.0);
  SkewTridiagonal(n, work_a, sub.data(), tau.data());
  double* d = sigma.Data();
  std::vector<double> e(std::max(1, half), 0.0);
  for (int j = 0; j < half; ++j) {
    d[j] = sub[2 * j];
    if (j + 1 < half) e[j] = -sub[2 * j + 1];
  }
  std::vector<double> u(static_cast<size_t>(half) * half), vt(static_cast<size_t>(half) * half);
  std::vector<double> work(3 * static_cast<size_t>(half) * half + 4 * static_cast<size_t>(half));
  std::vector<int> iwork(8 * static_cast<size_t>(half));
  int code = 0, iq = 0;
  double q = 0;
  dbdsdc_("U", "I", &half, d, e.data(), u.data(), &half, vt.data(), &half, &q, &iq, work.data(), iwork.data(), &code,
          1, 1);
  CheckInfo(env, "dbdsdc", code);
  double* z = vectors.Data();
  std::fill(z, z + nn, 0.0);
  for (int k = 0; k < half; ++k) {
    double* za = z + static_cast<size_t>(2 * k) * n;
    double* zb = za + n;
    for (int j = 0; j < half; ++j) {
      za[2 * j] = vt[k + static_cast<size_t>(j) * half];
      zb[2 * j + 1] = u[j + static_cast<size_t>(k) * half];
    }
  }
  ApplyTridiagonalQ(n, work_a, tau.data(), z);
  return result;
}

// `writable` is the caller's own array when it allowed its input to be used as workspace (saves a copy
// of n² entries), else null and the input is copied.
Napi::Value EigenAll(Napi::Env env, int n, const double* a, bool wantVectors, bool lapackDriver, double* writable) {
  size_t nn = static_cast<size_t>(n) * n;
  auto values = Napi::Float64Array::New(env, n);
  auto result = Napi::Object::New(env);
  std::vector<double> scratch;
  auto workspace = [&]() -> double* {
    if (writable) return writable;
    scratch.assign(a, a + nn);
    return scratch.data();
  };
  if (!wantVectors) {
    EigenvaluesOnly(env, n, workspace(), values.Data());
    result.Set("values", values);
    result.Set("vectors", env.Null());
    return result;
  }
  auto vectors = Napi::Float64Array::New(env, nn);
  if (lapackDriver) {
    // dsyevd overwrites its input with the eigenvectors, so the copy becomes the output directly.
    std::memcpy(vectors.Data(), a, nn * sizeof(double));
    EigenpairsByDsyevd(env, n, vectors.Data(), values.Data());
  } else {
    EigenpairsByTridiagonal(env, n, workspace(), values.Data(), vectors.Data());
  }
  result.Set("values", values);
  result.Set("vectors", vectors);
  return result;
}

Napi::Value EigenAbove(Napi::Env env, int n, const double* a, bool wantVectors, double above, double vu) {
  auto result = Napi::Object::New(env);
  size_t nn = static_cast<size_t>(n) * n;
  std::vector<double> work_a(a, a + nn);  // dsyevr destroys its input triangle
  std::vector<double> w(n);
  std::vector<double> z(wantVectors ? nn : 1);
  std::vector<int> isuppz(2 * static_cast<size_t>(n));
  const char jobz = wantVectors ? 'V' : 'N';
  const char range = 'V';
  const char uplo = 'L';
  int lda = n, ldz = wantVectors ? n : 1, il = 0, iu = 0, m = 0, info = 0, lwork = -1, liwork = -1,
      iwork_query = 0;
  double vl = above, abstol = 0.0, work_query = 0;
  dsyevr_(&jobz, &range, &uplo, &n, work_a.data(), &lda, &vl, &vu, &il, &iu, &abstol, &m, w.data(), z.data(),
          &ldz, isuppz.data(), &work_query, &lwork, &iwork_query, &liwork, &info, 1, 1, 1);
  CheckInfo(env, "dsyevr (workspace query)", info);
  lwork = std::max(1, static_cast<int>(work_query));
  liwork = std::max(1, iwork_query);
  std::vector<double> work(lwork);
  std::vector<int> iwork(liwork);
  dsyevr_(&jobz, &range, &uplo, &n, work_a.data(), &lda, &vl, &vu, &il, &iu, &abstol, &m, w.data(), z.data(),
          &ldz, isuppz.data(), work.data(), &lwork, iwork.data(), &liwork, &info, 1, 1, 1);
  CheckInfo(env, "dsyevr", info);
  auto values = Napi::Float64Array::New(env, m);
  std::copy(w.begin(), w.begin() + m, values.Data());
  result.Set("values", values);
  if (wantVectors) {
    auto vectors = Napi::Float64Array::New(env, static_cast<size_t>(n) * m);
    std::copy(z.begin(), z.begin() + static_cast<size_t>(n) * m, vectors.Data());
    result.Set("vectors", vectors);
  } else {
    result.Set("vectors", env.Null());
  }
  return result;
}

// symmetricEigen(n, a, vectors, above?, algorithm?, overwrite?): algorithm "tridiagonal" (whole spectrum: dsytrd,
// dstedc and the wide back-transformation above; the default), "dsyevd" (whole spectrum by LAPACK's
// driver, for comparison) or "dsyevr" (range above a cut, the default for a range) forces a routine. Measured on ΔᵀΔ of sprinkled 2D diamonds (N = 1000–4000, OpenBLAS 0.3.21), a hand-built MRRR
// path (dsytrd + dstemr + dormtr) was 1.5–2× slower than both, so it is not offered.
Napi::Value SymmetricEigen(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  int n = DimensionArg(info, 0, "n");
  const double* a = MatrixArg(info, 1, "a", static_cast<double>(n) * n);
  bool wantVectors = BoolArg(info, 2);
  CheckLowerTriangleFinite(env, n, a);
  bool subset = false;
  double above = -std::numeric_limits<double>::infinity();
  if (info.Length() > 3 && !info[3].IsUndefined() && !info[3].IsNull()) {
    if (!info[3].IsNumber()) throw Napi::TypeError::New(env, "above must be a number");
    above = info[3].As<Napi::Number>().DoubleValue();
    if (std::isnan(above)) throw Napi::RangeError::New(env, "above must not be NaN");
    subset = above != -std::numeric_limits<double>::infinity();
  }
  std::string algorithm = "auto";
  if (info.Length() > 4 && info[4].IsString()) algorithm = info[4].As<Napi::String>().Utf8Value();
  // overwrite: the caller's array may serve as workspace and is left undefined (only the whole spectrum)
  double* writable = BoolArg(info, 5) ? const_cast<double*>(a) : nullptr;
  if (algorithm != "auto" && algorithm != "tridiagonal" && algorithm != "dsyevd" && algorithm != "dsyevr") {
    throw Napi::RangeError::New(env, "unknown eigen algorithm '" + algorithm + "'");
  }
  double vu = 0;
  if (subset) {
    double bound = n > 0 ? GershgorinUpperBound(n, a) : above;
    // (above, vu] with vu just past the Gershgorin bound holds the whole spectrum above the cut.
    vu = bound + std::max(1.0, std::fabs(bound)) * 1e-6;
    if (n == 0 || !(above < vu)) {
      auto empty = Napi::Object::New(env);
      empty.Set("values", Napi::Float64Array::New(env, 0));
      empty.Set("vectors", wantVectors ? Napi::Value(Napi::Float64Array::New(env, 0)) : env.Null());
      return empty;
    }
  }
  if (algorithm == "dsyevd" || algorithm == "tridiagonal") {
    if (subset) throw Napi::RangeError::New(env, algorithm + " computes the whole spectrum; use dsyevr for a range");
    return EigenAll(env, n, a, wantVectors, algorithm == "dsyevd", writable);
  }
  if (algorithm == "dsyevr") {
    if (!subset) throw Napi::RangeError::New(env, "dsyevr is bound here only for the range above a cut");
    return EigenAbove(env, n, a, wantVectors, above, vu);
  }
  return subset ? EigenAbove(env, n, a, wantVectors, above, vu) : EigenAll(env, n, a, wantVectors, false, writable);
}

// multiply(m, n, k, a, transA, b, transB): C (m × n) = op(A) op(B), op(A) m × k, op(B) k × n.
Napi::Value Multiply(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  int m = DimensionArg(info, 0, "m");
  int n = DimensionArg(info, 1, "n");
  int k = DimensionArg(info, 2, "k");
  bool transA = BoolArg(info, 4);
  bool transB = BoolArg(info, 6);
  const double* a = MatrixArg(info, 3, "a", static_cast<double>(m) * k);
  const double* b = MatrixArg(info, 5, "b", static_cast<double>(k) * n);
  if (static_cast<double>(m) * n > kMaxElements) throw Napi::RangeError::New(env, "product is too large");
  auto c = Napi::Float64Array::New(env, static_cast<size_t>(m) * n);
  if (m == 0 || n == 0) return c;
  if (k == 0) {
    std::fill(c.Data(), c.Data() + static_cast<size_t>(m) * n, 0.0);
    return c;
  }
  int lda = transA ? k : m;
  int ldb = transB ? n : k;
  cblas_dgemm(CblasColMajor, transA ? CblasTrans : CblasNoTrans, transB ? CblasTrans : CblasNoTrans, m, n, k,
              1.0, a, lda, b, ldb, 0.0, c.Data(), m);
  return c;
}

// cholesky(n, a): the lower factor L of A = L Lᵀ (dpotrf), or null when A is not positive definite.
Napi::Value Cholesky(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  int n = DimensionArg(info, 0, "n");
  const double* a = MatrixArg(info, 1, "a", static_cast<double>(n) * n);
  CheckLowerTriangleFinite(env, n, a);
  size_t nn = static_cast<size_t>(n) * n;
  auto l = Napi::Float64Array::New(env, nn);
  double* ld = l.Data();
  for (int j = 0; j < n; ++j) {
    size_t col = static_cast<size_t>(j) * n;
    std::fill(ld + col, ld + col + j, 0.0);
    std::copy(a + col + j, a + col + n, ld + col + j);
  }
  if (n == 0) return l;
  const char uplo = 'L';
  int lda = n, code = 0;
  dpotrf_(&uplo, &n, ld, &lda, &code, 1);
  if (code > 0) return env.Null();
  CheckInfo(env, "dpotrf", code);
  return l;
}

// Below this many rows every entry of SᵀS for a 0/±1 matrix S is an integer of magnitude < 2^24, which
// single precision holds exactly.
constexpr int kSinglePrecisionExactRows = 1 << 24;

// The lower triangle of AᵀA when every entry of A is 0 or ±h for one h (the Pauli–Jordan matrix of a
// massless field: h = ½ in 2D, the link weight in 4D): A = h S with S of 0/±1, and SᵀS computed by
// ssyrk — exact, as its entries are integers below 2^24 — at about half the time of dsyrk, then scaled
// by h² (one rounding per entry, none when h is a power of two). Returns false, having written
// nothing, when A is not of that form.
bool SignPatternGram(int rows, int cols, const double* a, double* lower) {
  if (rows >= kSinglePrecisionExactRows) return false;
  size_t count = static_cast<size_t>(rows) * cols;
  double h = 0;
  for (size_t k = 0; k < count && h == 0; ++k) h = std::fabs(a[k]);
  if (h == 0 || !std::isfinite(h)) return false;
  // scan before allocating: a general matrix leaves at its first other entry, having cost nothing
  for (size_t k = 0; k < count; ++k) {
    if (a[k] != 0 && a[k] != h && a[k] != -h) return false;
  }
  std::vector<float> signs(count);
  for (size_t k = 0; k < count; ++k) signs[k] = a[k] == 0 ? 0.0f : (a[k] > 0 ? 1.0f : -1.0f);
  size_t nc = static_cast<size_t>(cols);
  std::vector<float> product(nc * nc);
  cblas_ssyrk(CblasColMajor, CblasLower, CblasTrans, cols, rows, 1.0f, signs.data(), rows, 0.0f, product.data(), cols);
  double scale = h * h;
  for (size_t j = 0; j < nc; ++j) {
    for (size_t i = j; i < nc; ++i) lower[i + j * nc] = scale * static_cast<double>(product[i + j * nc]);
  }
  return true;
}

// gram(rows, cols, a): C (cols × cols) = Aᵀ A with both triangles filled.
Napi::Value Gram(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  int rows = DimensionArg(info, 0, "rows");
  int cols = DimensionArg(info, 1, "cols");
  const double* a = MatrixArg(info, 2, "a", static_cast<double>(rows) * cols);
  if (static_cast<double>(cols) * cols > kMaxElements) throw Napi::RangeError::New(env, "product is too large");
  size_t nc = static_cast<size_t>(cols);
  auto c = Napi::Float64Array::New(env, nc * nc);
  double* cd = c.Data();
  if (cols == 0) return c;
  if (rows == 0) {
    std::fill(cd, cd + nc * nc, 0.0);
    return c;
  }
  if (!SignPatternGram(rows, cols, a, cd)) {
    cblas_dsyrk(CblasColMajor, CblasLower, CblasTrans, cols, rows, 1.0, a, rows, 0.0, cd, cols);
  }
  // Mirror the lower triangle in blocks so that both the read and the write stay in cache.
  constexpr size_t kBlock = 64;
  for (size_t jb = 0; jb < nc; jb += kBlock) {
    for (size_t ib = jb; ib < nc; ib += kBlock) {
      size_t jEnd = std::min(nc, jb + kBlock), iEnd = std::min(nc, ib + kBlock);
      for (size_t j = jb; j < jEnd; ++j) {
        for (size_t i = std::max(ib, j + 1); i < iEnd; ++i) cd[j + i * nc] = cd[i + j * nc];
      }
    }
  }
  return c;
}

// solveTriangular(n, t, nrhs, b, lower, unitDiag, transpose): X (n × nrhs) with op(T) X = B.
Napi::Value SolveTriangular(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  int n = DimensionArg(info, 0, "n");
  const double* t = MatrixArg(info, 1, "t", static_cast<double>(n) * n);
  int nrhs = DimensionArg(info, 2, "nrhs");
  const double* b = MatrixArg(info, 3, "b", static_cast<double>(n) * nrhs);
  bool lower = BoolArg(info, 4);
  bool unitDiag = BoolArg(info, 5);
  bool transpose = BoolArg(info, 6);
  size_t len = static_cast<size_t>(n) * nrhs;
  auto x = Napi::Float64Array::New(env, len);
  std::memcpy(x.Data(), b, len * sizeof(double));
  if (n == 0 || nrhs == 0) return x;
  if (!unitDiag) {
    for (int i = 0; i < n; ++i) {
      if (t[static_cast<size_t>(i) * n + i] == 0.0) {
        throw Napi::RangeError::New(env, "triangular matrix is singular: diagonal entry " + std::to_string(i) +
                                             " is zero");
      }
    }
  }
  cblas_dtrsm(CblasColMajor, CblasLeft, lower ? CblasLower : CblasUpper, transpose ? CblasTrans : CblasNoTrans,
              unitDiag ? CblasUnit : CblasNonUnit, n, nrhs, 1.0, t, n, x.Data(), n);
  return x;
}

Napi::Value Info(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  auto result = Napi::Object::New(env);
  result.Set("blasConfig", Napi::String::New(env, openblas_get_config()));
  result.Set("threads", Napi::Number::New(env, openblas_get_num_threads()));
  return result;
}

Napi::Value SetThreads(const Napi::CallbackInfo& info) {
  int threads = DimensionArg(info, 0, "threads");
  if (threads < 1) throw Napi::RangeError::New(info.Env(), "threads must be at least 1");
  openblas_set_num_threads(threads);
  return Napi::Number::New(info.Env(), openblas_get_num_threads());
}

// node-addon-api turns a C++ exception into a JavaScript one; but in a worker thread that is being
// terminated (a cancelled run) no JavaScript exception can be raised, node-addon-api then throws again
// from its own handler and the whole process aborts. Deliver what can be delivered, drop the rest.
template <Napi::Value (*Routine)(const Napi::CallbackInfo&)>
Napi::Value Guarded(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  try {
    return Routine(info);
  } catch (const Napi::Error& error) {
    try {
      error.ThrowAsJavaScriptException();
    } catch (...) {
    }
  } catch (const std::exception& error) {
    try {
      Napi::Error::New(env, error.what()).ThrowAsJavaScriptException();
    } catch (...) {
    }
  } catch (...) {
  }
  return Napi::Value();
}

Napi::Object Init(Napi::Env env, Napi::Object exports) {
  exports.Set("setThreads", Napi::Function::New(env, Guarded<SetThreads>));
  exports.Set("symmetricEigen", Napi::Function::New(env, Guarded<SymmetricEigen>));
  exports.Set("multiply", Napi::Function::New(env, Guarded<Multiply>));
  exports.Set("gram", Napi::Function::New(env, Guarded<Gram>));
  exports.Set("solveTriangular", Napi::Function::New(env, Guarded<SolveTriangular>));
  exports.Set("cholesky", Napi::Function::New(env, Guarded<Cholesky>));
  exports.Set("skewSpectrum", Napi::Function::New(env, Guarded<SkewSpectrum>));
  exports.Set("info", Napi::Function::New(env, Guarded<Info>));
  RegisterStructuredKernels(env, exports);
  return exports;
}

}  // namespace

NODE_API_MODULE(tacet_linalg, Init)
