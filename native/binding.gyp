{
  "targets": [
    {
      "target_name": "modewright_linalg",
      "sources": ["modewright_linalg.c"],
      "cflags": ["-O2", "-std=c11", "-Wall", "-Wextra", "-Wno-unused-parameter"],
      "libraries": ["-llapacke", "-lopenblas"]
    }
  ]
}
