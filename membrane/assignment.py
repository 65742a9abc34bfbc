"""The linear assignment problem (each row matched to its own column, least total cost).

The same algorithm as :func:`scipy.optimize.linear_sum_assignment` (shortest augmenting
paths, Crouse, IEEE Trans. Aerosp. Electron. Syst. 52(4), 2016, 1679-1696), with the same
order of scanning and the same rule for ties, so it returns the same assignment; written
here because importing scipy.optimize costs a command about 0.12 s, more than the
assignments of a whole solve (tens of rows) take in numpy. The inner loop over columns is
vectorised; the operations on each entry are those of scipy's C++ code, in the same order,
so equal inputs give equal answers (tests/test_assignment.py checks against scipy).
"""

from __future__ import annotations

import numpy as np


def linear_sum_assignment(cost, maximize: bool = False) -> tuple[np.ndarray, np.ndarray]:
    """Rows and the columns assigned to them, minimising (or maximising) the summed cost.

    Parameters
    ----------
    cost : array_like
        (R, C) cost matrix; +inf marks a forbidden pair (-inf with ``maximize``).
    maximize : bool
        Maximise the sum instead.

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        Row indices (ascending) and their columns; min(R, C) pairs.

    Raises
    ------
    ValueError
        For a matrix that is not 2-D, holds NaN (or -inf when minimising), or has no
        complete assignment of finite cost.
    """
    c = np.asarray(cost, dtype=float)
    if c.ndim != 2:
        raise ValueError(f"expected a matrix (2-D array), got a {c.ndim}-D array")
    if maximize:
        c = -c
    if np.any(np.isnan(c)) or np.any(c == -np.inf):
        raise ValueError("matrix contains invalid numeric entries")
    transpose = c.shape[1] < c.shape[0]
    if transpose:
        c = c.T
    nr, nc = c.shape
    if nr == 0 or nc == 0:
        empty = np.zeros(0, dtype=np.intp)
        return empty, empty.copy()
    u, v = np.zeros(nr), np.zeros(nc)
    col4row = np.full(nr, -1, dtype=np.intp)
    row4col = np.full(nc, -1, dtype=np.intp)
    for cur_row in range(nr):
        shortest = np.full(nc, np.inf)
        path = np.full(nc, -1, dtype=np.intp)
        in_rows = np.zeros(nr, dtype=bool)
        in_cols = np.zeros(nc, dtype=bool)
        remaining = np.arange(nc - 1, -1, -1, dtype=np.intp)  # scipy scans from the last column
        count = nc
        min_val = 0.0
        i = cur_row
        sink = -1
        while sink < 0:
            in_rows[i] = True
            cols = remaining[:count]
            r = min_val + c[i, cols] - u[i] - v[cols]
            better = r < shortest[cols]
            path[cols[better]] = i
            shortest[cols[better]] = r[better]
            values = shortest[cols]
            lowest = values.min()
            if lowest == np.inf:
                raise ValueError("cost matrix is infeasible")
            ties = np.flatnonzero(values == lowest)
            free = ties[row4col[cols[ties]] == -1]
            index = int(free[-1]) if free.size else int(ties[0])  # scipy's rule for equal costs
            min_val = lowest
            j = int(cols[index])
            if row4col[j] == -1:
                sink = j
            else:
                i = int(row4col[j])
            in_cols[j] = True
            count -= 1
            remaining[index] = remaining[count]
        u[cur_row] += min_val
        others = in_rows.copy()
        others[cur_row] = False
        u[others] += min_val - shortest[col4row[others]]
        v[in_cols] -= min_val - shortest[in_cols]
        j = sink
        while True:
            i = int(path[j])
            row4col[j] = i
            col4row[i], j = j, int(col4row[i])
            if i == cur_row:
                break
    if transpose:
        order = np.argsort(col4row)
        return col4row[order], np.arange(nr, dtype=np.intp)[order]
    return np.arange(nr, dtype=np.intp), col4row
