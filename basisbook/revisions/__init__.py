"""Issued revisions: archive a snapshot, prove it unchanged, compare revisions.

``snapshot`` knows where snapshots live and reads their results; ``archive`` freezes the
current revision (it asks the build, through a function it is handed, for the site);
``verify`` re-hashes a snapshot folder or zip and can recompute it; ``diff`` compares two
results models (edited inputs, table rows, moved results, changed verdicts).  Change how an
archive is written or checked here.  Imports the contract, reading, running and the
renderer's number formatting; never the commands.
"""
