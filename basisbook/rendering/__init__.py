"""Rendering the handbook: plain data in, pages, figures and files out.

``site`` assembles every file of the site in memory (``render_files``) and keeps what a
long-lived process reuses (``RenderCache``); one module per page kind prepares that page's
view (``calc_page``, ``index_page``, ``changes_page``, ``dependencies_page``,
``glossary_page``, ``verification_page``, ``source_pages``, ``one_document``) and
``search_index`` the offline search; ``templating`` sets up Jinja (autoescape,
StrictUndefined) and project notes; ``mathfmt`` formats numbers, units and equations;
``figures`` draws line charts with matplotlib, ``energyflow`` and ``singleline`` write
their SVG directly, and ``figure_worker`` draws in a helper process.  Change how a page
looks here (and in ``templates/``).  Imports the contract, reading and running; never the
calc modules (no physics), revisions or commands: the build hands it the comparison with
the previous revision and the archived sites as plain data.
"""
