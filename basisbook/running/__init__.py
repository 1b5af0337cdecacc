"""Running a project: resolve the links, order the calcs, run them, describe the results.

``engine`` checks every link, runs the instances in dependency order (converting linked
values into the receiving input's unit), evaluates the design checks and runs each module's
published cases; ``results`` turns the runs into the plain results model (``results.json``)
that the renderer, ``diff`` and ``verify`` all read.  Imports the contract and reading;
knows no physics (it calls each module's ``compute``), no HTML, no revisions.
"""
