"""A vectorised reference for the whole-process timing of `dgpath report`
(run by hand; see benches/README.md): reads the same pathway file and does the
same work for a route without stated turns, coupling or bypasses: units,
dG'° at the scenario (Gibbs-Helmholtz where dh0 is given, the pH shift from
`protons`), ln Q and dG' through a sparse stoichiometric matrix, turns per
pass from the sparse mass balance of intermediates, classes, the cumulative
profile, shares of the drop, the sd of each dG', and a JSON report.

    python3 benches/reference/report.py FILE.toml > out.json
"""
import json
import math
import sys
import tomllib

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from common import CONC, ENERGY, quantity, temperature, terms


def main(path):
    with open(path, "rb") as f:
        doc = tomllib.load(f)
    cond = doc["conditions"]
    t = temperature(cond["temperature"])
    ph = float(cond.get("ph", 7.0))
    t_ref = temperature(cond.get("reference_temperature", "25 C"))
    ph_ref = float(cond.get("reference_ph", 7.0))
    rt = 8.314462618e-3 * t  # R exact in the 2019 SI
    ids = list(doc["compounds"])
    index = {c: i for i, c in enumerate(ids)}
    comps = doc["compounds"]
    role = [comps[c].get("role", "") for c in ids]
    conc = np.array([quantity(comps[c].get("conc", 1.0), CONC, "mM") for c in ids])
    cv = np.array([float(comps[c].get("cv", 0.0)) for c in ids])
    steps = doc["steps"]
    n = len(steps)
    rows, cols, vals = [], [], []
    for j, s in enumerate(steps):
        for nu, cid in terms(s["reaction"]):
            rows.append(index[cid])
            cols.append(j)
            vals.append(nu)
    N = sp.csc_matrix((vals, (rows, cols)), shape=(len(ids), n))
    dg0_ref = np.array([quantity(s["dg0"], ENERGY, "kJ/mol") for s in steps])
    dh0 = np.array([quantity(s["dh0"], ENERGY, "kJ/mol") if "dh0" in s else np.nan for s in steps])
    protons = np.array([float(s.get("protons", 0.0)) for s in steps])
    sd0 = np.array([quantity(s.get("dg0_sd", 0.0), ENERGY, "kJ/mol") for s in steps])
    gh = dg0_ref * t / t_ref + dh0 * (1 - t / t_ref)
    dg0 = np.where(np.isnan(dh0), dg0_ref, gh) - protons * rt * math.log(10) * (ph - ph_ref)
    solute = np.array([r != "solvent" for r in role])
    ln_c = np.where(solute, np.log(conc), 0.0)
    ln_q = N.T @ ln_c
    dg = dg0 + rt * ln_q
    # Turns per pass: the mass balance of intermediates (produced and consumed
    # on the route, not currency or solvent), first step fixed at one turn.
    inter = np.array([r == "" for r in role]) & (N.max(axis=1).toarray().ravel() > 0) & (N.min(axis=1).toarray().ravel() < 0)
    A = N[inter][:, 1:]
    b = -N[inter][:, 0].toarray().ravel()
    times = np.ones(n)
    if A.shape[0]:
        times[1:] = spla.lsqr(A, b, atol=1e-14, btol=1e-14)[0]
    sd_ln = np.sqrt(np.log1p(cv**2))
    dg_sd = np.sqrt(sd0**2 + (rt**2) * (N.multiply(N).T @ (sd_ln**2)))
    weighted = times * dg
    cumulative = np.cumsum(weighted)
    drop = -weighted[weighted < 0].sum()
    share = np.where(weighted < 0, -weighted / drop if drop > 0 else 0.0, 0.0)
    near = rt * math.log(10)
    cls = np.where(dg <= -10.0, "far", np.where(np.abs(dg) <= near, "near", np.where(dg > near, "uphill", "moderate")))
    out = {
        "pathway": doc["pathway"]["name"],
        "steps": [
            {"id": s["id"], "dg0": float(dg0[j]), "dg": float(dg[j]), "dg_sd": float(dg_sd[j]),
             "times": float(times[j]), "keq": float(np.exp(-dg0[j] / rt)), "q": float(np.exp(ln_q[j])),
             "class": str(cls[j]), "cumulative": float(cumulative[j]), "share": float(share[j])}
            for j, s in enumerate(steps)
        ],
        "total": {"dg0": float((times * dg0).sum()), "dg": float(weighted.sum())},
        "largest_drop": steps[int(np.argmin(weighted))]["id"],
    }
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main(sys.argv[1])
