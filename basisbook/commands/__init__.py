"""The commands a user runs: the CLI and what it orchestrates.

``cli`` parses arguments and maps problems to exit codes; ``build`` loads, runs and renders
a project into a site with an atomic swap (and an incremental ``Builder``); ``serve``
rebuilds on save and serves on 127.0.0.1; ``pdf`` prints the one-document view with headless
chromium.  The top layer: it may import every other package, and none imports it.
"""
