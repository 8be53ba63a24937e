"""heatload's browser dashboard.

A Dash front end that only lays out and calls the engine (:mod:`heatload`):
the scenario lives in the page (``dcc.Store``), every edit is parsed with
:mod:`heatload.units`, validated by :mod:`heatload.io` and recomputed with
:func:`heatload.chain.compare`; the figures read the stored results.

Modules
-------
state       scenario <-> editable form (phase table, key numbers), parsing and errors
compute     the recompute: scenario -> serialisable results
figures     plotly figures and tables from the stored results
layout      the page
callbacks   Dash wiring (thin wrappers around plain, importable functions)
app         ``make_app(scenario_path=None)`` and ``run_cli(args)``
"""
