/*
 * Baseline for sheaf's k-means assignment step: the same multiply-adds as
 * assignToCentroids (src/cluster/kmeans.ts) on the same data, in plain C.
 *
 * For every row with a non-zero value: scores[g] = sum over the row's
 * non-zeros (t, v) of v * centroids[t*k + g] (float32 data, double
 * accumulation, in the same order as the TypeScript loop), then the best
 * group (ties to the lowest) and its score. Empty rows get -1 and 0.
 *
 * Input: the binary file bench/one.mjs writes with --kernel-dump:
 *   int32 rows, cols, nnz, k; int32 indptr[rows+1]; int32 indices[nnz];
 *   float32 values[nnz]; float32 centroids[cols*k]   (little-endian, as written)
 *
 * Usage: kernel FILE [passes]   -> one line of JSON on stdout.
 * Build: cc -O2 -o kernel bench/kernel.c
 */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

static void *read_exact(FILE *f, size_t bytes, const char *what) {
  void *p = malloc(bytes ? bytes : 1);
  if (!p || fread(p, 1, bytes, f) != bytes) {
    fprintf(stderr, "kernel: cannot read %s (%zu bytes)\n", what, bytes);
    exit(1);
  }
  return p;
}

static double now_ms(void) {
  struct timespec ts;
  clock_gettime(CLOCK_MONOTONIC, &ts);
  return ts.tv_sec * 1e3 + ts.tv_nsec / 1e6;
}

static void assign_pass(int32_t rows, int32_t k, const int32_t *restrict indptr, const int32_t *restrict indices,
                        const float *restrict values, const float *restrict centroids, double *restrict scores,
                        int32_t *restrict assign, float *restrict fit) {
  for (int32_t i = 0; i < rows; i++) {
    int32_t start = indptr[i], end = indptr[i + 1];
    int nonEmpty = 0;
    for (int32_t j = start; j < end; j++)
      if (values[j] != 0.0f) {
        nonEmpty = 1;
        break;
      }
    if (!nonEmpty) {
      assign[i] = -1;
      fit[i] = 0.0f;
      continue;
    }
    for (int32_t g = 0; g < k; g++) scores[g] = 0.0;
    for (int32_t j = start; j < end; j++) {
      const double v = values[j];
      const float *restrict c = centroids + (size_t)indices[j] * (size_t)k;
      for (int32_t g = 0; g < k; g++) scores[g] += v * (double)c[g];
    }
    int32_t bestG = 0;
    double bestS = scores[0];
    for (int32_t g = 1; g < k; g++)
      if (scores[g] > bestS) {
        bestS = scores[g];
        bestG = g;
      }
    assign[i] = bestG;
    fit[i] = (float)bestS;
  }
}

static int cmp_double(const void *a, const void *b) {
  double x = *(const double *)a, y = *(const double *)b;
  return x < y ? -1 : x > y;
}

int main(int argc, char **argv) {
  if (argc < 2) {
    fprintf(stderr, "usage: kernel FILE [passes]\n");
    return 2;
  }
  int passes = argc > 2 ? atoi(argv[2]) : 5;
  if (passes < 1) passes = 1;
  FILE *f = fopen(argv[1], "rb");
  if (!f) {
    fprintf(stderr, "kernel: cannot open %s\n", argv[1]);
    return 1;
  }
  int32_t *head = read_exact(f, 4 * sizeof(int32_t), "header");
  int32_t rows = head[0], cols = head[1], nnz = head[2], k = head[3];
  int32_t *indptr = read_exact(f, (size_t)(rows + 1) * sizeof(int32_t), "indptr");
  int32_t *indices = read_exact(f, (size_t)nnz * sizeof(int32_t), "indices");
  float *values = read_exact(f, (size_t)nnz * sizeof(float), "values");
  float *centroids = read_exact(f, (size_t)cols * (size_t)k * sizeof(float), "centroids");
  fclose(f);

  double *scores = malloc((size_t)k * sizeof(double));
  int32_t *assign = malloc((size_t)rows * sizeof(int32_t));
  float *fit = malloc((size_t)rows * sizeof(float));
  double *per = malloc((size_t)passes * sizeof(double));

  assign_pass(rows, k, indptr, indices, values, centroids, scores, assign, fit); /* warm-up */
  for (int p = 0; p < passes; p++) {
    double t0 = now_ms();
    assign_pass(rows, k, indptr, indices, values, centroids, scores, assign, fit);
    per[p] = now_ms() - t0;
  }
  qsort(per, passes, sizeof(double), cmp_double);

  double fitSum = 0;
  for (int32_t i = 0; i < rows; i++) fitSum += fit[i];
  uint32_t h = 0x811c9dc5u;
  for (int32_t i = 0; i < rows; i++) h = (h ^ (uint32_t)(assign[i] + 1)) * 0x01000193u;

  printf("{\"rows\":%d,\"cols\":%d,\"nnz\":%d,\"k\":%d,\"passes\":%d,\"msPerPassMedian\":%.4f,\"msPerPassMin\":%.4f,"
         "\"fitSum\":%.9f,\"assignmentsDigest\":\"%08x\"}\n",
         rows, cols, nnz, k, passes, per[passes / 2], per[0], fitSum, h);
  return 0;
}
