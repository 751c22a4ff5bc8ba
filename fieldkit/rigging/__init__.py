"""Cut-and-hang calculators: supports and measuring helpers, the hung wire's shape (catenary with the
feedpoint as a point load), cut lengths and trim from the engine, rope-height sweep, centre mast and
feedline. Pure functions on SI units; the engine (`fieldkit.antenna`) supplies every electrical number.
"""
