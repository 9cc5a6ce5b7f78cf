"""Pictures and reports: what the registry holds, shown to people and put into papers.

Map (data flows registry → gather → plots/tables/site):
    gather    read what figures and pages need (rate series, coalescence observations,
              barriers by kind or motif, compounds with findings)
    numbers   values with uncertainties as papers write them: 62.3(4) or 62.3 ± 0.4
    tables    LaTeX (booktabs) and Markdown tables with footnotes for methods and solvents
    plots     Eyring plot with 95 % band, predicted Tc against field, barrier overview
              (matplotlib's Agg canvas, imported lazily; PNG or SVG by suffix)
    drawing   structure drawings as inline SVG (RDKit MolDraw2DSVG, lazily)
    site      the static, offline HTML report (index with filter/sort, a page per compound)
    assets    the inline CSS and JavaScript of those pages
    theme     our palette and matplotlib settings, shared by plots and pages

Nothing here writes to the database.
"""
