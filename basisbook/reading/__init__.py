"""Reading a project folder: the only place where text becomes numbers.

``project`` loads ``project.toml``, ``revisions.toml`` and ``inputs/*.toml`` into the
project model (every value with its file and line, or its link to another calc's result);
``tomlpos`` finds those lines; ``units`` parses and converts units once, here at the edge
(pint), so the maths runs on plain floats; ``records`` reads load lists (CSV, XLSX) cell by
cell; ``catalog`` lists the calc modules a project may use.  Imports the contract and the
calc modules' specs; never the engine, the renderer, revisions or commands.
"""
