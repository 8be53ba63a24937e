"""Static pieces of the HTML report: stylesheet (screen and print), palette.

Kept as strings so the report needs no package data and no request to any
server: system fonts only, no images, no external stylesheets.
"""

#: Okabe-Ito colour-blind-safe palette (Okabe and Ito, "Color Universal Design", 2002),
#: black last so lines stay distinct on white.
PALETTE = ("#0072B2", "#E69F00", "#009E73", "#D55E00", "#56B4E9", "#CC79A7", "#F0E442",
           "#000000")

#: One colour per role, the same in every chart of the report and the dashboard:
#: the machine's present circuit, the recommended one, any other, one ruled out.
ROLE_COLOURS = {"present": PALETTE[1], "recommended": PALETTE[2], "other": PALETTE[0],
                "infeasible": "#9AA3AD"}

#: Colours of where the energy goes (energy-flow chart): work done, heat into the
#: room (drive motor and converter), heat into the oil.
FLOW_COLOURS = {"useful": PALETTE[4], "room": "#7F7F7F", "oil": PALETTE[3]}


def role_colour(name, present, recommended, feasible=True):
    """Colour of strategy *name* by its role (:data:`ROLE_COLOURS`)."""
    if name == recommended:
        return ROLE_COLOURS["recommended"]
    if name == present:
        return ROLE_COLOURS["present"]
    return ROLE_COLOURS["other"] if feasible else ROLE_COLOURS["infeasible"]


#: Printable width of a chart [px at 96 dpi]: A4 (210 mm) and Letter (215.9 mm)
#: less 2 x 15 mm margins leave >= 180 mm = 680 px.
FIGURE_WIDTH = 680

STYLESHEET = """
:root { --ink:#1d2430; --muted:#5b6675; --rule:#d5dbe3; --band:#f3f5f8; --accent:#0072B2;
        --warn:#D55E00; --ok:#009E73; }
* { box-sizing: border-box; }
html { -webkit-text-size-adjust: 100%; }
body { margin: 0; color: var(--ink); background: #fff;
       font: 15px/1.45 system-ui, -apple-system, "Segoe UI", Roboto, "Helvetica Neue", Arial,
             "Liberation Sans", sans-serif; }
main { max-width: 960px; margin: 0 auto; padding: 24px 28px 48px; }
header.title { border-bottom: 3px solid var(--accent); margin-bottom: 18px; padding-bottom: 10px; }
header.title h1 { margin: 0 0 4px; font-size: 26px; letter-spacing: .2px; }
header.title .meta { color: var(--muted); font-size: 13px; }
h2 { font-size: 19px; margin: 30px 0 10px; padding-bottom: 4px; border-bottom: 1px solid var(--rule); }
h3 { font-size: 15px; margin: 18px 0 6px; }
p { margin: 6px 0 10px; }
.keyfigures { display: grid; grid-template-columns: repeat(auto-fit, minmax(200px, 1fr));
              gap: 10px; margin: 12px 0 16px; }
.keyfigure { background: var(--band); border-left: 4px solid var(--accent); padding: 8px 12px; }
.keyfigure .label { color: var(--muted); font-size: 12px; text-transform: uppercase; letter-spacing: .4px; }
.keyfigure .value { font-size: 20px; font-weight: 600; }
table { border-collapse: collapse; width: 100%; margin: 8px 0 14px; font-size: 13px; }
th, td { padding: 4px 7px; border-bottom: 1px solid var(--rule); vertical-align: top; }
th { text-align: left; background: var(--band); font-weight: 600; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
th.num { white-space: normal; }  /* headers wrap so the table fits the page */
tr.recommended td { background: #e7f1f9; font-weight: 600; }
tr.present td:first-child::after { content: " (present)"; font-weight: 400; color: var(--muted); }
table.compare { font-size: 12px; }
table.compare th { font-size: 11.5px; }
table.compare td.small { font-size: 11px; max-width: 150px; }
.warn { color: var(--warn); }
.ok { color: var(--ok); }
.note { color: var(--muted); font-size: 13px; }
.caution { border: 1px solid var(--warn); border-left-width: 5px; padding: 8px 12px; margin: 14px 0;
           background: #fff7f2; }
.figure { margin: 10px auto 16px; width: 680px; max-width: 100%; overflow-x: auto; }
.figure .caption { color: var(--muted); font-size: 12.5px; margin-top: 2px; }
ul.warnings li { margin-bottom: 3px; }
code { font-family: ui-monospace, "SFMono-Regular", Menlo, Consolas, "Liberation Mono", monospace;
       font-size: 12.5px; }
footer { margin-top: 36px; color: var(--muted); font-size: 12px; border-top: 1px solid var(--rule);
         padding-top: 8px; }

table.cover { width: auto; margin: 10px 0 0; font-size: 12.5px; }
table.cover th { background: none; color: var(--muted); font-weight: 400; padding: 1px 12px 1px 0; }
table.cover td { padding: 1px 0; }
table.cover td.sha { font-family: ui-monospace, Menlo, Consolas, "Liberation Mono", monospace;
                     font-size: 10.5px; word-break: break-all; }
p.decision { font-size: 17px; border-left: 5px solid var(--ok); padding: 6px 12px; background: #eef8f4; }
p.quote { border-left: 4px solid var(--accent); padding: 4px 10px; background: var(--band); }
tr.out td { color: var(--muted); background: #f6f6f6; }
td .reason { font-size: 11px; font-weight: 400; color: var(--muted); }
svg.chart { display: block; max-width: 100%; height: auto; }
section.appendix table { table-layout: fixed; }
section.appendix td:nth-child(1), section.appendix th:nth-child(1) { width: 32%; }
section.appendix td:nth-child(2), section.appendix th:nth-child(2) { width: 43%; }
section.appendix td:nth-child(3), section.appendix th:nth-child(3) { width: 25%; }
section.appendix table.methods td:nth-child(1), section.appendix table.methods th:nth-child(1) { width: 32%; }
section.appendix table.methods td:nth-child(2), section.appendix table.methods th:nth-child(2) { width: 68%; }

/* Paged media: sections flow (no forced page per section); page numbers "x of y" */
@page { size: auto; margin: 15mm 15mm 18mm 15mm;
        @bottom-right { content: "page " counter(page) " of " counter(pages);
                        font: 9pt system-ui, Arial, sans-serif; color: #5b6675; }
        @bottom-left { content: "heatload report"; font: 9pt system-ui, Arial, sans-serif;
                       color: #5b6675; } }
@media print {
  body { font-size: 10.5pt; }
  main { max-width: none; padding: 0; }
  section.appendix { break-before: page; page-break-before: always; }
  h2 { break-after: avoid; page-break-after: avoid; margin-top: 14pt; }
  h3 { break-after: avoid; page-break-after: avoid; }
  table { font-size: 8.5pt; }
  table.compare { font-size: 7.5pt; }
  table.compare td.small { font-size: 7pt; }
  section.appendix table { font-size: 7.5pt; }
  section.appendix td { padding: 2px 5px; }
  thead { display: table-header-group; }
  tr, td, th { break-inside: avoid; page-break-inside: avoid; }
  table.keep { break-inside: avoid; page-break-inside: avoid; }
  .figure { break-inside: avoid; page-break-inside: avoid; width: 100%; overflow: visible; }
  .modebar, .modebar-container { display: none !important; }
  .keyfigure, tr.recommended td, th { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
  a { color: inherit; text-decoration: none; }
}
"""
