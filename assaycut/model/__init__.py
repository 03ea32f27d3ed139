"""The crude model: the in-memory assay, the monotone spline, the TBP curve, light ends, the property
distributions and the crude model built from them.  Pure computation: nothing here reads files."""
