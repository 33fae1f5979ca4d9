"""The near-copy search a scripting user would write with scikit-learn and
SciPy, end to end, for the `sheaf duplicates` side by side in bench/run.mjs.

Two modes:

  pipeline (default)  read the CSV (id, text), TfidfVectorizer(sublinear_tf=True,
                      stop_words='english', min_df) -> L2 rows, then pairs with
                      cosine >= T from blocked X[i:i+B] @ X[i:].T (upper
                      triangle), connected components, pairs written as CSV.
  --matrix FILE.mtx   the same blocked product on sheaf's own vectors (written by
                      `sheaf duplicates --save-vectors DIR`: vectors.mtx, ids.txt),
                      so that the pair sets can be compared one for one.

Pairs go to --out-pairs as `a,b,similarity` (ids, a's row before b's).
Prints one JSON line: docs, terms, nnz, pairs, sets, block.

Usage: /usr/bin/python3 bench/peer-duplicates.py --out-pairs FILE
       (--input FILE.csv [--min-df 2] | --matrix FILE.mtx --ids FILE.txt)
       [--threshold 0.9] [--block 2000]
"""

import argparse
import csv
import json
import sys

csv.field_size_limit(1 << 30)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument('--input')
    ap.add_argument('--matrix')
    ap.add_argument('--ids')
    ap.add_argument('--threshold', type=float, default=0.9)
    ap.add_argument('--min-df', type=float, default=2)
    ap.add_argument('--block', type=int, default=2000)
    ap.add_argument('--out-pairs', required=True)
    a = ap.parse_args()
    try:
        import numpy as np
        import scipy.sparse as sp
        import scipy.io
        from scipy.sparse.csgraph import connected_components
        from sklearn.feature_extraction.text import TfidfVectorizer
    except ImportError as e:
        print(f'peer-duplicates.py: scikit-learn stack not available in {sys.executable}: {e}', file=sys.stderr)
        return 2

    if a.matrix:
        X = sp.csr_matrix(scipy.io.mmread(a.matrix))
        with open(a.ids, encoding='utf-8') as f:
            ids = f.read().split('\n')[: X.shape[0]]
    else:
        ids, texts = [], []
        with open(a.input, newline='', encoding='utf-8', errors='replace') as f:
            r = csv.reader(f)
            header = next(r)
            ci, cx = header.index('id'), header.index('text')
            for row in r:
                ids.append(row[ci])
                texts.append(row[cx])
        min_df = int(a.min_df) if a.min_df >= 1 else a.min_df
        X = sp.csr_matrix(TfidfVectorizer(sublinear_tf=True, stop_words='english', min_df=min_df).fit_transform(texts))
    n = X.shape[0]
    # One block's product has up to block x n entries: above 100k rows the blocks get smaller so it stays bounded.
    block = max(1, min(a.block, (a.block * 100_000) // max(1, n)))
    t = a.threshold
    rows, cols, sims = [], [], []
    for i0 in range(0, n, block):
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
    with open(a.out_pairs, 'w', newline='') as f:
        w = csv.writer(f)
        w.writerow(['a', 'b', 'similarity'])
        for x, y, v in zip(r.tolist(), c.tolist(), s.tolist()):
            w.writerow([ids[x], ids[y], f'{v:.6f}'])
    print(json.dumps({'docs': n, 'terms': int(X.shape[1]), 'nnz': int(X.nnz), 'pairs': int(len(r)), 'sets': int(len(set(comp[in_set].tolist()))), 'block': block}))
    return 0


if __name__ == '__main__':
    sys.exit(main())
