// Kernels of the structured (large-N) engine, registered into tacet_linalg by addon.cc's Init:
// the 2D Pauli–Jordan operator on a block of vectors (two dominance sweeps with a Fenwick tree, the
// JavaScript in server/engine/structured/dominance2d.ts does the same), and the tall-skinny products
// of block Gram–Schmidt against a Lanczos basis stored in row blocks as float32 or float64 with every
// sum accumulated in float64 (server/engine/structured/basis.ts). BLAS has no product of a float32
// matrix with a float64 one that sums in double, and for the 16-column blocks of Lanczos dgemm runs far
// below its peak; these loops are written so that the compiler keeps one row of the block in
// registers and streams the basis once.
//
// Exports
//   structuredApplyBlock(byU, ranks, groupStart, vRanks, c, width, input, output)
//       output = Δ input for `width` column-major vectors: gather into sweep order, retarded and advanced
//       sweeps with the massive substitution c = m²/(2ρ), output = ½(past − future), scattered back.
//   basisProject(rows, m, width, v, w, ldw, wOffset, out)
//       out[j + l·m] += Σ_i v[i + j·rows] w[wOffset + i + l·ldw]   (out = Vᵀ W, m × width)
//   basisUpdate(rows, m, width, v, coefficients, w, ldw, wOffset, alpha, beta)
//       w[wOffset + i + l·ldw] = beta·w + alpha Σ_j v[i + j·rows] coefficients[j + l·m]
//   basisCombine(rows, m, outputs, v, coefficients, out, ldo, oOffset)
//       out[oOffset + i + c·ldo] = Σ_j v[i + j·rows] coefficients[j + c·m]: the Ritz vectors, a fat
//       product, done by dgemm on float64 copies of tiles of rows
//   solveUpperRight(n, width, w, r)
//       W ← W R⁻¹ for column-major n × width W and upper triangular width × width R (dtrsm).
// v is a Float32Array or a Float64Array; everything else is Float64Array (ranks and labels Int32Array).
#pragma GCC optimize("O3")
#include <napi.h>
#include <cblas.h>

#include <algorithm>
#include <cstdint>
#include <cstring>
#include <string>
#include <thread>
#include <type_traits>
#include <vector>

namespace {

#if defined(__x86_64__) && defined(__GNUC__) && !defined(__clang__)
#define TACET_CLONES __attribute__((target_clones("avx512f", "avx2", "default")))
#else
#define TACET_CLONES
#endif

constexpr int kTileRows = 128;

size_t SizeArg(const Napi::CallbackInfo& info, size_t index, const char* name) {
  if (!info[index].IsNumber()) throw Napi::TypeError::New(info.Env(), std::string(name) + " must be a number");
  double v = info[index].As<Napi::Number>().DoubleValue();
  if (!(v >= 0) || v != static_cast<double>(static_cast<int64_t>(v)) || v > 4.0e15) {
    throw Napi::RangeError::New(info.Env(), std::string(name) + " must be a non-negative integer");
  }
  return static_cast<size_t>(v);
}

template <typename T, napi_typedarray_type kind>
T* ArrayArg(const Napi::CallbackInfo& info, size_t index, const char* name, size_t atLeast, const char* typeName) {
  if (!info[index].IsTypedArray() || info[index].As<Napi::TypedArray>().TypedArrayType() != kind) {
    throw Napi::TypeError::New(info.Env(), std::string(name) + " must be a " + typeName);
  }
  auto arr = info[index].As<Napi::TypedArrayOf<T>>();
  if (arr.ElementLength() < atLeast) {
    throw Napi::RangeError::New(info.Env(), std::string(name) + " has " + std::to_string(arr.ElementLength()) +
                                                " entries, needs at least " + std::to_string(atLeast));
  }
  return arr.Data();
}

double* DoubleArg(const Napi::CallbackInfo& info, size_t index, const char* name, size_t atLeast) {
  return ArrayArg<double, napi_float64_array>(info, index, name, atLeast, "Float64Array");
}

int32_t* IntArg(const Napi::CallbackInfo& info, size_t index, const char* name, size_t atLeast) {
  return ArrayArg<int32_t, napi_int32_array>(info, index, name, atLeast, "Int32Array");
}

// Threads for one call: OpenBLAS's current count, which the backend's thread policy sets from the load
// other processes put on the machine (server/engine/linalg/nativeBackend.ts), and only for work large
// enough to pay for starting them.
size_t ThreadsFor(size_t work) {
  if (work < (size_t{1} << 22)) return 1;
  int threads = openblas_get_num_threads();
  return static_cast<size_t>(std::max(1, std::min(threads, 8)));
}

// ---------------------------------------------------------------- the 2D Pauli–Jordan operator

// How far ahead (in sweep order) the tree nodes of a point are prefetched, and how many of each path:
// the tree of 100 000 ranks × 16 lanes is 12.8 MB, beyond the per-core cache, and the first nodes of
// each path (the fine levels) are scattered, so each access waited on memory (102 ms per block product
// at N = 100 000); the coarse levels are shared by all paths and stay cached.
constexpr int32_t kPrefetchAhead = 12;
constexpr int kPrefetchNodes = 7;

template <int W>
inline void PrefetchPaths(const double* tree, int32_t rank, int32_t vRanks, bool future) {
  const int lines = (W * 8 + 63) / 64;
  int32_t i = future ? vRanks - rank : rank - 1;
  for (int k = 0; k < kPrefetchNodes && i > 0; k++, i -= i & -i)
    for (int l = 0; l < lines; l++) __builtin_prefetch(reinterpret_cast<const char*>(tree + static_cast<size_t>(i) * W) + 64 * l, 0, 3);
  i = future ? vRanks + 1 - rank : rank;
  for (int k = 0; k < kPrefetchNodes && i <= vRanks; k++, i += i & -i)
    for (int l = 0; l < lines; l++) __builtin_prefetch(reinterpret_cast<const char*>(tree + static_cast<size_t>(i) * W) + 64 * l, 1, 3);
}

template <int W>
TACET_CLONES void SweepFixed(const int32_t* ranks, const int32_t* groupStart, size_t groups, int32_t vRanks,
                             const double* w, double* sums, double c, bool future, double* tree) {
  std::fill(tree, tree + static_cast<size_t>(vRanks + 1) * W, 0.0);
  double z[W];
  const int32_t n = groupStart[groups];
  for (size_t gi = 0; gi < groups; gi++) {
    size_t g = future ? groups - 1 - gi : gi;
    int32_t begin = groupStart[g], end = groupStart[g + 1];
    for (int32_t p = begin; p < end; p++) {
      int32_t ahead = future ? p - kPrefetchAhead : p + kPrefetchAhead;
      if (ahead >= 0 && ahead < n) PrefetchPaths<W>(tree, ranks[ahead], vRanks, future);
      double acc[W] = {};
      for (int32_t i = future ? vRanks - ranks[p] : ranks[p] - 1; i > 0; i -= i & -i) {
        const double* node = tree + static_cast<size_t>(i) * W;
        for (int l = 0; l < W; l++) acc[l] += node[l];
      }
      double* out = sums + static_cast<size_t>(p) * W;
      for (int l = 0; l < W; l++) out[l] = acc[l];
    }
    for (int32_t p = begin; p < end; p++) {
      const double* in = w + static_cast<size_t>(p) * W;
      const double* s = sums + static_cast<size_t>(p) * W;
      for (int l = 0; l < W; l++) z[l] = in[l] - c * s[l];
      for (int32_t i = future ? vRanks + 1 - ranks[p] : ranks[p]; i <= vRanks; i += i & -i) {
        double* node = tree + static_cast<size_t>(i) * W;
        for (int l = 0; l < W; l++) node[l] += z[l];
      }
    }
  }
}

void SweepAny(const int32_t* ranks, const int32_t* groupStart, size_t groups, int32_t vRanks, const double* w,
              double* sums, double c, bool future, double* tree, int width) {
  std::fill(tree, tree + static_cast<size_t>(vRanks + 1) * width, 0.0);
  std::vector<double> z(width);
  for (size_t gi = 0; gi < groups; gi++) {
    size_t g = future ? groups - 1 - gi : gi;
    int32_t begin = groupStart[g], end = groupStart[g + 1];
    for (int32_t p = begin; p < end; p++) {
      double* out = sums + static_cast<size_t>(p) * width;
      std::fill(out, out + width, 0.0);
      for (int32_t i = future ? vRanks - ranks[p] : ranks[p] - 1; i > 0; i -= i & -i) {
        const double* node = tree + static_cast<size_t>(i) * width;
        for (int l = 0; l < width; l++) out[l] += node[l];
      }
    }
    for (int32_t p = begin; p < end; p++) {
      const double* in = w + static_cast<size_t>(p) * width;
      const double* s = sums + static_cast<size_t>(p) * width;
      for (int l = 0; l < width; l++) z[l] = in[l] - c * s[l];
      for (int32_t i = future ? vRanks + 1 - ranks[p] : ranks[p]; i <= vRanks; i += i & -i) {
        double* node = tree + static_cast<size_t>(i) * width;
        for (int l = 0; l < width; l++) node[l] += z[l];
      }
    }
  }
}

void Sweep(const int32_t* ranks, const int32_t* groupStart, size_t groups, int32_t vRanks, const double* w,
           double* sums, double c, bool future, double* tree, int width) {
  switch (width) {
    case 16: return SweepFixed<16>(ranks, groupStart, groups, vRanks, w, sums, c, future, tree);
    case 8: return SweepFixed<8>(ranks, groupStart, groups, vRanks, w, sums, c, future, tree);
    case 32: return SweepFixed<32>(ranks, groupStart, groups, vRanks, w, sums, c, future, tree);
    default: return SweepAny(ranks, groupStart, groups, vRanks, w, sums, c, future, tree, width);
  }
}

struct SweepWorkspace {
  std::vector<double> sorted, past, future, tree;
  std::vector<int32_t> position;
  void Reserve(size_t n, size_t width, size_t vRanks) {
    if (sorted.size() < n * width) {
      sorted.resize(n * width);
      past.resize(n * width);
      future.resize(n * width);
    }
    if (tree.size() < (vRanks + 1) * width) tree.resize((vRanks + 1) * width);
    if (position.size() < n) position.resize(n);
  }
};

Napi::Value StructuredApplyBlock(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  if (info.Length() < 8) throw Napi::TypeError::New(env, "structuredApplyBlock needs 8 arguments");
  if (!info[0].IsTypedArray()) throw Napi::TypeError::New(env, "byU must be an Int32Array");
  size_t n = info[0].As<Napi::TypedArray>().ElementLength();
  const int32_t* byU = IntArg(info, 0, "byU", n);
  const int32_t* ranks = IntArg(info, 1, "ranks", n);
  if (!info[2].IsTypedArray()) throw Napi::TypeError::New(env, "groupStart must be an Int32Array");
  size_t groupEntries = info[2].As<Napi::TypedArray>().ElementLength();
  if (groupEntries < 1) throw Napi::RangeError::New(env, "groupStart must hold at least one entry");
  const int32_t* groupStart = IntArg(info, 2, "groupStart", groupEntries);
  size_t vRanks = SizeArg(info, 3, "vRanks");
  if (!info[4].IsNumber()) throw Napi::TypeError::New(env, "c must be a number");
  double c = info[4].As<Napi::Number>().DoubleValue();
  size_t width = SizeArg(info, 5, "width");
  if (width < 1) throw Napi::RangeError::New(env, "width must be at least 1");
  const double* input = DoubleArg(info, 6, "input", n * width);
  double* output = DoubleArg(info, 7, "output", n * width);
  if (vRanks > static_cast<size_t>(INT32_MAX) - 1 || static_cast<size_t>(groupStart[groupEntries - 1]) != n) {
    throw Napi::RangeError::New(env, "groupStart must end at the element count");
  }
  for (size_t p = 0; p < n; p++) {
    if (byU[p] < 0 || static_cast<size_t>(byU[p]) >= n) throw Napi::RangeError::New(env, "byU holds a label out of range");
    if (ranks[p] < 1 || static_cast<size_t>(ranks[p]) > vRanks) throw Napi::RangeError::New(env, "ranks must lie in 1..vRanks");
  }
  // The work arrays are kept per thread between calls: allocating them afresh cost more than the sweeps
  // at N = 100 000 (20 ms of page faults and zeroing against 27 ms), and Lanczos calls this per block step.
  thread_local SweepWorkspace space;
  space.Reserve(n, width, vRanks);
  double* sorted = space.sorted.data();
  double* past = space.past.data();
  double* future = space.future.data();
  int32_t* position = space.position.data();
  // position[label] = its place in sweep order, so that gather and scatter stream through the columns
  // and touch one contiguous row of `width` lanes per element (lane by lane, each access was a miss)
  std::fill(position, position + n, -1);
  for (size_t p = 0; p < n; p++) {
    if (position[byU[p]] != -1) throw Napi::RangeError::New(env, "byU must list each label once");
    position[byU[p]] = static_cast<int32_t>(p);
  }
  for (size_t q = 0; q < n; q++) {
    double* row = sorted + static_cast<size_t>(position[q]) * width;
    for (size_t lane = 0; lane < width; lane++) row[lane] = input[lane * n + q];
  }
  size_t groups = groupEntries - 1;
  int32_t r = static_cast<int32_t>(vRanks);
  // the retarded and the advanced sweep are independent: on two threads when the policy allows two
  if (ThreadsFor(n * width * 16) >= 2) {
    std::thread advanced([&] {
      thread_local std::vector<double> second;
      if (second.size() < (vRanks + 1) * width) second.resize((vRanks + 1) * width);
      Sweep(ranks, groupStart, groups, r, sorted, future, c, true, second.data(), static_cast<int>(width));
    });
    Sweep(ranks, groupStart, groups, r, sorted, past, c, false, space.tree.data(), static_cast<int>(width));
    advanced.join();
  } else {
    Sweep(ranks, groupStart, groups, r, sorted, past, c, false, space.tree.data(), static_cast<int>(width));
    Sweep(ranks, groupStart, groups, r, sorted, future, c, true, space.tree.data(), static_cast<int>(width));
  }
  for (size_t q = 0; q < n; q++) {
    size_t p = static_cast<size_t>(position[q]) * width;
    for (size_t lane = 0; lane < width; lane++) output[lane * n + q] = 0.5 * (past[p + lane] - future[p + lane]);
  }
  return env.Undefined();
}

// ---------------------------------------------------------------- products with the basis

// The micro-kernels work on float64 columns: a float32 basis is widened a tile of columns at a time
// (one vector conversion per 8 entries), so that the multiply–adds are not slowed by conversions.
constexpr int kColumns = 4;

template <typename V>
const double* Widened(const V* column, size_t len, double* scratch) {
  if constexpr (std::is_same<V, double>::value) {
    (void)len;
    (void)scratch;
    return column;
  } else {
    for (size_t i = 0; i < len; i++) scratch[i] = column[i];
    return scratch;
  }
}

// out (m × W) += Vᵀ W_tile for one tile of rows; wp is the tile packed row by row (rows × W).
template <typename V, int W>
TACET_CLONES void ProjectTile(const V* v, size_t ldv, size_t rows, size_t m, const double* wp, double* out, double* scratch) {
  size_t j = 0;
  for (; j + 4 <= m; j += 4) {
    const double* __restrict v0 = Widened(v + j * ldv, rows, scratch);
    const double* __restrict v1 = Widened(v + (j + 1) * ldv, rows, scratch + kTileRows);
    const double* __restrict v2 = Widened(v + (j + 2) * ldv, rows, scratch + 2 * kTileRows);
    const double* __restrict v3 = Widened(v + (j + 3) * ldv, rows, scratch + 3 * kTileRows);
    double a0[W] = {}, a1[W] = {}, a2[W] = {}, a3[W] = {};
    for (size_t i = 0; i < rows; i++) {
      const double* x = wp + i * W;
      double b0 = v0[i], b1 = v1[i], b2 = v2[i], b3 = v3[i];
      for (int l = 0; l < W; l++) {
        a0[l] += b0 * x[l];
        a1[l] += b1 * x[l];
        a2[l] += b2 * x[l];
        a3[l] += b3 * x[l];
      }
    }
    for (int l = 0; l < W; l++) {
      out[j + l * m] += a0[l];
      out[j + 1 + l * m] += a1[l];
      out[j + 2 + l * m] += a2[l];
      out[j + 3 + l * m] += a3[l];
    }
  }
  for (; j < m; j++) {
    double a0[W] = {};
    const V* v0 = v + j * ldv;
    for (size_t i = 0; i < rows; i++) {
      double b0 = v0[i];
      for (int l = 0; l < W; l++) a0[l] += b0 * wp[i * W + l];
    }
    for (int l = 0; l < W; l++) out[j + l * m] += a0[l];
  }
}

template <typename V>
void ProjectTileAny(const V* v, size_t ldv, size_t rows, size_t m, const double* wp, double* out, size_t width) {
  std::vector<double> acc(width);
  for (size_t j = 0; j < m; j++) {
    std::fill(acc.begin(), acc.end(), 0.0);
    const V* col = v + j * ldv;
    for (size_t i = 0; i < rows; i++) {
      double b = col[i];
      for (size_t l = 0; l < width; l++) acc[l] += b * wp[i * width + l];
    }
    for (size_t l = 0; l < width; l++) out[j + l * m] += acc[l];
  }
}

// wp (rows × W, packed by rows) += alpha V C for one tile of rows
template <typename V, int W>
TACET_CLONES void UpdateTile(const V* v, size_t ldv, size_t rows, size_t m, const double* coefficients, double alpha,
                             double* wp, double* scratch) {
  size_t j = 0;
  for (; j + 4 <= m; j += 4) {
    double c0[W], c1[W], c2[W], c3[W];
    for (int l = 0; l < W; l++) {
      c0[l] = alpha * coefficients[j + l * m];
      c1[l] = alpha * coefficients[j + 1 + l * m];
      c2[l] = alpha * coefficients[j + 2 + l * m];
      c3[l] = alpha * coefficients[j + 3 + l * m];
    }
    const double* __restrict v0 = Widened(v + j * ldv, rows, scratch);
    const double* __restrict v1 = Widened(v + (j + 1) * ldv, rows, scratch + kTileRows);
    const double* __restrict v2 = Widened(v + (j + 2) * ldv, rows, scratch + 2 * kTileRows);
    const double* __restrict v3 = Widened(v + (j + 3) * ldv, rows, scratch + 3 * kTileRows);
    for (size_t i = 0; i < rows; i++) {
      double* x = wp + i * W;
      double b0 = v0[i], b1 = v1[i], b2 = v2[i], b3 = v3[i];
      for (int l = 0; l < W; l++) x[l] += b0 * c0[l] + b1 * c1[l] + b2 * c2[l] + b3 * c3[l];
    }
  }
  for (; j < m; j++) {
    const V* v0 = v + j * ldv;
    for (size_t i = 0; i < rows; i++) {
      double b0 = v0[i];
      for (int l = 0; l < W; l++) wp[i * W + l] += alpha * b0 * coefficients[j + l * m];
    }
  }
}

template <typename V>
void UpdateTileAny(const V* v, size_t ldv, size_t rows, size_t m, const double* coefficients, double alpha, double* wp,
                   size_t width) {
  for (size_t j = 0; j < m; j++) {
    const V* col = v + j * ldv;
    for (size_t i = 0; i < rows; i++) {
      double b = alpha * col[i];
      for (size_t l = 0; l < width; l++) wp[i * width + l] += b * coefficients[j + l * m];
    }
  }
}

// ---- AVX-512 tiles for the 16-column blocks of Lanczos
// The generic tiles above leave the float32 path at about half and the update at about a third of
// this machine's dgemm rate (measured on the 2-core EPYC this was developed on: 19 and 12 GFlop/s on one thread against
// 45); these keep eight basis columns (project) or eight rows (update) of 16 lanes in 16 registers,
// with the basis widened to float64 once per tile, and reach 30–40 GFlop/s per thread there.
#if defined(__x86_64__) && defined(__GNUC__) && !defined(__clang__)
#define TACET_HAVE_AVX512_TILES 1
#include <immintrin.h>

bool Avx512Available() {
  static const bool available = __builtin_cpu_supports("avx512f");
  return available;
}

constexpr int kWideColumns = 8;

// scratch[c·kTileRows + i] = v[i + (j + c)·ldv] for c < count, i < rows (a no-op view for float64)
template <typename V>
__attribute__((target("avx512f"))) const double* WidenColumns(const V* v, size_t ldv, size_t rows, size_t j, size_t count, double* scratch,
                                                              size_t& stride) {
  if constexpr (std::is_same<V, double>::value) {
    (void)scratch;
    (void)count;
    (void)rows;
    stride = ldv;
    return v + j * ldv;
  } else {
    for (size_t c = 0; c < count; c++) {
      const float* from = v + (j + c) * ldv;
      // the tile's next columns, whose first touch would otherwise stall the widening without any
      // arithmetic to overlap it (measured: 22 against 34 GFlop/s for float64 on one thread)
      // (a prefetch past the basis's end is harmless: prefetches never fault)
      uintptr_t ahead = reinterpret_cast<uintptr_t>(from) + kWideColumns * ldv * sizeof(float);
      for (size_t b = 0; b < rows * sizeof(float); b += 64) _mm_prefetch(reinterpret_cast<const char*>(ahead + b), _MM_HINT_T0);
      double* to = scratch + c * kTileRows;
      size_t i = 0;
      for (; i + 8 <= rows; i += 8) _mm512_storeu_pd(to + i, _mm512_cvtps_pd(_mm256_loadu_ps(from + i)));
      for (; i < rows; i++) to[i] = from[i];
    }
    stride = kTileRows;
    return scratch;
  }
}

// packed (m × 16, row j at 16·j) += Vᵀ W_tile; wp is the tile packed row by row (rows × 16)
template <typename V>
__attribute__((target("avx512f"))) void ProjectTile512(const V* v, size_t ldv, size_t rows, size_t m, const double* wp, double* packed,
                                                       double* scratch) {
  size_t j = 0;
  for (; j + kWideColumns <= m; j += kWideColumns) {
    size_t stride = 0;
    const double* cols = WidenColumns(v, ldv, rows, j, kWideColumns, scratch, stride);
    __m512d a0 = _mm512_setzero_pd(), a1 = a0, a2 = a0, a3 = a0, a4 = a0, a5 = a0, a6 = a0, a7 = a0;
    __m512d b0 = a0, b1 = a0, b2 = a0, b3 = a0, b4 = a0, b5 = a0, b6 = a0, b7 = a0;
    for (size_t i = 0; i < rows; i++) {
      __m512d lo = _mm512_loadu_pd(wp + i * 16), hi = _mm512_loadu_pd(wp + i * 16 + 8);
      const double* x = cols + i;
      __m512d s;
      s = _mm512_set1_pd(x[0]);          a0 = _mm512_fmadd_pd(s, lo, a0); b0 = _mm512_fmadd_pd(s, hi, b0);
      s = _mm512_set1_pd(x[stride]);     a1 = _mm512_fmadd_pd(s, lo, a1); b1 = _mm512_fmadd_pd(s, hi, b1);
      s = _mm512_set1_pd(x[2 * stride]); a2 = _mm512_fmadd_pd(s, lo, a2); b2 = _mm512_fmadd_pd(s, hi, b2);
      s = _mm512_set1_pd(x[3 * stride]); a3 = _mm512_fmadd_pd(s, lo, a3); b3 = _mm512_fmadd_pd(s, hi, b3);
      s = _mm512_set1_pd(x[4 * stride]); a4 = _mm512_fmadd_pd(s, lo, a4); b4 = _mm512_fmadd_pd(s, hi, b4);
      s = _mm512_set1_pd(x[5 * stride]); a5 = _mm512_fmadd_pd(s, lo, a5); b5 = _mm512_fmadd_pd(s, hi, b5);
      s = _mm512_set1_pd(x[6 * stride]); a6 = _mm512_fmadd_pd(s, lo, a6); b6 = _mm512_fmadd_pd(s, hi, b6);
      s = _mm512_set1_pd(x[7 * stride]); a7 = _mm512_fmadd_pd(s, lo, a7); b7 = _mm512_fmadd_pd(s, hi, b7);
    }
    double* p = packed + j * 16;
    const __m512d sums[16] = {a0, b0, a1, b1, a2, b2, a3, b3, a4, b4, a5, b5, a6, b6, a7, b7};
    for (int q = 0; q < 16; q++) _mm512_storeu_pd(p + q * 8, _mm512_add_pd(_mm512_loadu_pd(p + q * 8), sums[q]));
  }
  for (; j < m; j++) {
    const V* col = v + j * ldv;
    __m512d lo = _mm512_setzero_pd(), hi = lo;
    for (size_t i = 0; i < rows; i++) {
      __m512d s = _mm512_set1_pd(static_cast<double>(col[i]));
      lo = _mm512_fmadd_pd(s, _mm512_loadu_pd(wp + i * 16), lo);
      hi = _mm512_fmadd_pd(s, _mm512_loadu_pd(wp + i * 16 + 8), hi);
    }
    double* p = packed + j * 16;
    _mm512_storeu_pd(p, _mm512_add_pd(_mm512_loadu_pd(p), lo));
    _mm512_storeu_pd(p + 8, _mm512_add_pd(_mm512_loadu_pd(p + 8), hi));
  }
}

// wp (rows × 16, packed by rows) += V_tile C, with C packed (m × 16, row j at 16·j, alpha applied)
template <typename V>
__attribute__((target("avx512f"))) void UpdateTile512(const V* v, size_t ldv, size_t rows, size_t m, const double* cp, double* wp,
                                                      double* scratch) {
  for (size_t j0 = 0; j0 < m; j0 += kWideColumns) {
    size_t count = std::min<size_t>(kWideColumns, m - j0);
    size_t stride = 0;
    const double* cols = WidenColumns(v, ldv, rows, j0, count, scratch, stride);
    size_t i = 0;
    for (; i + 8 <= rows; i += 8) {
      double* x = wp + i * 16;
      __m512d a0 = _mm512_loadu_pd(x), b0 = _mm512_loadu_pd(x + 8), a1 = _mm512_loadu_pd(x + 16), b1 = _mm512_loadu_pd(x + 24);
      __m512d a2 = _mm512_loadu_pd(x + 32), b2 = _mm512_loadu_pd(x + 40), a3 = _mm512_loadu_pd(x + 48), b3 = _mm512_loadu_pd(x + 56);
      __m512d a4 = _mm512_loadu_pd(x + 64), b4 = _mm512_loadu_pd(x + 72), a5 = _mm512_loadu_pd(x + 80), b5 = _mm512_loadu_pd(x + 88);
      __m512d a6 = _mm512_loadu_pd(x + 96), b6 = _mm512_loadu_pd(x + 104), a7 = _mm512_loadu_pd(x + 112), b7 = _mm512_loadu_pd(x + 120);
      for (size_t c = 0; c < count; c++) {
        const double* coefficient = cp + (j0 + c) * 16;
        __m512d lo = _mm512_loadu_pd(coefficient), hi = _mm512_loadu_pd(coefficient + 8);
        const double* y = cols + c * stride + i;
        __m512d s;
        s = _mm512_set1_pd(y[0]); a0 = _mm512_fmadd_pd(s, lo, a0); b0 = _mm512_fmadd_pd(s, hi, b0);
        s = _mm512_set1_pd(y[1]); a1 = _mm512_fmadd_pd(s, lo, a1); b1 = _mm512_fmadd_pd(s, hi, b1);
        s = _mm512_set1_pd(y[2]); a2 = _mm512_fmadd_pd(s, lo, a2); b2 = _mm512_fmadd_pd(s, hi, b2);
        s = _mm512_set1_pd(y[3]); a3 = _mm512_fmadd_pd(s, lo, a3); b3 = _mm512_fmadd_pd(s, hi, b3);
        s = _mm512_set1_pd(y[4]); a4 = _mm512_fmadd_pd(s, lo, a4); b4 = _mm512_fmadd_pd(s, hi, b4);
        s = _mm512_set1_pd(y[5]); a5 = _mm512_fmadd_pd(s, lo, a5); b5 = _mm512_fmadd_pd(s, hi, b5);
        s = _mm512_set1_pd(y[6]); a6 = _mm512_fmadd_pd(s, lo, a6); b6 = _mm512_fmadd_pd(s, hi, b6);
        s = _mm512_set1_pd(y[7]); a7 = _mm512_fmadd_pd(s, lo, a7); b7 = _mm512_fmadd_pd(s, hi, b7);
      }
      _mm512_storeu_pd(x, a0); _mm512_storeu_pd(x + 8, b0); _mm512_storeu_pd(x + 16, a1); _mm512_storeu_pd(x + 24, b1);
      _mm512_storeu_pd(x + 32, a2); _mm512_storeu_pd(x + 40, b2); _mm512_storeu_pd(x + 48, a3); _mm512_storeu_pd(x + 56, b3);
      _mm512_storeu_pd(x + 64, a4); _mm512_storeu_pd(x + 72, b4); _mm512_storeu_pd(x + 80, a5); _mm512_storeu_pd(x + 88, b5);
      _mm512_storeu_pd(x + 96, a6); _mm512_storeu_pd(x + 104, b6); _mm512_storeu_pd(x + 112, a7); _mm512_storeu_pd(x + 120, b7);
    }
    for (; i < rows; i++) {
      double* x = wp + i * 16;
      __m512d lo = _mm512_loadu_pd(x), hi = _mm512_loadu_pd(x + 8);
      for (size_t c = 0; c < count; c++) {
        __m512d s = _mm512_set1_pd(cols[c * stride + i]);
        lo = _mm512_fmadd_pd(s, _mm512_loadu_pd(cp + (j0 + c) * 16), lo);
        hi = _mm512_fmadd_pd(s, _mm512_loadu_pd(cp + (j0 + c) * 16 + 8), hi);
      }
      _mm512_storeu_pd(x, lo);
      _mm512_storeu_pd(x + 8, hi);
    }
  }
}
#endif

template <typename Body>
void Split(size_t rows, size_t threads, Body body) {
  if (threads <= 1) {
    body(size_t{0}, rows, size_t{0});
    return;
  }
  // row ranges in whole tiles, so each thread's tiles are those of a single-threaded run
  size_t tiles = (rows + kTileRows - 1) / kTileRows;
  threads = std::min(threads, tiles);
  std::vector<std::thread> pool;
  for (size_t t = 1; t < threads; t++) {
    size_t begin = std::min(rows, tiles * t / threads * kTileRows), end = std::min(rows, tiles * (t + 1) / threads * kTileRows);
    pool.emplace_back(body, begin, end, t);
  }
  body(size_t{0}, std::min(rows, tiles / threads * kTileRows), size_t{0});
  for (auto& thread : pool) thread.join();
}

// The 16-wide blocks of Lanczos take the AVX-512 tiles where the processor has them; those sum a
// projection into an m × 16 matrix packed by rows and take the update's coefficients packed the same way.
bool WideTiles(size_t width) {
#ifdef TACET_HAVE_AVX512_TILES
  return width == 16 && Avx512Available();
#else
  (void)width;
  return false;
#endif
}

// widened columns a tile holds at once: kColumns for the generic tiles, kWideColumns for the wide ones
constexpr size_t kScratchColumns = 8;
static_assert(kColumns <= kScratchColumns, "scratch holds the generic tiles' columns");
#ifdef TACET_HAVE_AVX512_TILES
static_assert(kWideColumns <= kScratchColumns, "scratch holds the wide tiles' columns");
#endif

// wp (len × width, packed by rows) = beta · W[r0 .. r0 + len) (zero when beta is 0, so that W may hold garbage)
void PackRows(const double* w, size_t ldw, size_t r0, size_t len, size_t width, double beta, double* wp) {
  for (size_t i = 0; i < len; i++)
    for (size_t l = 0; l < width; l++) wp[i * width + l] = beta == 0 ? 0.0 : beta * w[r0 + i + l * ldw];
}

template <typename V>
void ProjectTileFor(bool wide, const V* tile, size_t ldv, size_t len, size_t m, size_t width, const double* wp, double* target,
                    double* scratch) {
#ifdef TACET_HAVE_AVX512_TILES
  if (wide) return ProjectTile512<V>(tile, ldv, len, m, wp, target, scratch);
#else
  (void)wide;
#endif
  switch (width) {
    case 16: ProjectTile<V, 16>(tile, ldv, len, m, wp, target, scratch); break;
    case 8: ProjectTile<V, 8>(tile, ldv, len, m, wp, target, scratch); break;
    default: ProjectTileAny<V>(tile, ldv, len, m, wp, target, width);
  }
}

template <typename V>
void UpdateTileFor(bool wide, const V* tile, size_t ldv, size_t len, size_t m, size_t width, const double* coefficients,
                   const double* packedCoefficients, double alpha, double* wp, double* scratch) {
#ifdef TACET_HAVE_AVX512_TILES
  if (wide) return UpdateTile512<V>(tile, ldv, len, m, packedCoefficients, wp, scratch);
#else
  (void)wide;
  (void)packedCoefficients;
#endif
  switch (width) {
    case 16: UpdateTile<V, 16>(tile, ldv, len, m, coefficients, alpha, wp, scratch); break;
    case 8: UpdateTile<V, 8>(tile, ldv, len, m, coefficients, alpha, wp, scratch); break;
    default: UpdateTileAny<V>(tile, ldv, len, m, coefficients, alpha, wp, width);
  }
}

template <typename V>
void Project(const V* v, size_t rows, size_t m, size_t width, const double* w, size_t ldw, double* out) {
  size_t threads = ThreadsFor(rows * m * width);
  const bool wide = WideTiles(width);
  // each thread sums into its own m × width matrix, added into out at the end; thread 0 of the generic
  // tiles sums into out itself, having its layout
  std::vector<std::vector<double>> partial(std::max<size_t>(threads, 1));
  for (size_t t = 0; t < partial.size(); t++)
    if (wide || t > 0) partial[t].assign(m * width, 0.0);
  Split(rows, threads, [&](size_t begin, size_t end, size_t t) {
    double* target = partial[t].empty() ? out : partial[t].data();
    std::vector<double> wp(static_cast<size_t>(kTileRows) * width), scratch(static_cast<size_t>(kTileRows) * kScratchColumns);
    for (size_t r0 = begin; r0 < end; r0 += kTileRows) {
      size_t len = std::min<size_t>(kTileRows, end - r0);
      PackRows(w, ldw, r0, len, width, 1.0, wp.data());
      ProjectTileFor<V>(wide, v + r0, rows, len, m, width, wp.data(), target, scratch.data());
    }
  });
  for (const auto& part : partial) {
    if (part.empty()) continue;
    for (size_t j = 0; j < m; j++)
      for (size_t l = 0; l < width; l++) out[j + l * m] += wide ? part[j * width + l] : part[j + l * m];
  }
}

template <typename V>
void Update(const V* v, size_t rows, size_t m, size_t width, const double* coefficients, double* w, size_t ldw,
            double alpha, double beta) {
  const bool wide = WideTiles(width);
  std::vector<double> packedCoefficients;
  if (wide) {
    packedCoefficients.resize(m * width);
    for (size_t j = 0; j < m; j++)
      for (size_t l = 0; l < width; l++) packedCoefficients[j * width + l] = alpha * coefficients[j + l * m];
  }
  Split(rows, ThreadsFor(rows * m * width), [&](size_t begin, size_t end, size_t) {
    std::vector<double> wp(static_cast<size_t>(kTileRows) * width), scratch(static_cast<size_t>(kTileRows) * kScratchColumns);
    for (size_t r0 = begin; r0 < end; r0 += kTileRows) {
      size_t len = std::min<size_t>(kTileRows, end - r0);
      PackRows(w, ldw, r0, len, width, beta, wp.data());
      UpdateTileFor<V>(wide, v + r0, rows, len, m, width, coefficients, packedCoefficients.data(), alpha, wp.data(), scratch.data());
      for (size_t i = 0; i < len; i++)
        for (size_t l = 0; l < width; l++) w[r0 + i + l * ldw] = wp[i * width + l];
    }
  });
}

struct BasisArg {
  const float* f32 = nullptr;
  const double* f64 = nullptr;
};

BasisArg BasisArray(const Napi::CallbackInfo& info, size_t index, size_t atLeast) {
  BasisArg out;
  if (info[index].IsTypedArray()) {
    auto type = info[index].As<Napi::TypedArray>().TypedArrayType();
    if (type == napi_float32_array) {
      out.f32 = ArrayArg<float, napi_float32_array>(info, index, "v", atLeast, "Float32Array");
      return out;
    }
    if (type == napi_float64_array) {
      out.f64 = DoubleArg(info, index, "v", atLeast);
      return out;
    }
  }
  throw Napi::TypeError::New(info.Env(), "v must be a Float32Array or a Float64Array");
}

// the strided block W: rows [wOffset, wOffset + rows) of `width` columns spaced ldw apart
void CheckBlock(Napi::Env env, size_t rows, size_t width, size_t ldw, size_t wOffset) {
  if (width < 1) throw Napi::RangeError::New(env, "width must be at least 1");
  if (ldw < rows) throw Napi::RangeError::New(env, "ldw must be at least rows");
  (void)wOffset;
}

Napi::Value BasisProject(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  if (info.Length() < 8) throw Napi::TypeError::New(env, "basisProject needs 8 arguments");
  size_t rows = SizeArg(info, 0, "rows"), m = SizeArg(info, 1, "m"), width = SizeArg(info, 2, "width");
  size_t ldw = SizeArg(info, 5, "ldw"), wOffset = SizeArg(info, 6, "wOffset");
  CheckBlock(env, rows, width, ldw, wOffset);
  BasisArg v = BasisArray(info, 3, rows * m);
  const double* w = DoubleArg(info, 4, "w", wOffset + (width - 1) * ldw + rows);
  double* out = DoubleArg(info, 7, "out", m * width);
  if (rows == 0 || m == 0) return env.Undefined();
  if (v.f32) Project(v.f32, rows, m, width, w + wOffset, ldw, out);
  else Project(v.f64, rows, m, width, w + wOffset, ldw, out);
  return env.Undefined();
}

Napi::Value BasisUpdate(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  if (info.Length() < 10) throw Napi::TypeError::New(env, "basisUpdate needs 10 arguments");
  size_t rows = SizeArg(info, 0, "rows"), m = SizeArg(info, 1, "m"), width = SizeArg(info, 2, "width");
  size_t ldw = SizeArg(info, 6, "ldw"), wOffset = SizeArg(info, 7, "wOffset");
  CheckBlock(env, rows, width, ldw, wOffset);
  BasisArg v = BasisArray(info, 3, rows * m);
  const double* coefficients = DoubleArg(info, 4, "coefficients", m * width);
  double* w = DoubleArg(info, 5, "w", wOffset + (width - 1) * ldw + rows);
  if (!info[8].IsNumber() || !info[9].IsNumber()) throw Napi::TypeError::New(env, "alpha and beta must be numbers");
  double alpha = info[8].As<Napi::Number>().DoubleValue(), beta = info[9].As<Napi::Number>().DoubleValue();
  if (rows == 0) return env.Undefined();
  if (v.f32) Update(v.f32, rows, m, width, coefficients, w + wOffset, ldw, alpha, beta);
  else Update(v.f64, rows, m, width, coefficients, w + wOffset, ldw, alpha, beta);
  return env.Undefined();
}

Napi::Value BasisCombine(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  if (info.Length() < 8) throw Napi::TypeError::New(env, "basisCombine needs 8 arguments");
  size_t rows = SizeArg(info, 0, "rows"), m = SizeArg(info, 1, "m"), outputs = SizeArg(info, 2, "outputs");
  size_t ldo = SizeArg(info, 6, "ldo"), oOffset = SizeArg(info, 7, "oOffset");
  if (outputs < 1) return env.Undefined();
  CheckBlock(env, rows, outputs, ldo, oOffset);
  BasisArg v = BasisArray(info, 3, rows * m);
  const double* coefficients = DoubleArg(info, 4, "coefficients", m * outputs);
  double* out = DoubleArg(info, 5, "out", oOffset + (outputs - 1) * ldo + rows);
  if (rows == 0) return env.Undefined();
  if (m == 0) {
    for (size_t c = 0; c < outputs; c++) std::fill(out + oOffset + c * ldo, out + oOffset + c * ldo + rows, 0.0);
    return env.Undefined();
  }
  if (rows > INT32_MAX || m > INT32_MAX || outputs > INT32_MAX || ldo > INT32_MAX) throw Napi::RangeError::New(env, "too large for 32-bit BLAS indexing");
  if (v.f64) {
    cblas_dgemm(CblasColMajor, CblasNoTrans, CblasNoTrans, static_cast<int>(rows), static_cast<int>(outputs), static_cast<int>(m), 1.0,
                v.f64, static_cast<int>(rows), coefficients, static_cast<int>(m), 0.0, out + oOffset, static_cast<int>(ldo));
    return env.Undefined();
  }
  const size_t tile = 512;
  std::vector<double> scratch(tile * m);
  for (size_t r0 = 0; r0 < rows; r0 += tile) {
    size_t len = std::min(tile, rows - r0);
    for (size_t j = 0; j < m; j++) {
      const float* from = v.f32 + r0 + j * rows;
      double* to = scratch.data() + j * len;
      for (size_t i = 0; i < len; i++) to[i] = from[i];
    }
    cblas_dgemm(CblasColMajor, CblasNoTrans, CblasNoTrans, static_cast<int>(len), static_cast<int>(outputs), static_cast<int>(m), 1.0,
                scratch.data(), static_cast<int>(len), coefficients, static_cast<int>(m), 0.0, out + oOffset + r0, static_cast<int>(ldo));
  }
  return env.Undefined();
}

Napi::Value SolveUpperRight(const Napi::CallbackInfo& info) {
  Napi::Env env = info.Env();
  if (info.Length() < 4) throw Napi::TypeError::New(env, "solveUpperRight needs 4 arguments");
  size_t n = SizeArg(info, 0, "n"), width = SizeArg(info, 1, "width");
  double* w = DoubleArg(info, 2, "w", n * width);
  const double* r = DoubleArg(info, 3, "r", width * width);
  for (size_t j = 0; j < width; j++) {
    if (!(r[j + j * width] != 0)) throw Napi::RangeError::New(env, "R has a zero on its diagonal");
  }
  if (n == 0 || width == 0) return env.Undefined();
  if (n > INT32_MAX || width > INT32_MAX) throw Napi::RangeError::New(env, "too large for 32-bit BLAS indexing");
  // BLAS-3 dtrsm: the row-by-row loop it replaces took 15 ms for 100 000 × 16 (twice per Lanczos step)
  cblas_dtrsm(CblasColMajor, CblasRight, CblasUpper, CblasNoTrans, CblasNonUnit, static_cast<int>(n), static_cast<int>(width), 1.0, r,
              static_cast<int>(width), w, static_cast<int>(n));
  return env.Undefined();
}

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

}  // namespace

void RegisterStructuredKernels(Napi::Env env, Napi::Object exports) {
  exports.Set("structuredApplyBlock", Napi::Function::New(env, Guarded<StructuredApplyBlock>));
  exports.Set("basisProject", Napi::Function::New(env, Guarded<BasisProject>));
  exports.Set("basisUpdate", Napi::Function::New(env, Guarded<BasisUpdate>));
  exports.Set("basisCombine", Napi::Function::New(env, Guarded<BasisCombine>));
  exports.Set("solveUpperRight", Napi::Function::New(env, Guarded<SolveUpperRight>));
}
