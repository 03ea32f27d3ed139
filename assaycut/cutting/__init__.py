"""Cutting a crude model: cut sets, the ideal TBP cut, real-column products, the library engine (many crudes
as arrays) and product-limit evaluation."""
