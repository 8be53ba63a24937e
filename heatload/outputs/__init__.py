"""What a reader sees: result tables (``tables``), words and units of warnings
(``wording``), the HTML report (``report``, ``report_assets``, ``svgplot``).
"""
