"""Cutting a crude model: cut sets, the ideal TBP cut, real-column products, the library engine (many crudes
as arrays) and product-limit evaluation."""

SHIPPED_CUT_ENDS = (("light ends", 15.0), ("light naphtha", (185.0 - 32.0) / 1.8),
                    ("heavy naphtha", (350.0 - 32.0) / 1.8), ("kerosene", (450.0 - 32.0) / 1.8),
                    ("diesel", (650.0 - 32.0) / 1.8), ("vacuum gas oil", (1050.0 - 32.0) / 1.8),
                    ("vacuum residue", None))
"""The shipped default cut set as (name, TBP end [°C]): the usual °F round numbers, kept exact in °C so that a
report in °F shows them as they are named (15 °C for C4-minus, 185 °F, 350 °F, 450 °F, 650 °F, 1050 °F; common
practice, no source).  Plain numbers here, so that the command line's help can name the cuts without loading
numpy (:data:`~assaycut.cutting.cutset.DEFAULT_CUTS` builds the cut set from them)."""
