"""The cooler: air-oil and water-oil sizing and rating (``cooler``), the cooler-type
registry (``cooler_types``), datasheet coolers (``cooler_datasheet``) and the
``heatload cooler`` design procedure (``sizing``).
"""
