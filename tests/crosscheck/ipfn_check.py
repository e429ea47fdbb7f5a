"""Cross-check of `stratamap rake` against the reference implementation of iterative
proportional fitting in the `ipfn` package (PyPI): for every district, the seed of the
groups table and the district's margins are fitted by ipfn's numpy version, and each
group's fitted count is compared with the electorate that `stratamap rake` wrote.

    python ipfn_check.py margins.csv groups.csv electorate.csv

Each dimension's margins are first brought to the mean of the district's dimension
totals, as stratamap does when they disagree within 0.1 %. Exits 1 on a mismatch.
"""
import csv
import sys
import warnings

import numpy as np
from ipfn import ipfn

RELATIVE = 1e-6


def main(margins_path, groups_path, electorate_path):
    with open(margins_path, newline="") as f:
        margins = list(csv.DictReader(f))
    with open(groups_path, newline="") as f:
        groups = list(csv.DictReader(f))
    with open(electorate_path, newline="") as f:
        raked = list(csv.DictReader(f))

    dims = []
    cats = {}
    for row in margins:
        if row["dimension"] not in cats:
            dims.append(row["dimension"])
            cats[row["dimension"]] = []
        if row["category"] not in cats[row["dimension"]]:
            cats[row["dimension"]].append(row["category"])
    shape = tuple(len(cats[d]) for d in dims)
    seed = np.zeros(shape)
    where = {}
    for g in groups:
        idx = tuple(cats[d].index(g[d]) for d in dims)
        seed[idx] = float(g["eligible"])
        where[g["group"]] = idx

    districts = []
    for row in margins:
        if row["district"] not in districts:
            districts.append(row["district"])
    worst = 0.0
    for d in districts:
        rows = [r for r in margins if r["district"] == d]
        aggregates = []
        for dim in dims:
            a = np.zeros(len(cats[dim]))
            for r in rows:
                if r["dimension"] == dim:
                    a[cats[dim].index(r["category"])] = float(r["count"])
            aggregates.append(a)
        common = np.mean([a.sum() for a in aggregates])
        aggregates = [a * common / a.sum() for a in aggregates]
        # ipfn divides 0 by 0 for a category with nobody in it; the cells stay 0.
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", RuntimeWarning)
            fitted = ipfn.ipfn(
                seed.copy(),
                aggregates,
                [[j] for j in range(len(dims))],
                convergence_rate=1e-12,
                max_iteration=5000,
                rate_tolerance=0,
            ).iteration()
        for r in raked:
            if r["district"] != d:
                continue
            want = fitted[where[r["group"]]]
            got = float(r["eligible"])
            if want == 0.0:
                if got != 0.0:
                    print(f"ipfn cross-check: {d} {r['group']}: stratamap {got}, ipfn 0")
                    return 1
                continue
            worst = max(worst, abs(got - want) / want)
    print(
        f"ipfn cross-check: {len(districts)} districts x {len(groups)} groups in "
        f"{len(dims)} dimensions agree with ipfn; largest relative difference {worst:.2e}"
    )
    if worst > RELATIVE:
        print(f"ipfn cross-check: FAILED, more than {RELATIVE}")
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main(*sys.argv[1:4]))
