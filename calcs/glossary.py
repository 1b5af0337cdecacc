"""One glossary of names, symbols and units for every calc module.

A module's inputs and outputs name a term here; its symbol (LaTeX, following
IEC 60027 / IEC 60034 usage), meaning and unit (a pint unit string in which the
maths runs) are declared once and reused by pages, tables and docs.
Units: "" dimensionless, "pu" per unit, "text" for a choice, "Mvar"/"kvar" are
reactive power (a dimension of their own in basisbook.units).
"""

from basisbook.spec import Term

GLOSSARY: dict[str, Term] = {
    # --- synchronous generator (calcs/synchronous_generator.py) ---
    # Symbols follow IEC 60034-1 / IEC 60034-4-1 (subscript r = rated, d/q = axes).
    "generator_active_power": Term(
        r"P_\mathrm{r}",
        "rated active power of the generator at its terminals",
        "MW",
    ),
    "generator_power_factor": Term(
        r"\cos\varphi_\mathrm{r}",
        "rated power factor of the generator (lagging, over-excited)",
        "",
    ),
    "generator_voltage": Term(
        r"U_\mathrm{r}",
        "rated line-to-line terminal voltage of the generator",
        "kV",
    ),
    "generator_apparent_power": Term(
        r"S_\mathrm{r}",
        "rated apparent power (rated output) of the generator",
        "MVA",
    ),
    "generator_current": Term(r"I_\mathrm{r}", "rated stator (line) current of the generator", "A"),
    "generator_reactive_power": Term(
        r"Q_\mathrm{r}",
        "reactive power delivered at the rated point (lagging positive)",
        "Mvar",
    ),
    "rated_frequency": Term(r"f", "rated electrical frequency", "Hz"),
    "prime_mover_speed": Term(
        r"n_\mathrm{pm}",
        "rated speed of the prime mover at the generator shaft (after any gearbox)",
        "rpm",
    ),
    "prime_mover_rating": Term(
        r"P_\mathrm{pm}",
        "maximum continuous shaft output of the prime mover, as electrical power at the terminals",
        "MW",
    ),
    "rotor_type": Term(
        r"\mathrm{rotor}",
        "rotor construction: cylindrical (round) or salient pole",
        "text",
    ),
    "direct_axis_reactance": Term(
        r"x_\mathrm{d}",
        "direct-axis synchronous reactance, per unit on rated values",
        "pu",
    ),
    "quadrature_axis_reactance": Term(
        r"x_\mathrm{q}",
        "quadrature-axis synchronous reactance, per unit on rated values",
        "pu",
    ),
    "effective_quadrature_reactance": Term(
        r"x_{\mathrm{q,eff}}",
        "quadrature-axis reactance used in the phasor diagram (equal to x_d for a cylindrical rotor)",
        "pu",
    ),
    "armature_resistance": Term(
        r"r_\mathrm{a}",
        "armature (stator) resistance per phase, per unit on rated values",
        "pu",
    ),
    "turns_per_phase": Term(r"N", "stator turns in series per phase", ""),
    "winding_factor": Term(
        r"k_\mathrm{w}",
        "stator winding factor for the fundamental (pitch times distribution factor)",
        "",
    ),
    "stability_margin": Term(
        r"m_\mathrm{P}",
        "active-power margin below the theoretical stability limit, per unit of rated apparent power",
        "pu",
    ),
    "load_angle_limit": Term(
        r"\delta_\mathrm{lim}",
        "highest acceptable load angle at the rated point",
        "deg",
    ),
    "synchronous_speed": Term(r"n_\mathrm{s}", "synchronous speed of the generator", "rpm"),
    "pole_count": Term(r"2p", "number of rotor poles", ""),
    "pole_pairs": Term(r"p", "number of rotor pole pairs", ""),
    "speed_deviation": Term(
        r"\Delta n",
        "deviation of the prime-mover speed from the synchronous speed",
        "%",
    ),
    "electrical_period": Term(r"T", "period of one electrical cycle", "ms"),
    "phase_displacement_time": Term(
        r"t_{120}",
        "time between the voltage maxima of successive phases (120 electrical degrees)",
        "ms",
    ),
    "phase_displacement_angle": Term(
        r"\alpha_\mathrm{m}",
        "mechanical rotor angle between successive phases (120 electrical degrees)",
        "deg",
    ),
    "phase_voltage": Term(
        r"U_\mathrm{ph}",
        "rated phase (line-to-neutral) voltage of the star-connected stator",
        "V",
    ),
    "flux_per_pole": Term(
        r"\Phi",
        "fundamental air-gap flux per pole needed for rated voltage at no load",
        "Wb",
    ),
    "quadrature_axis_emf": Term(
        r"E_\mathrm{Q}",
        "EMF behind the quadrature-axis reactance; its direction is the rotor q-axis",
        "pu",
    ),
    "internal_emf": Term(
        r"E_0",
        "internal (excitation) EMF at the rated point, per unit of rated phase voltage",
        "pu",
    ),
    "internal_emf_line": Term(
        r"E_{0,\mathrm{LL}}",
        "internal EMF at the rated point as a line-to-line voltage",
        "kV",
    ),
    "load_angle": Term(
        r"\delta",
        "load angle between internal EMF and terminal voltage at the rated point",
        "deg",
    ),
    "stability_limit_margin": Term(
        r"\Delta P_\mathrm{st}",
        "active power left between the rated point and the practical stability limit at rated excitation",
        "MW",
    ),
    "prime_mover_margin": Term(
        r"\Delta P_\mathrm{pm}",
        "prime-mover rating less generator rated active power",
        "MW",
    ),
    # --- excitation system (calcs/excitation.py) ---
    # --- steam cycle (calcs/steam_cycle.py) ---
}
