"""Pictures and reports: what the registry holds, shown to people and put into papers.

Map (data flows registry → gather → plots/tables/pages → site):
    gather            read what figures and pages need (rate series, coalescence observations,
                      barriers by kind or motif, measurement rows with their details)
    numbers           values with uncertainties as papers write them: 62.3(4) or 62.3 ± 0.4
    tables            LaTeX (booktabs) and Markdown tables with footnotes for methods and solvents
                      (normalised first: one condition, one note)
    si_tables         supporting-information tables: reported and normalised values, LaTeX,
                      Markdown or xlsx
    table_file        a table written to its file (checked first, whole or not at all)
    style             the one figure style: screen or print, size (journal column or inches), dpi
    canvas            matplotlib's Agg canvas (never pyplot), the style applied, PNG/SVG/PDF by
                      suffix, titles wrapped to fit
    labels            group labels measured on the canvas: wrapped, upright, shortened, never
                      overlapping
    plots             Eyring plot with 95 % band, barrier overview
    coalescence_plot  predicted Tc against field, observed Tc, the solvent's liquid range
    drawing           structure drawings as inline SVG (RDKit MolDraw2DSVG, lazily)
    pages             the HTML pages as text (index with filter/sort, a page per compound)
    site              the static, offline report folder (pages, plots, structures)
    assets            the inline CSS and JavaScript of those pages
    theme             our palette (the screen style) and matplotlib settings, shared with pages

The library calls on top of these are in :mod:`registry.api.figures` (one per command).
Nothing here writes to the database.
"""
