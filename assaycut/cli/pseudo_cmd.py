"""The crude as pseudo-components for a process simulator (``assaycut pseudo``)."""

from __future__ import annotations

import enum
from pathlib import Path
from typing import Annotated, Optional

import typer

from .common import (
    ApiOpt,
    CutsOpt,
    DensOpt,
    JsonOpt,
    OutOpt,
    SgOpt,
    SulfurOpt,
    check_whole_crude,
    echo_json,
    echo_lines,
    guarded,
    load,
    load_cut_set,
    resolve_assays,
    say,
)

app = typer.Typer()


class PseudoMethod(str, enum.Enum):
    """Correlation for the pseudo-components' constants (--method)."""

    riazi_daubert_1987 = "riazi-daubert-1987"
    kesler_lee_1976 = "kesler-lee-1976"
    twu_1984 = "twu-1984"


def parse_scheme(text: str | None):
    """--scheme: None (the default breakdown), 'default', a number of components, or boundaries T1,T2,... [°C]."""
    from ..errors import AssaycutError

    if text is None or text.strip().lower() == "default":
        return None
    t = text.strip()
    try:
        if "," not in t:
            n = int(t)
            if n < 1:
                raise ValueError
            return n
        return [float(x) for x in t.split(",") if x.strip()]
    except ValueError:
        raise AssaycutError(f"--scheme {text!r}: expected 'default', a number of components (e.g. 30) or TBP "
                            f"boundaries in °C separated by commas (e.g. 100,150,200)") from None


@app.command()
@guarded
def pseudo(
    assays: Annotated[Optional[list[str]], typer.Argument(help="Assays (files, folders or globs). Default: the "
                                                          "demo assay.", metavar="ASSAY...")] = None,
    cuts: CutsOpt = None,
    scheme: Annotated[Optional[str], typer.Option("--scheme", metavar="default|N|T1,T2,...",
                                                  help="Breakdown: 'default' (15 °C slices to 400 °C, 25 °C to "
                                                       "650 °C, 50 °C above, the end lump alone), N slices of "
                                                       "equal TBP width, or the TBP boundaries in °C.")] = None,
    method: Annotated[PseudoMethod, typer.Option("--method", metavar="riazi-daubert-1987|kesler-lee-1976|twu-1984",
                                                 help="Correlation for MW, Tc, Pc, ω and Vc.")]
    = PseudoMethod.riazi_daubert_1987,
    json_out: JsonOpt = False,
    out: OutOpt = None,
    api: ApiOpt = None,
    sg: SgOpt = None,
    density: DensOpt = None,
    sulfur: SulfurOpt = None,
) -> None:
    """The crude (or, with --cuts, each product) as pure light-end components and pseudo-components.

    Each pseudo-component is a narrow TBP slice of the crude model: its own mean boiling point on the curve,
    its SG from the density distribution, and MW, Tc, Pc, acentric factor and Vc by the chosen method. Light
    ends placed on the curve are pure components with their own constants. Fractions by volume, weight and
    moles of the crude (and of each product). Writes <crude>_pseudo.csv (one row per component, units in the
    headers, the method named) and <crude>_pseudo.xlsx. Estimates for screening: check them against your
    simulator's own characterisation.
    """
    from ..cutting.pseudo import pseudo_components
    from ..model.crude import build_model

    parts = parse_scheme(scheme)
    cs = load_cut_set(cuts, None) if cuts is not None else None
    paths = resolve_assays(assays)
    check_whole_crude(paths, api, sg, density, sulfur)
    done = []
    for p in paths:
        a = load(p, api, sg, density, sulfur)
        m = build_model(a)
        done.append((p, a, m, pseudo_components(m, a, method.value, parts, cs)))
    written = []
    if out is not None or not json_out:
        from ..files import place_set
        from ..report.studyreports import pseudo_files
        from ..report.write import slug

        for p, a, m, comps in done:
            folder = out if out is not None and len(done) == 1 else (out or Path("reports")) / slug(a.name)
            written += place_set(folder, pseudo_files(a, m, comps, method.value), (p,))
    if json_out:
        from ..report.jsonout import pseudo_json

        docs = [pseudo_json(a, m, comps, method.value) for _, a, m, comps in done]
        echo_json(docs[0] if len(docs) == 1 else {"assays": docs, "errors": []})
        return
    from ..report.console import pseudo_text, written_text

    for _, a, m, comps in done:
        echo_lines(pseudo_text(a, m, comps, method.value))
    say(written_text(written, "Pseudo-components"))
