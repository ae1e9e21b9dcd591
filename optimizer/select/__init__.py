"""Selection: the Pyomo formulation solved by HiGHS, the exhaustive scan, ranking and the near-optimal band."""
