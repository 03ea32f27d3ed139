"""Published correlations, one module per family: distillation conversions (D86, D2887, D1160 and the
dispatcher), the Riazi distribution, characterisation (boiling points, Watson K, molecular weight), product
properties (cetane index, flash point), blending rules and the monotone PCHIP of Fritsch & Carlson (1980)
that the curve model is built on.  Each function names its source, unit and range.

Article titles and page numbers in the References sections are as recalled by the developers; where a
coefficient or a range was recalled rather than read from its source, its docstring says so."""
