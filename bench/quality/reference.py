"""The scikit-learn reference for the quality benchmark (bench/quality/run.mjs).

For one labelled corpus (JSONL: id, label, text), at the true number of
classes k, once per seed:
  tfidf  TfidfVectorizer(stop_words='english', sublinear_tf=True, min_df=2,
         max_df=0.5) + KMeans(n_clusters=k, n_init=4, random_state=seed)
  lsa50  the same TF-IDF, then TruncatedSVD(50, random_state=seed) and
         Normalizer() (L2 rows) before the same KMeans
NMI (arithmetic mean normaliser, scikit-learn's default) and ARI against the
labels, and the seconds each run took (the TF-IDF fit is timed once and
added to every run).

Usage: /usr/bin/python3 bench/quality/reference.py --input FILE --seeds 0,1,2,3,4
       [--dims 50] [--out-json FILE]
Exit 2 when scikit-learn is missing.
"""

import argparse
import json
import sys
import time


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument('--input', required=True)
    ap.add_argument('--seeds', default='0,1,2,3,4')
    ap.add_argument('--dims', type=int, default=50)
    ap.add_argument('--out-json')
    a = ap.parse_args()
    try:
        import numpy as np
        import sklearn
        from sklearn.feature_extraction.text import TfidfVectorizer
        from sklearn.cluster import KMeans
        from sklearn.decomposition import TruncatedSVD
        from sklearn.preprocessing import Normalizer
        from sklearn.metrics import normalized_mutual_info_score, adjusted_rand_score
    except ImportError as e:
        print(f'reference.py: needs scikit-learn in {sys.executable}: {e}', file=sys.stderr)
        sys.exit(2)

    texts, labels = [], []
    with open(a.input, encoding='utf8') as f:
        for line in f:
            if line.strip():
                d = json.loads(line)
                texts.append(d['text'])
                labels.append(d['label'])
    k = len(set(labels))
    seeds = [int(s) for s in a.seeds.split(',')]

    def cpu():
        return time.process_time()

    t0, c0 = time.perf_counter(), cpu()
    vec = TfidfVectorizer(stop_words='english', sublinear_tf=True, min_df=2, max_df=0.5)
    X = vec.fit_transform(texts)
    fit_s, fit_cpu = time.perf_counter() - t0, cpu() - c0

    out = {'docs': len(texts), 'k': k, 'terms': X.shape[1], 'sklearn': sklearn.__version__, 'methods': {}}
    for method in ('tfidf', f'lsa{a.dims}'):
        runs = []
        for seed in seeds:
            t0, c0 = time.perf_counter(), cpu()
            Z = X
            if method != 'tfidf':
                Z = TruncatedSVD(a.dims, random_state=seed).fit_transform(X)
                Z = Normalizer(copy=False).fit_transform(Z)
            km = KMeans(n_clusters=k, n_init=4, random_state=seed).fit(Z)
            pred = km.labels_
            runs.append({
                'seed': seed,
                'nmi': float(normalized_mutual_info_score(labels, pred)),
                'ari': float(adjusted_rand_score(labels, pred)),
                'seconds': time.perf_counter() - t0 + fit_s,
                'cpuSeconds': cpu() - c0 + fit_cpu,
            })
        out['methods'][method] = runs
    text = json.dumps(out)
    if a.out_json:
        with open(a.out_json, 'w') as f:
            f.write(text + '\n')
    print(text)


if __name__ == '__main__':
    main()
