"""The components of a circuit, one module each: valves and orifices, lines,
pumps, electric motors, actuators (cylinders, hydraulic motors) and gas
accumulators.  Each gives a component's drop, flow or loss as a pure function.
"""
