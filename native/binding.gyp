# Built by scripts/build-native.mjs (node-gyp with Node's own headers, nodedir=/usr); never downloads.
# Links Debian's OpenBLAS, whose shared library also carries LAPACK (dsyevd_, dsyevr_).
{
  "targets": [
    {
      "target_name": "tacet_linalg",
      "sources": ["src/addon.cc", "src/structured.cc"],
      "include_dirs": ["<!(node -p \"require('node-addon-api').include_dir\")"],
      "defines": ["NAPI_VERSION=8", "NAPI_CPP_EXCEPTIONS"],
      "cflags_cc!": ["-fno-exceptions"],
      "cflags_cc": ["-O2", "-std=c++17", "-fexceptions"],
      "libraries": ["-lopenblas"]
    }
  ]
}
