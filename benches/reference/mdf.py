"""A vectorised reference for the whole-process timing of `dgpath mdf` (run
by hand; see benches/README.md): reads the same pathway file and solves the
same max-min driving-force programme with SciPy's HiGHS interface: variables
ln c of the free compounds and B; for every route step (as written, turns do
not enter) B - RT N^T x <= -dG'° - RT N_held^T ln c_held; ln lo <= x <= ln hi;
carriers and fixed compounds held at their concentrations. Prints the MDF and
the bottleneck steps as JSON.

    python3 benches/reference/mdf.py FILE.toml
"""
import json
import math
import sys
import tomllib

import numpy as np
import scipy.sparse as sp
from scipy.optimize import linprog

from common import CONC, ENERGY, quantity, temperature, terms


def main(path):
    with open(path, "rb") as f:
        doc = tomllib.load(f)
    t = temperature(doc["conditions"]["temperature"])
    rt = 8.314462618e-3 * t  # R exact in the 2019 SI
    comps = doc["compounds"]
    ids = list(comps)
    index = {c: i for i, c in enumerate(ids)}
    default = doc.get("analysis", {}).get("bounds", ["1 uM", "10 mM"])
    held = np.array([comps[c].get("fixed", comps[c].get("role") == "currency") for c in ids])
    solvent = np.array([comps[c].get("role") == "solvent" for c in ids])
    conc = np.array([quantity(comps[c].get("conc", 1.0), CONC, "mM") for c in ids])
    lo = np.log([quantity(comps[c].get("bounds", default)[0], CONC, "mM") for c in ids])
    hi = np.log([quantity(comps[c].get("bounds", default)[1], CONC, "mM") for c in ids])
    steps = doc["steps"]
    rows, cols, vals = [], [], []
    for j, s in enumerate(steps):
        for nu, cid in terms(s["reaction"]):
            rows.append(j)
            cols.append(index[cid])
            vals.append(nu)
    NT = sp.csr_matrix((vals, (rows, cols)), shape=(len(steps), len(ids)))
    dg0 = np.array([quantity(s["dg0"], ENERGY, "kJ/mol") for s in steps])
    free = ~held & ~solvent
    fixed_part = NT[:, held & ~solvent] @ np.log(conc[held & ~solvent])
    A = sp.hstack([rt * NT[:, free], sp.csr_matrix(np.ones((len(steps), 1)))]).tocsr()
    b = -dg0 - rt * fixed_part
    c = np.zeros(A.shape[1])
    c[-1] = -1.0
    bounds = list(zip(lo[free], hi[free])) + [(None, None)]
    res = linprog(c, A_ub=A, b_ub=b, bounds=bounds, method="highs")
    duals = -res.ineqlin.marginals
    out = {
        "mdf": float(res.x[-1]),
        "bottlenecks": [steps[j]["id"] for j in np.nonzero(duals > 1e-7)[0]],
    }
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main(sys.argv[1])
