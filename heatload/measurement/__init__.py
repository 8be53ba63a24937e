"""From the machine itself: measured logs read by column name (``logs``), the tank
model fitted to a temperature log (``logfit``, ``measured``) and a pressure
trace cut into a draft duty cycle (``trace``).
"""
