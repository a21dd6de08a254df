"""Reference library: SciPy linear_sum_assignment.

Reads a JSON list of cost matrices (lists of rows, possibly rectangular) on
stdin and prints a JSON list of the optimal total cost of each, as computed by
scipy.optimize.linear_sum_assignment (minimisation).
"""
import json
import sys

import numpy as np
from scipy.optimize import linear_sum_assignment


def main() -> None:
    matrices = json.load(sys.stdin)
    totals = []
    for m in matrices:
        c = np.asarray(m, dtype=np.float64)
        rows, cols = linear_sum_assignment(c)
        totals.append(float(c[rows, cols].sum()))
    json.dump(totals, sys.stdout)


if __name__ == "__main__":
    main()
