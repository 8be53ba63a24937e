"""Heat in the oil: heat transfer from the reservoir (natural and forced
convection, radiation; UA(T)) and the lumped oil temperature over time
(steady, periodic, warm-up, thermostat).
"""
