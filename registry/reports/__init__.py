"""Pictures and reports: what the registry holds, shown to people and put into papers.

Map (data flows registry → gather → plots/tables/pages → site):
    gather            read what figures and pages need (rate series, coalescence observations,
                      barriers by kind or motif, measurement rows with their details)
    numbers           values with uncertainties as papers write them: 62.3(4) or 62.3 ± 0.4
    tables            LaTeX (booktabs) and Markdown tables with footnotes for methods and solvents
    canvas            matplotlib's Agg canvas (never pyplot), our style, PNG or SVG by suffix
    plots             Eyring plot with 95 % band, barrier overview
    coalescence_plot  predicted Tc against field, observed Tc, the solvent's liquid range
    drawing           structure drawings as inline SVG (RDKit MolDraw2DSVG, lazily)
    pages             the HTML pages as text (index with filter/sort, a page per compound)
    site              the static, offline report folder (pages, plots, structures)
    assets            the inline CSS and JavaScript of those pages
    theme             our palette and matplotlib settings, shared by plots and pages

The library calls on top of these are in :mod:`registry.api.figures` (one per command).
Nothing here writes to the database.
"""
