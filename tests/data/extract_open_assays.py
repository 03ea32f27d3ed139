"""Extract the fields the tests use from the open NOAA oil library crude assays into open_assays.json.

    python tests/data/extract_open_assays.py DIR_OF_EX_RECORDS

Source: NOAA ADIOS oil database, records EX00004-EX00058 (works of the United States Government, CC0), each
compiled from a producer's published crude assay.  Kept per record: the whole crude's density (g/cm3 at
15.6 °C), sulfur, nitrogen and TBP curve (cumulative vol % against °C, with the end point); per cut its boiling range
(°F, as published), volume percent of crude, density, sulfur and the other measured qualities, in the
record's own units.  Nothing is computed here: values are copied as published (one cut boundary given in °C,
537.78 °C, is written as the 1000 °F it stands for).
"""

from __future__ import annotations

import json
import sys
from pathlib import Path


def _m(entries, name):
    for e in entries or []:
        if e["name"] == name:
            return e["measurement"]["value"]
    return None


def record(d: dict) -> dict:
    whole = d["sub_samples"][0]
    dist = whole["distillation_data"]
    out = {"id": d["oil_id"], "name": d["metadata"]["name"],
           "density_g_cm3_15_6c": whole["physical_properties"]["densities"][0]["density"]["value"],
           "sulfur_wt_pct": _m(whole.get("bulk_composition"), "Sulfur Mass Fraction"),
           "nitrogen_wt_ppm": _m(whole.get("bulk_composition"), "Nitrogen Mass Fraction"),
           "tbp": [[c["fraction"]["value"], c["vapor_temp"]["value"]] for c in dist["cuts"]],
           "end_point_c": dist.get("end_point", {}).get("value"), "cuts": []}
    for c in d["sub_samples"][1:]:
        rng = dict(c["metadata"]["boiling_point_range"])
        if rng["unit"] == "C":  # one record gives its 1000 °F+ residue as 537.78 °C+: the same boundary
            rng = {k: (None if rng.get(k) is None else round(rng[k] * 9 / 5 + 32, 1)) for k in ("min_value",
                                                                                              "max_value")}
        pp = c["physical_properties"]
        bulk, ind = c.get("bulk_composition"), c.get("industry_properties")
        cut = {"name": c["metadata"]["name"], "start_f": rng.get("min_value"), "end_f": rng.get("max_value"),
               "vol_pct": c["cut_volume"]["value"],
               "density_g_cm3_15_6c": pp["densities"][0]["density"]["value"],
               "sulfur_wt_pct": _m(bulk, "Sulfur Mass Fraction"),
               "hydrogen_wt_pct": _m(bulk, "Hydrogen Mass Fraction"),
               "nitrogen_wt_ppm": _m(bulk, "Nitrogen Mass Fraction"),
               "paraffins_vol_pct": _m(bulk, "Paraffin Volume Fraction"),
               "naphthenes_vol_pct": _m(bulk, "Naphthene Volume Fraction"),
               "aromatics_vol_pct": _m(bulk, "Aromatics (FIA)"),
               "acid_number_mg_koh_g": _m(ind, "Total Acid Number"),
               "freeze_point_f": _m(ind, "Freeze Point"), "smoke_point_mm": _m(ind, "Smoke Point"),
               "cetane_index_d4737": _m(ind, "Cetane Index 1990 (D4737)"), "cloud_point_f": _m(ind, "Cloud Point"),
               "aniline_point_f": _m(ind, "Aniline Point"), "ccr_wt_pct": _m(ind, "Conradson Carbon Residue"),
               "pour_point_c": (pp.get("pour_point") or {}).get("measurement", {}).get("value"),
               "viscosity_cst": {str(v["ref_temp"]["value"]): v["viscosity"]["value"]
                                 for v in pp.get("kinematic_viscosities", [])}}
        out["cuts"].append(cut)
    return out


if __name__ == "__main__":
    src = Path(sys.argv[1])
    recs = [record(json.loads(p.read_text())) for p in sorted(src.glob("EX*.json"))]
    Path(__file__).with_name("open_assays.json").write_text(json.dumps(recs, indent=1) + "\n")
    print(f"{len(recs)} records")
