# Reference values for the special functions behind Corvane's power-law fits (lib/engine/research):
# the Hurwitz zeta function zeta(s, q) (discrete power-law normalising constant) and ln Phi(z)
# (log_ndtr, for the truncated and discretised lognormal of the likelihood-ratio comparison).
# Library: scipy.special (Debian's python3-scipy), run live by tests/reference/run.sh.
# Usage: /usr/bin/python3 scipy_zeta.py OUTPUT.json
import json
import sys

import numpy
import scipy
from scipy import special

out = sys.argv[1]

# s near 1 (slow decay, large tail), typical power-law exponents, and large s; q = x_min values from 1 to 1e4.
S_GRID = [1.0001, 1.01, 1.1, 1.5, 1.75, 2.0, 2.3, 2.5, 3.0, 3.5, 5.0, 10.0, 25.0, 50.0]
Q_GRID = [1.0, 1.5, 2.0, 3.0, 5.0, 7.0, 12.0, 37.0, 100.0, 1000.0, 10000.0]
Z_GRID = [-40.0, -10.0, -5.0, -3.0, -2.0, -1.0, -0.5, -0.1, 0.0, 0.1, 0.5, 1.0, 1.5, 2.0, 2.5, 2.828, 3.0,
          4.0, 6.0, 10.0, 20.0, 38.0]

cases = []
for s in S_GRID:
    for q in Q_GRID:
        cases.append({"function": "zeta", "s": s, "q": q, "value": float(special.zeta(s, q))})
for z in Z_GRID:
    cases.append({"function": "log_ndtr", "z": z, "value": float(special.log_ndtr(z))})

with open(out, "w") as f:
    json.dump({
        "source": "scipy.special.zeta(s, q) (Hurwitz zeta) and scipy.special.log_ndtr(z) (ln of the standard normal CDF)",
        "generated_by": "tests/reference/scipy_zeta.py",
        "tool_versions": {"scipy": scipy.__version__, "numpy": numpy.__version__, "python": sys.version.split()[0]},
        "cases": cases,
    }, f, indent=1)
