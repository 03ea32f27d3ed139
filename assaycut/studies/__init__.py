"""Studies on top of the yield calculation: crude comparison and worth, cut-point shift and sweep, blends of
crudes, the cut-point and blend optimisers, uncertainty bands and assay quality checks."""
