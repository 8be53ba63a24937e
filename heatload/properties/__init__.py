"""Properties of the working fluids: the oil (ISO 3448 grades, ASTM D341 viscosity,
density, heat capacity, conductivity) and the air and water tables shipped with
the package.
"""
