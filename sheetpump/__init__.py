"""sheetpump: hydraulic pump datasheets checked against a machine's duty cycle, in a spreadsheet."""

__version__ = "0.1.0"

#: The caution every report and the README carry (results feed designs that can hurt people).
SAFETY_CAUTION = (
    "Caution: results are estimates for pump selection. Hydraulic systems store energy at high "
    "pressure; a burst line or pinhole leak can inject oil through skin, and a wrongly rated pump can "
    "fail violently. Confirm every figure against the supplier's current data, ISO 4413 (hydraulic "
    "system safety) and local codes, and have a qualified engineer approve the design."
)

#: The caution in one line, for the header or footer of every printed page (the full text stands on the
#: sheets themselves).
SAFETY_CAUTION_SHORT = (
    "Estimates for pump selection: confirm with the supplier's current data, ISO 4413 and local codes; "
    "a qualified engineer approves the design."
)
