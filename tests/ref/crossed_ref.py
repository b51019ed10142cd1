"""Reference fit for src/stats/crossed.rs: statsmodels MixedLM (REML) with
crossed variance components, one group per block (its own intercept), unit
and group effects within it. Reads {"rows": [[block, unit, group, y], ...]}
as JSON on stdin; prints the variances, intercepts and group effects."""
import json
import sys

import pandas as pd
import statsmodels.formula.api as smf

rows = json.load(sys.stdin)["rows"]
df = pd.DataFrame(rows, columns=["block", "unit", "group", "y"])
model = smf.mixedlm(
    "y ~ 0 + C(block)",
    df,
    groups="block",
    re_formula="0",
    vc_formula={"unit": "0 + C(unit)", "group": "0 + C(group)"},
)
fit = model.fit(reml=True, method=["lbfgs"])
vc = dict(zip(model.exog_vc.names, [float(x) for x in fit.vcomp]))
effects = {}
for block, re in fit.random_effects.items():
    for name, value in re.items():
        if name.startswith("group[C(group)["):
            effects[name[len("group[C(group)["):-2]] = float(value)
print(json.dumps({
    "scale": float(fit.scale),
    "var_unit": vc["unit"],
    "var_group": vc["group"],
    "intercepts": [float(x) for x in fit.fe_params.values],
    "group_effects": effects,
    "converged": bool(fit.converged),
}))
