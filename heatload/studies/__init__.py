"""Studies over many variants of one machine: the N-variant evaluation
(``variants``), sweeps and Pareto fronts (``sweep``), the Monte Carlo and the
sensitivity ranking (``uncertainty``).
"""
