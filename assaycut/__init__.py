"""assaycut: cut crude-oil assays at a refinery's cut points.

Internal units, stated once for the whole package:

* temperature in degrees Celsius [°C] (absolute K or °R only inside a correlation that needs it);
* percent distilled as cumulative percent of the whole crude [%], volume basis unless a name says ``wt``;
* density as specific gravity 60/60 °F [-]; density at 15 °C in [kg/m3] where a name says so;
* sulfur and other mass-based contents in weight percent [wt %].

Results are estimates for screening and planning, not measured properties.
"""

__version__ = "0.1.0"
