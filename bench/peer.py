"""The pipeline a scripting user would write with scikit-learn, on the same CSV
(id, topic, text) that bench/one.mjs reads, timed stage by stage.

Stages (names matched to ours where they do the same job):
  read               csv module -> lists of ids, topics, texts
  analyze+vectorize  TfidfVectorizer(sublinear_tf=True, stop_words='english',
                     min_df=MIN_DF).fit_transform  (L2 rows, smoothed idf: the
                     library defaults, same formulas as ours)
  k-means            KMeans(n_clusters=K, n_init=N_INIT (3), max_iter=100,
                     random_state=0, algorithm='lloyd') on the L2 rows; from
                     --minibatch-from rows (200k, where ours switches to
                     mini-batch steps) MiniBatchKMeans(n_clusters=K,
                     n_init=N_INIT, batch_size=4096, random_state=0) instead,
                     as a user with a million rows would
  near-duplicates    pairs with cosine >= T from blocked X[i:j] @ X[i:].T
                     (BLOCK rows at a time, fewer above 100k documents so a
                     block's product stays bounded; upper triangle only), then
                     connected components (scipy.sparse.csgraph). With
                     --pair-share S < 1 only every round(1/S)-th block is
                     computed (the first included) and the stage time is the
                     measured time divided by the share of the row-pair
                     products those blocks hold (exact count); the JSON says
                     so (`extrapolated`), and pairs/recall are then partial
  write              documents CSV (id, group, duplicate set) and a JSON of the
                     groups (size, top 10 centroid terms)

Peak RSS per stage: the kernel's VmHWM, reset through /proc/self/clear_refs at
the start of each stage (the same probe bench/one.mjs uses); where that cannot
be written, resource.getrusage maxrss (a running maximum) instead.

Differences from ours, on purpose kept as a user would have them: no stemming
(ours stems with Porter), scikit-learn's own English stop-word list (318 words;
ours has 108), its token pattern (2+ word characters, digits included; ours
drops digit-only tokens), float64 matrix (ours float32), Euclidean k-means on
unit rows (ours spherical: the same assignment rule for unit centroids, but the
centres are plain means, not re-normalised), convergence by centre shift
tol=1e-4 (ours: no assignment changes), and OpenMP threads for k-means (ours:
one thread).

Usage: /usr/bin/python3 bench/peer.py --input FILE [--k 100] [--threshold 0.9]
       [--min-df 2] [--n-init 3] [--block 2000] [--pairs FILE] [--threads N] [--out-json FILE]
       [--minibatch-from 200000] [--pair-share 1]
Prints one JSON object (also written to --out-json).
"""

import argparse
import csv
import json
import os
import re
import resource
import sys
import tempfile
import time
import shutil

csv.field_size_limit(1 << 30)

KB = 1024


def status_kb(field):
    with open('/proc/self/status') as f:
        m = re.search(field + r':\s+(\d+) kB', f.read())
    return int(m.group(1)) if m else None


def can_reset():
    try:
        with open('/proc/self/clear_refs', 'w') as f:
            f.write('5')
        return status_kb('VmHWM') is not None
    except OSError:
        return False


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument('--input', required=True)
    ap.add_argument('--k', type=int, default=100)
    ap.add_argument('--threshold', type=float, default=0.9)
    ap.add_argument('--min-df', type=float, default=2)
    ap.add_argument('--n-init', type=int, default=3)
    ap.add_argument('--block', type=int, default=2000)
    ap.add_argument('--pairs')
    ap.add_argument('--threads', type=int, default=0)
    ap.add_argument('--out-json')
    ap.add_argument('--minibatch-from', type=int, default=200_000)
    ap.add_argument('--pair-share', type=float, default=1.0)
    a = ap.parse_args()
    if not (0 < a.pair_share <= 1):
        print(f'peer.py: --pair-share must be a number above 0 and at most 1; got {a.pair_share}', file=sys.stderr)
        return 2

    try:
        import numpy as np
        import scipy
        import scipy.sparse as sp
        from scipy.sparse.csgraph import connected_components
        import sklearn
        from sklearn.feature_extraction.text import TfidfVectorizer
        from sklearn.cluster import KMeans, MiniBatchKMeans
        from sklearn.metrics import normalized_mutual_info_score
        import threadpoolctl
    except ImportError as e:
        print(f'peer.py: scikit-learn stack not available in {sys.executable}: {e}', file=sys.stderr)
        return 2

    limits = threadpoolctl.threadpool_limits(a.threads) if a.threads > 0 else None
    reset = can_reset()
    stages = []

    def partial(running):
        # Progress so far, so a run that is stopped still tells how far it got.
        if a.out_json:
            with open(a.out_json, 'w') as f:
                json.dump({'input': os.path.basename(a.input), 'partial': True, 'running': running, 'stages': stages}, f, indent=2)

    def stage(name, fn):
        partial(name)
        if reset:
            with open('/proc/self/clear_refs', 'w') as f:
                f.write('5')
        start_rss = status_kb('VmRSS')
        print(f'[peer] {name} start', file=sys.stderr, flush=True)
        c0 = time.process_time()
        t0 = time.perf_counter()
        value = fn()
        ms = (time.perf_counter() - t0) * 1e3
        cpu = (time.process_time() - c0) * 1e3
        peak = status_kb('VmHWM') if reset else resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
        stages.append({'stage': name, 'ms': ms, 'cpuMs': cpu, 'peakRss': peak * KB, 'startRss': start_rss * KB})
        partial(None)
        return value

    def read():
        ids, topics, texts = [], [], []
        with open(a.input, newline='', encoding='utf-8', errors='replace') as f:
            r = csv.reader(f)
            header = next(r)
            ci, ct, cx = header.index('id'), header.index('topic'), header.index('text')
            for row in r:
                ids.append(row[ci])
                topics.append(row[ct])
                texts.append(row[cx])
        return ids, topics, texts

    ids, topics, texts = stage('read', read)
    n = len(texts)
    min_df = int(a.min_df) if a.min_df >= 1 else a.min_df

    vec = TfidfVectorizer(sublinear_tf=True, stop_words='english', min_df=min_df)
    X = stage('analyze+vectorize', lambda: vec.fit_transform(texts))
    X = sp.csr_matrix(X)

    mini = n >= a.minibatch_from
    if mini:
        km = MiniBatchKMeans(n_clusters=a.k, n_init=a.n_init, batch_size=4096, random_state=0)
    else:
        km = KMeans(n_clusters=a.k, n_init=a.n_init, max_iter=100, random_state=0, algorithm='lloyd')
    labels = stage('k-means', lambda: km.fit_predict(X))

    # One block's product has up to block x n entries: above 100k documents the
    # blocks get smaller so that it stays at the size it has at 100k (2000 x 100k).
    block = max(1, min(a.block, (a.block * 100_000) // max(1, n)))

    starts = list(range(0, n, block))
    every = max(1, round(1 / a.pair_share))
    chosen = starts[::every]
    # Row-pair products a block holds: its rows times the rows from its first onwards.
    work = lambda i0: (min(n, i0 + block) - i0) * (n - i0)
    share = sum(work(i0) for i0 in chosen) / max(1, sum(work(i0) for i0 in starts))

    def pairs():
        t = a.threshold
        rows, cols, sims = [], [], []
        for i0 in chosen:
            i1 = min(n, i0 + block)
            P = (X[i0:i1] @ X[i0:].T).tocoo()
            r = P.row + i0
            c = P.col + i0
            keep = (P.data >= t) & (c > r)
            rows.append(r[keep].astype(np.int32))
            cols.append(c[keep].astype(np.int32))
            sims.append(P.data[keep])
            del P
        r = np.concatenate(rows) if rows else np.zeros(0, np.int32)
        c = np.concatenate(cols) if cols else np.zeros(0, np.int32)
        s = np.concatenate(sims) if sims else np.zeros(0)
        g = sp.coo_matrix((np.ones(len(r)), (r, c)), shape=(n, n))
        _, comp = connected_components(g, directed=False)
        sizes = np.bincount(comp)
        in_set = sizes[comp] >= 2
        return r, c, s, comp, in_set

    pr, pc, ps, comp, in_set = stage('near-duplicates', pairs)
    if every > 1:
        last = stages[-1]
        last['measuredMs'], last['measuredCpuMs'] = last['ms'], last['cpuMs']
        last['ms'], last['cpuMs'] = last['ms'] / share, last['cpuMs'] / share
        last['extrapolated'] = {'blocks': len(chosen), 'of': len(starts), 'share': share}

    out_dir = tempfile.mkdtemp(prefix='sheaf-peer-')
    terms = vec.get_feature_names_out()

    def write():
        dup = np.where(in_set, comp, -1)
        with open(os.path.join(out_dir, 'documents.csv'), 'w', newline='') as f:
            w = csv.writer(f)
            w.writerow(['id', 'group', 'duplicate_set'])
            for i in range(n):
                w.writerow([ids[i], int(labels[i]), '' if dup[i] < 0 else int(dup[i])])
        centers = km.cluster_centers_
        sizes = np.bincount(labels, minlength=a.k)
        groups = []
        for g in range(a.k):
            top = np.argsort(-centers[g])[:10]
            groups.append({'id': g, 'size': int(sizes[g]), 'terms': [{'term': str(terms[j]), 'weight': round(float(centers[g, j]), 6)} for j in top]})
        with open(os.path.join(out_dir, 'groups.json'), 'w') as f:
            json.dump({'groups': groups}, f, indent=2)

    stage('write', write)
    shutil.rmtree(out_dir, ignore_errors=True)

    planted = None
    if a.pairs and every == 1:  # with a share of the blocks the pairs are partial: no recall
        row_of = {d: i for i, d in enumerate(ids)}
        total = together = 0
        with open(a.pairs) as f:
            next(f)
            for line in f:
                x, y = line.strip().split(',')
                total += 1
                i, j = row_of.get(x), row_of.get(y)
                if i is not None and j is not None and in_set[i] and comp[i] == comp[j]:
                    together += 1
        planted = {'pairs': total, 'foundInSameSet': together, 'recall': together / total if total else None}

    info = threadpoolctl.threadpool_info()
    result = {
        'input': os.path.basename(a.input),
        'docs': n,
        'k': a.k,
        'threshold': a.threshold,
        'minDf': a.min_df,
        'block': block,
        'terms': int(X.shape[1]),
        'nnz': int(X.nnz),
        'kmeans': {'iterations': int(km.n_iter_), 'inertia': float(km.inertia_), 'nInit': a.n_init, 'method': 'MiniBatchKMeans(batch_size=4096)' if mini else 'KMeans(lloyd)', 'steps': int(getattr(km, 'n_steps_', 0)) if mini else None},
        'pairShare': share if every > 1 else 1,
        'duplicates': {'pairs': int(len(pr)), 'sets': int(len(set(comp[in_set].tolist()))), 'rowsInSets': int(in_set.sum())},
        'planted': planted,
        'nmi': float(normalized_mutual_info_score(topics, labels)),
        'stages': stages,
        'peakRss': max(s['peakRss'] for s in stages),
        'memoryProbe': 'VmHWM reset per stage via /proc/self/clear_refs (exact)' if reset else 'getrusage maxrss (running maximum)',
        'versions': {'python': sys.version.split()[0], 'numpy': np.__version__, 'scipy': scipy.__version__, 'sklearn': sklearn.__version__},
        'threads': [{k: d.get(k) for k in ('user_api', 'internal_api', 'num_threads', 'version', 'architecture')} for d in info],
        'threadLimit': a.threads or None,
    }
    text = json.dumps(result, indent=2)
    if a.out_json:
        with open(a.out_json, 'w') as f:
            f.write(text + '\n')
    print(text)
    if limits is not None:
        limits.unregister() if hasattr(limits, 'unregister') else None
    return 0


if __name__ == '__main__':
    sys.exit(main())
