"""Built-in Jinja templates and static assets (a package so they install with the tool).

A project overrides any of them by a file of the same name in PROJECT/templates/.
"""
