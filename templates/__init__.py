"""Built-in Jinja templates and static assets (installed as ``basisbook.templates``).

A project overrides any of them by a file of the same name in PROJECT/templates/.
"""
