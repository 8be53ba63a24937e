"""The hydraulic circuit over a duty cycle: the one builder of the solver's arrays
(``cycle``), the strategy registry (``strategies``), the solve every strategy
shares (``circuits``), the energy bookkeeping (``energy``) and the plausibility
checks of a solution (``invariants``).
"""
