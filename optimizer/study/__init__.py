"""How sure the answer is: one-at-a-time sensitivity and Monte Carlo studies of a scenario's designs.

``variation``    cases with their inputs changed: K-values, efficiencies, prices, index, feed
``sampling``     factors drawn from the scenario's ``[uncertainty]`` spreads (numpy Generator, seeded)
``pricing``      the annualized cost of design points, each under its own sampled economics
``fixed``        a fixed design over the samples: outlets, spec met, annualized cost
``uncertainty``  the probability of meeting every spec, with its standard error and closed form
``margin``       the fewest trays, the least rate, or the cheapest design meeting every spec with a chosen
                 probability
``reoptimize``   the best design of each sample: how often each wins, and the regret of the top designs
``sensitivity``  one input at a time: the fixed design's cost and spec, and the re-optimized best
``montecarlo``   the whole Monte Carlo study of the ``uncertainty`` command, on one set of draws

Every figure comes from ``towercost.design`` and ``towercost.models``; the
studies only vary the case's inputs and count.
"""
