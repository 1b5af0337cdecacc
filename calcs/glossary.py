"""One glossary of names, symbols and units for every calc module.

A module's inputs and outputs name a term here; its symbol (LaTeX, following
IEC 60027 / IEC 60034 usage), meaning and unit (a pint unit string in which the
maths runs) are declared once and reused by pages, tables and docs.
Units: "" dimensionless, "pu" per unit, "text" for a choice, "Mvar"/"kvar" are
reactive power (a dimension of their own in basisbook.reading.units).
"""

from basisbook.contract.spec import Term

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
    # --- gas-engine CHP, hydro, gas turbine, plant balance (calcs/engine_chp.py, hydro_unit.py, gas_turbine.py, plant_balance.py) ---
    # Symbols after EN ISO 6976 (H_i, net calorific value), Directive 2012/27/EU Annex II
    # (PES, CHP H eta, Ref E eta), IEC 60041 / IEC 60193 for hydraulic machines (H, Q, eta).
    # gas-engine CHP (engine_chp)
    "engine_electrical_output": Term(
        r"P_\mathrm{el,CHP}", "electrical output of the engine generator set at the load point (generator terminals)", "kW"),
    "fuel_input_basis": Term(
        r"\mathrm{basis}_\mathrm{fuel}",
        "how the fuel input is fixed: from the electrical efficiency, from the gas flow, or given directly", "text"),
    "engine_electrical_efficiency_given": Term(
        r"\eta_\mathrm{el,in}", "electrical efficiency at the load point on net calorific value, from the engine data sheet", ""),
    "fuel_gas_flow": Term(
        r"\dot V_\mathrm{gas,in}", "fuel gas volume flow at normal conditions (0 °C, 101.325 kPa), as given", "m**3/h"),
    "engine_fuel_input_given": Term(
        r"\dot Q_\mathrm{fuel,in}", "fuel heat input on net calorific value, as given", "kW"),
    "methane_fraction": Term(
        r"x_{\mathrm{CH}_4}", "methane volume fraction of the fuel gas (the rest taken as inert CO2)", ""),
    "methane_net_calorific_value": Term(
        r"H_{\mathrm{i,m,CH}_4}", "net calorific value (lower heating value) of methane per unit mass, 25 °C combustion reference", "MJ/kg"),
    "jacket_water_heat_share": Term(
        r"\varepsilon_\mathrm{JW}", "heat rejected to the engine jacket (cooling) water as a share of fuel input", ""),
    "lube_oil_heat_share": Term(
        r"\varepsilon_\mathrm{LO}", "heat rejected in the lube-oil cooler as a share of fuel input", ""),
    "charge_air_heat_share": Term(
        r"\varepsilon_\mathrm{CA}", "heat rejected in the charge-air (intercooler) circuit as a share of fuel input", ""),
    "charge_air_heat_recovery": Term(
        r"\mathrm{CA}_\mathrm{rec}", "whether the charge-air cooler heat goes to the heating circuit (recovered) or to a dump cooler", "text"),
    "exhaust_mass_flow": Term(r"\dot m_\mathrm{exh}", "exhaust gas mass flow leaving the engine (wet)", "kg/h"),
    "exhaust_temperature": Term(
        r"\vartheta_\mathrm{exh,1}", "exhaust gas temperature after the turbocharger, at the heat-recovery inlet", "degC"),
    "exhaust_outlet_temperature": Term(
        r"\vartheta_\mathrm{exh,2}", "exhaust gas temperature leaving the exhaust heat exchanger (to the stack)", "degC"),
    "exhaust_dew_point_limit": Term(
        r"\vartheta_\mathrm{dew,lim}", "lowest allowed exhaust temperature at the heat-exchanger outlet (acid dew point with margin)", "degC"),
    "heating_supply_temperature": Term(r"\vartheta_\mathrm{s}", "heating-circuit supply (flow) temperature leaving the CHP set", "degC"),
    "heating_return_temperature": Term(r"\vartheta_\mathrm{r}", "heating-circuit return temperature entering the CHP set", "degC"),
    "reference_electrical_efficiency": Term(
        r"\mathit{Ref}\,E\eta", "harmonised reference efficiency for separate production of electricity (same fuel)", ""),
    "reference_heat_efficiency": Term(
        r"\mathit{Ref}\,H\eta", "harmonised reference efficiency for separate production of heat (same fuel)", ""),
    "methane_normal_density": Term(r"\rho_{\mathrm{n,CH}_4}", "density of methane at normal conditions (0 °C, 101.325 kPa)", "kg/m**3"),
    "fuel_gas_net_calorific_value": Term(
        r"H_\mathrm{i,n}", "net calorific value of the fuel gas per normal cubic metre (0 °C, 101.325 kPa)", "MJ/m**3"),
    "chp_fuel_input": Term(r"\dot Q_\mathrm{fuel}", "fuel heat input of the CHP set on net calorific value", "kW"),
    "chp_fuel_gas_flow": Term(r"\dot V_\mathrm{gas}", "fuel gas volume flow at normal conditions (0 °C, 101.325 kPa)", "m**3/h"),
    "chp_electrical_efficiency": Term(r"\eta_\mathrm{el}", "electrical efficiency of the CHP set on net calorific value", ""),
    "jacket_water_heat": Term(r"\dot Q_\mathrm{JW}", "heat recovered from the jacket water", "kW"),
    "lube_oil_heat": Term(r"\dot Q_\mathrm{LO}", "heat recovered from the lube-oil cooler", "kW"),
    "charge_air_heat": Term(r"\dot Q_\mathrm{CA}", "heat rejected by the charge-air cooler", "kW"),
    "charge_air_heat_recovered": Term(r"\dot Q_\mathrm{CA,rec}", "charge-air cooler heat delivered to the heating circuit", "kW"),
    "exhaust_enthalpy_drop": Term(
        r"\Delta h_\mathrm{exh}", "specific enthalpy drop of the exhaust gas across the exhaust heat exchanger", "kJ/kg"),
    "exhaust_stack_enthalpy": Term(
        r"\Delta h_\mathrm{stack}", "specific enthalpy of the exhaust leaving to the stack, above the 25 °C reference", "kJ/kg"),
    "exhaust_heat_recovered": Term(r"\dot Q_\mathrm{exh}", "heat recovered from the exhaust gas", "kW"),
    "exhaust_stack_loss": Term(r"\dot Q_\mathrm{stack}", "sensible heat of the exhaust leaving the stack, above 25 °C", "kW"),
    "chp_thermal_output": Term(r"\dot Q_\mathrm{th}", "useful heat delivered to the heating circuit by the CHP set", "kW"),
    "chp_thermal_efficiency": Term(r"\eta_\mathrm{th}", "thermal efficiency of the CHP set (useful heat over fuel input)", ""),
    "chp_total_efficiency": Term(r"\eta_\mathrm{tot}", "total efficiency of the CHP set (electricity plus useful heat over fuel input)", ""),
    "power_to_heat_ratio": Term(r"\sigma", "power-to-heat ratio: electrical output over useful heat output", ""),
    "heating_water_flow": Term(r"\dot m_\mathrm{hw}", "heating-water mass flow through the CHP set", "t/h"),
    "unaccounted_heat_loss": Term(
        r"\dot Q_\mathrm{rad}", "radiation and unaccounted loss: fuel input less all declared outputs and losses", "kW"),
    "unaccounted_loss_share": Term(
        r"\varepsilon_\mathrm{rad}", "radiation and unaccounted loss as a share of fuel input", "%"),
    "primary_energy_savings": Term(
        r"\mathit{PES}", "primary energy savings of the cogeneration against separate production", "%"),
    "separate_production_fuel_ratio": Term(
        r"F_\mathrm{sep}/F_\mathrm{CHP}",
        "fuel that separate production of the same electricity and heat would need, per unit of CHP fuel input", ""),
    "pes_threshold": Term(
        r"\mathit{PES}_\mathrm{min}", "smallest primary energy savings for high-efficiency cogeneration at this unit size", "%"),
    "exhaust_dew_point_margin": Term(
        r"\Delta\vartheta_\mathrm{dew}", "exhaust outlet temperature above the dew-point limit", "K"),
    "fuel_gas_normal_density": Term(
        r"\rho_\mathrm{n,gas}", "density of the fuel gas (methane and CO2) at normal conditions (0 °C, 101.325 kPa)", "kg/m**3"),
    "chp_fuel_mass_flow": Term(r"\dot m_\mathrm{gas}", "fuel gas mass flow of the CHP set", "kg/h"),
    "stoichiometric_air_fuel_ratio": Term(
        r"A_\mathrm{st}", "dry air mass needed for complete combustion of one unit mass of the fuel gas", ""),
    "excess_air_ratio": Term(
        r"\lambda", "excess air ratio: combustion air over stoichiometric air, from the exhaust and fuel mass flows", ""),
    # hydro unit (hydro_unit)
    "hydro_design_flow": Term(r"Q", "turbine design discharge (volume flow of water)", "m**3/s"),
    "gross_head": Term(r"H_\mathrm{g}", "gross head: headwater level less tailwater level", "m"),
    "water_temperature": Term(r"\vartheta_\mathrm{w}", "water temperature, for density and viscosity", "degC"),
    "penstock_loss_basis": Term(
        r"\mathrm{basis}_\mathrm{h_f}",
        "how the penstock head loss is fixed: given, from a given friction factor, or from the wall roughness", "text"),
    "penstock_head_loss_given": Term(r"h_\mathrm{f,in}", "penstock and intake head loss at design flow, as given", "m"),
    "penstock_length": Term(r"L", "penstock length", "m"),
    "penstock_diameter": Term(r"D", "penstock inner diameter", "m"),
    "penstock_friction_factor_given": Term(r"f_\mathrm{in}", "Darcy friction factor of the penstock, as given", ""),
    "penstock_roughness": Term(r"\varepsilon", "equivalent sand-grain roughness of the penstock wall", "mm"),
    "penstock_minor_loss_coefficient": Term(
        r"\Sigma K", "sum of the local loss coefficients (intake, trash rack, bends, valve) on the penstock velocity head", ""),
    "hydro_turbine_efficiency": Term(r"\eta_\mathrm{T}", "hydraulic turbine efficiency at the design point", ""),
    "hydro_transformer_efficiency": Term(
        r"\eta_\mathrm{tr}", "efficiency of the hydro unit's step-up transformer at the load point", ""),
    "flow_duration_curve": Term(
        r"Q(p)", "flow-duration curve: river flow available to the unit against the share of time it is exceeded", "table"),
    "minimum_turbine_flow_fraction": Term(
        r"q_\mathrm{min}", "smallest flow the turbine runs at, as a fraction of design flow", ""),
    "hydro_availability": Term(r"A", "share of the year the unit is available to run", ""),
    "water_density": Term(r"\rho_\mathrm{w}", "density of the water at its temperature", "kg/m**3"),
    "water_kinematic_viscosity": Term(r"\nu", "kinematic viscosity of the water at its temperature", "mm**2/s"),
    "penstock_velocity": Term(r"v", "mean water velocity in the penstock at design flow", "m/s"),
    "penstock_reynolds_number": Term(r"\mathit{Re}", "Reynolds number of the penstock flow at design flow", ""),
    "penstock_friction_factor": Term(r"f", "Darcy friction factor of the penstock used", ""),
    "penstock_head_loss": Term(r"h_\mathrm{f}", "penstock and intake head loss at design flow", "m"),
    "net_head": Term(r"H_\mathrm{n}", "net head at the turbine: gross head less penstock losses", "m"),
    "gross_hydraulic_power": Term(r"P_\mathrm{h,g}", "hydraulic power of the design flow over the gross head", "kW"),
    "net_hydraulic_power": Term(r"P_\mathrm{h}", "hydraulic power of the design flow over the net head", "kW"),
    "hydro_shaft_power": Term(r"P_\mathrm{T}", "turbine shaft power at design flow", "kW"),
    "hydro_generator_output": Term(r"P_\mathrm{G}", "generator terminal output at design flow", "kW"),
    "hydro_grid_output": Term(r"P_\mathrm{grid}", "power delivered to the grid after the step-up transformer, at design flow", "kW"),
    "hydraulic_efficiency": Term(r"\eta_\mathrm{h}", "hydraulic (penstock) efficiency: net head over gross head", ""),
    "water_to_wire_efficiency": Term(r"\eta_\mathrm{ww}", "water-to-wire efficiency: grid output over gross hydraulic power", ""),
    "hydro_annual_energy": Term(r"E_\mathrm{a}", "annual energy delivered to the grid from the flow-duration curve", "MWh"),
    "hydro_full_load_hours": Term(r"t_\mathrm{FL}", "equivalent full-load hours: annual energy over design grid output", "h"),
    "hydro_capacity_factor": Term(r"\mathit{CF}", "capacity factor: annual energy over design output for 8760 h", ""),
    # simple gas turbine (gas_turbine)
    "compressor_inlet_temperature": Term(r"T_1", "air temperature at the compressor inlet", "degC"),
    "compressor_inlet_pressure": Term(r"p_1", "air pressure at the compressor inlet", "bar"),
    "compressor_pressure_ratio": Term(r"r_\mathrm{p}", "compressor pressure ratio p2/p1", ""),
    "compressor_isentropic_efficiency": Term(r"\eta_\mathrm{s,C}", "isentropic efficiency of the compressor", ""),
    "turbine_inlet_temperature": Term(r"T_3", "gas temperature at the turbine inlet (combustor outlet)", "degC"),
    "gas_turbine_isentropic_efficiency": Term(r"\eta_\mathrm{s,T}", "isentropic efficiency of the gas turbine expander", ""),
    "combustor_pressure_loss": Term(r"\Delta p_\mathrm{cc}", "combustor pressure loss as a share of compressor outlet pressure", "%"),
    "combustion_efficiency": Term(r"\eta_\mathrm{cc}", "combustion efficiency: heat released over fuel net calorific value", ""),
    "gas_turbine_fuel_lhv": Term(r"H_\mathrm{i,GT}", "net calorific value (lower heating value) of the gas-turbine fuel", "MJ/kg"),
    "gas_turbine_electrical_output": Term(r"P_\mathrm{el,GT}", "rated electrical output of the gas-turbine generator set", "MW"),
    "air_heat_capacity_ratio": Term(r"k", "heat capacity ratio of air for the cold air-standard comparison", ""),
    "compressor_outlet_pressure": Term(r"p_2", "compressor outlet pressure", "bar"),
    "turbine_inlet_pressure": Term(r"p_3", "turbine inlet pressure after the combustor loss", "bar"),
    "compressor_inlet_enthalpy": Term(r"h_1", "specific enthalpy of air at the compressor inlet (state 1)", "kJ/kg"),
    "compressor_isentropic_outlet_enthalpy": Term(r"h_{2s}", "specific enthalpy after isentropic compression to p2", "kJ/kg"),
    "compressor_outlet_enthalpy": Term(r"h_2", "specific enthalpy at the compressor outlet (state 2)", "kJ/kg"),
    "compressor_outlet_temperature": Term(r"T_2", "air temperature at the compressor outlet", "degC"),
    "turbine_inlet_enthalpy": Term(r"h_3", "specific enthalpy at the turbine inlet (state 3), gas treated as air", "kJ/kg"),
    "turbine_isentropic_outlet_enthalpy": Term(r"h_{4s}", "specific enthalpy after isentropic expansion to p1", "kJ/kg"),
    "turbine_outlet_enthalpy": Term(r"h_4", "specific enthalpy at the turbine outlet (state 4)", "kJ/kg"),
    "turbine_exhaust_temperature": Term(r"T_4", "gas temperature at the turbine exhaust (input to heat recovery)", "degC"),
    "fuel_air_ratio": Term(r"f", "fuel mass flow per unit air mass flow", ""),
    "compressor_specific_work": Term(r"w_\mathrm{C}", "compressor work per unit air mass flow", "kJ/kg"),
    "expander_specific_work": Term(r"w_\mathrm{T}", "turbine (expander) work per unit air mass flow, fuel mass included", "kJ/kg"),
    "gas_turbine_net_specific_work": Term(r"w_\mathrm{net}", "net shaft work of the gas-turbine cycle per unit air mass flow", "kJ/kg"),
    "gas_turbine_specific_heat_input": Term(r"q_\mathrm{in}", "fuel heat input (net calorific value) per unit air mass flow", "kJ/kg"),
    "back_work_ratio": Term(r"r_\mathrm{bw}", "back work ratio: compressor work over turbine work", ""),
    "gas_turbine_thermal_efficiency": Term(r"\eta_\mathrm{th,GT}", "thermal (shaft) efficiency of the gas-turbine cycle on net calorific value", ""),
    "air_standard_brayton_efficiency": Term(
        r"\eta_\mathrm{B}", "cold air-standard ideal Brayton efficiency at the same pressure ratio", ""),
    "gas_turbine_electrical_efficiency": Term(r"\eta_\mathrm{el,GT}", "electrical efficiency of the gas-turbine set on net calorific value", ""),
    "gas_turbine_heat_rate": Term(r"\mathit{HR}", "heat rate: fuel heat input per unit electrical energy", "kJ/kWh"),
    "gas_turbine_air_flow": Term(r"\dot m_\mathrm{a}", "compressor air mass flow at the rated output", "kg/s"),
    "gas_turbine_fuel_flow": Term(r"\dot m_\mathrm{f}", "fuel mass flow at the rated output", "kg/h"),
    "gas_turbine_fuel_input": Term(r"\dot Q_\mathrm{f,GT}", "fuel heat input of the gas turbine on net calorific value", "MW"),
    "gas_turbine_exhaust_flow": Term(r"\dot m_\mathrm{exh,GT}", "exhaust gas mass flow at the rated output (air plus fuel)", "kg/s"),
    # plant energy balance (plant_balance)
    "steam_unit_gross_output": Term(r"P_\mathrm{g,ST}", "gross electrical output of the steam turbine unit", "MW"),
    "steam_unit_auxiliary_load": Term(r"P_\mathrm{aux,ST}", "auxiliary (unit) load of the steam turbine unit", "MW"),
    "steam_unit_fuel_input": Term(r"\dot Q_\mathrm{f,ST}", "fuel heat input (solid biomass) of the steam turbine unit", "MW"),
    "steam_unit_heat_export": Term(r"\dot Q_\mathrm{h,ST}", "process or district heat exported from the steam turbine unit", "MW"),
    "steam_unit_operating_hours": Term(r"t_\mathrm{ST}", "equivalent full-load operating hours of the steam turbine unit per year", "h"),
    "chp_unit_electrical_output": Term(r"P_\mathrm{g,CHP}", "gross electrical output of the engine CHP unit", "MW"),
    "chp_unit_auxiliary_load": Term(r"P_\mathrm{aux,CHP}", "auxiliary load of the engine CHP unit", "MW"),
    "chp_unit_fuel_input": Term(r"\dot Q_\mathrm{f,CHP}", "fuel heat input (biogas) of the engine CHP unit", "MW"),
    "chp_unit_heat_export": Term(r"\dot Q_\mathrm{h,CHP}", "useful heat exported from the engine CHP unit", "MW"),
    "chp_unit_operating_hours": Term(r"t_\mathrm{CHP}", "equivalent full-load operating hours of the engine CHP unit per year", "h"),
    "hydro_unit_electrical_output": Term(r"P_\mathrm{g,H}", "electrical output of the hydro unit after its own step-up transformer", "MW"),
    "hydro_unit_auxiliary_load": Term(r"P_\mathrm{aux,H}", "auxiliary load of the hydro unit", "MW"),
    "hydro_unit_water_power": Term(r"P_\mathrm{w,H}", "gross hydraulic power of the water used by the hydro unit", "MW"),
    "hydro_unit_operating_hours": Term(r"t_\mathrm{H}", "equivalent full-load operating hours of the hydro unit per year", "h"),
    "gt_unit_electrical_output": Term(r"P_\mathrm{g,GT}", "gross electrical output of the gas-turbine unit", "MW"),
    "gt_unit_auxiliary_load": Term(r"P_\mathrm{aux,GT}", "auxiliary load of the gas-turbine unit", "MW"),
    "gt_unit_fuel_input": Term(r"\dot Q_\mathrm{f,GT,u}", "fuel heat input (natural gas) of the gas-turbine unit", "MW"),
    "gt_unit_operating_hours": Term(r"t_\mathrm{GT}", "equivalent full-load operating hours of the gas-turbine unit per year", "h"),
    "common_auxiliary_load": Term(r"P_\mathrm{aux,c}", "plant common services load not carried in any unit's auxiliary load", "MW"),
    "plant_gross_output": Term(r"P_\mathrm{g}", "gross electrical output of all units", "MW"),
    "plant_auxiliary_load": Term(r"P_\mathrm{aux}", "auxiliary load of all units and common services", "MW"),
    "plant_net_export": Term(r"P_\mathrm{n}", "net electrical export of the plant", "MW"),
    "plant_heat_export": Term(r"\dot Q_\mathrm{h}", "useful heat exported by the plant", "MW"),
    "plant_fuel_input": Term(r"\dot Q_\mathrm{f}", "fuel heat input of all fired units on net calorific value", "MW"),
    "plant_conversion_losses": Term(r"\dot Q_\mathrm{loss}", "conversion losses: fuel and water power in less gross electricity and heat out", "MW"),
    "plant_auxiliary_share": Term(r"\varepsilon_\mathrm{aux}", "plant auxiliary load as a share of gross output", "%"),
    "fired_net_electrical_efficiency": Term(
        r"\eta_\mathrm{el,n}", "net electrical efficiency of the fired units (hydro excluded) on net calorific value", ""),
    "plant_fuel_utilisation": Term(
        r"\eta_\mathrm{tot}", "fuel utilisation of the fired units: net electricity plus heat over fuel input", ""),
    "plant_annual_gross_generation": Term(r"E_\mathrm{g,a}", "annual gross electrical generation of all units", "GWh"),
    "plant_annual_net_export": Term(r"E_\mathrm{n,a}", "annual net electrical export of the plant", "GWh"),
    "plant_annual_heat_export": Term(r"Q_\mathrm{h,a}", "annual useful heat export of the plant", "GWh"),
    "plant_annual_fuel_input": Term(r"Q_\mathrm{f,a}", "annual fuel heat input of the plant", "GWh"),
    # --- auxiliary load, transformers, fault levels (calcs/auxiliary_load.py, transformers.py, fault_levels.py) ---
    # Symbols after IEC 60076 (S_r, u_k, u_R, P_k, P_0), IEC 60909-0 (c, S''_kQ, I''_k, i_p, K_T, K_S,
    # K_G,S, K_T,S, kappa), IEEE Std 141 / 399 (demand, locked-rotor kVA); kW/kvar/kVA on the aux side.
    # auxiliary load (auxiliary_load)
    "load_list": Term(r"\mathcal{L}_\mathrm{aux}", "auxiliary load list: one row per drive or service (CSV or XLSX file)", "records"),
    "demand_factor_continuous": Term(r"g_\mathrm{cont}", "demand factor of continuous-duty loads", ""),
    "demand_factor_intermittent": Term(r"g_\mathrm{int}", "demand factor of intermittent-duty loads", ""),
    "demand_factor_standby": Term(r"g_\mathrm{sb}", "demand factor of standby loads (run only instead of their duty twin)", ""),
    "emergency_supply_rating": Term(r"S_\mathrm{em}", "rated apparent power of the emergency / black-start supply", "kVA"),
    "auxiliary_share_limit": Term(r"\varepsilon_\mathrm{aux,max}", "screening limit of auxiliary consumption as a share of gross output", "%"),
    "connected_load": Term(r"P_\mathrm{conn}", "connected load: electrical input of every load-list row at rated output", "kW"),
    "maximum_demand_active": Term(r"P_\mathrm{MD}", "maximum demand of the auxiliary load, active power", "kW"),
    "maximum_demand_reactive": Term(r"Q_\mathrm{MD}", "maximum demand of the auxiliary load, reactive power (lagging positive)", "kvar"),
    "maximum_demand_apparent": Term(r"S_\mathrm{MD}", "maximum demand of the auxiliary load, apparent power", "kVA"),
    "auxiliary_power_factor": Term(r"\cos\varphi_\mathrm{MD}", "power factor of the auxiliary maximum demand", ""),
    "auxiliary_share": Term(r"\varepsilon_\mathrm{aux}", "auxiliary maximum demand as a share of the generator's gross output", "%"),
    "net_export_active_power": Term(r"P_\mathrm{net}", "active power left for export: gross output less the auxiliary demand", "MW"),
    "net_export_reactive_power": Term(r"Q_\mathrm{net}", "reactive power left for export at the rated point: generator less auxiliary demand", "Mvar"),
    "essential_demand_active": Term(r"P_\mathrm{ess}", "demand of the loads needed for island operation and black start, active power", "kW"),
    "essential_demand_apparent": Term(r"S_\mathrm{ess}", "demand of the loads needed for island operation and black start, apparent power", "kVA"),
    "largest_motor_tag": Term(r"\mathrm{tag}_\mathrm{LR,max}", "tag of the direct-on-line motor with the largest starting kVA", "text"),
    "largest_motor_rated_power": Term(r"P_\mathrm{rM,max}", "rated shaft power of the direct-on-line motor with the largest starting kVA", "kW"),
    "largest_motor_starting_power": Term(r"S_\mathrm{LR,max}", "locked-rotor apparent power of the largest direct-on-line motor at rated voltage", "kVA"),
    "largest_motor_starting_power_factor": Term(r"\cos\varphi_\mathrm{LR}", "locked-rotor power factor of the largest direct-on-line motor", ""),
    "motor_start_base_active_load": Term(r"P_\mathrm{base}", "active load already running while the largest motor starts", "kW"),
    "motor_start_base_reactive_load": Term(r"Q_\mathrm{base}", "reactive load already running while the largest motor starts", "kvar"),
    "running_motor_apparent_power": Term(r"S_\mathrm{rM}", "sum of the rated apparent power of the motors that can run together", "kVA"),
    "motor_group_current_ratio": Term(r"(I_\mathrm{LR}/I_\mathrm{rM})_\mathrm{grp}", "locked-rotor to rated current ratio of the running motor group (kVA-weighted)", ""),
    # power transformer (power_transformer)
    "transformer_role": Term(r"\mathrm{role}", "role of the transformer: generator step-up or unit auxiliary", "text"),
    "transformer_active_load": Term(r"P_\mathrm{T}", "active power the transformer carries", "MW"),
    "transformer_reactive_load": Term(r"Q_\mathrm{T}", "reactive power the transformer carries (lagging positive)", "Mvar"),
    "growth_margin": Term(r"m_\mathrm{g}", "margin for future load added to the load the transformer carries", "%"),
    "hv_rated_voltage": Term(r"U_\mathrm{rHV}", "rated voltage of the transformer's high-voltage winding", "kV"),
    "lv_rated_voltage": Term(r"U_\mathrm{rLV}", "rated voltage of the transformer's low-voltage winding", "kV"),
    "cooling_method": Term(r"\mathrm{cooling}", "cooling method identification (IEC 60076-2): ONAN or ONAF", "text"),
    "ambient_temperature_max": Term(r"\vartheta_\mathrm{a,max}", "highest ambient air temperature at the site", "degC"),
    "altitude": Term(r"H", "site altitude above mean sea level", "m"),
    "stated_rated_power": Term(r"S_\mathrm{r,stated}", "rated power stated by the project (0: choose from the R10 series)", "MVA"),
    "stated_short_circuit_impedance": Term(r"u_\mathrm{k,stated}", "short-circuit impedance stated by the project (0: the standard's minimum)", "%"),
    "load_loss": Term(r"P_\mathrm{k}", "load loss at rated current, referred to the reference temperature", "kW"),
    "no_load_loss": Term(r"P_\mathrm{0}", "no-load loss at rated voltage", "kW"),
    "vector_group": Term(r"\mathrm{vector\ group}", "connection symbol and phase displacement (IEC 60076-1)", "text"),
    "tap_range": Term(r"\pm a_\mathrm{tap}", "tap range either side of the principal tap", "%"),
    "tap_step": Term(r"\Delta a_\mathrm{tap}", "voltage step between adjacent taps", "%"),
    "tap_changer": Term(r"\mathrm{taps}", "tap changer type: on-load or off-circuit", "text"),
    "source_fault_level": Term(r"S''_\mathrm{k,src}", "short-circuit power of the supply at the transformer's HV terminals (0: infinite)", "MVA"),
    "transformer_load_apparent_power": Term(r"S_\mathrm{T}", "apparent power the transformer carries", "MVA"),
    "transformer_load_power_factor": Term(r"\cos\varphi_\mathrm{T}", "power factor of the load the transformer carries", ""),
    "temperature_rise_reduction": Term(r"\Delta\vartheta_\mathrm{red}", "reduction of the temperature-rise limits for the site's ambient and altitude", "K"),
    "transformer_derating_factor": Term(r"k_\mathrm{site}", "share of the rating a standard transformer carries at the site's ambient and altitude", "pu"),
    "required_rated_power": Term(r"S_\mathrm{r,req}", "rated power the transformer needs, growth margin and site derating included", "MVA"),
    "transformer_rated_power": Term(r"S_\mathrm{rT}", "rated power of the transformer", "MVA"),
    "minimum_short_circuit_impedance": Term(r"u_\mathrm{k,min}", "minimum short-circuit impedance for the rating (IEC 60076-5 Table 1)", "%"),
    "short_circuit_impedance": Term(r"u_\mathrm{k}", "short-circuit impedance at rated current, on the transformer rating", "%"),
    "resistive_impedance": Term(r"u_\mathrm{R}", "resistive part of the short-circuit impedance", "%"),
    "reactive_impedance": Term(r"u_\mathrm{X}", "reactive part of the short-circuit impedance", "%"),
    "transformer_loading": Term(r"\beta_\mathrm{site}", "continuous load with growth margin as a share of the site-derated rating", "%"),
    "voltage_regulation": Term(r"\varepsilon_\mathrm{reg}", "voltage drop from no load to the load at its power factor", "%"),
    "transformer_losses": Term(r"P_\mathrm{loss}", "total losses at the load point", "kW"),
    "transformer_efficiency": Term(r"\eta_\mathrm{T}", "efficiency at the load point", "%"),
    "hv_rated_current": Term(r"I_\mathrm{rHV}", "rated current of the high-voltage winding", "A"),
    "lv_rated_current": Term(r"I_\mathrm{rLV}", "rated current of the low-voltage winding", "A"),
    "through_fault_current_hv": Term(r"I_\mathrm{sc,HV}", "symmetrical through-fault current on the HV side for a fault at the LV terminals", "kA"),
    "through_fault_current_lv": Term(r"I_\mathrm{sc,LV}", "symmetrical through-fault current at the LV terminals, fed from the HV side", "kA"),
    # fault levels and grid connection (fault_levels)
    "grid_voltage": Term(r"U_\mathrm{nQ}", "nominal system voltage at the grid connection", "kV"),
    "grid_fault_level": Term(r"S''_\mathrm{kQ}", "initial symmetrical short-circuit power of the grid at the connection point", "MVA"),
    "grid_resistance_ratio": Term(r"R_\mathrm{Q}/X_\mathrm{Q}", "resistance to reactance ratio of the grid feeder", ""),
    "voltage_factor_mv": Term(r"c_\mathrm{max}", "voltage factor for maximum short-circuit currents above 1 kV (IEC 60909-0 Table 1)", ""),
    "voltage_factor_lv": Term(r"c_\mathrm{max,LV}", "voltage factor for maximum short-circuit currents up to 1 kV (IEC 60909-0 Table 1)", ""),
    "step_up_rated_power": Term(r"S_\mathrm{rT}", "rated power of the generator step-up transformer", "MVA"),
    "step_up_short_circuit_impedance": Term(r"u_\mathrm{kr}", "short-circuit impedance of the generator step-up transformer", "%"),
    "step_up_resistive_impedance": Term(r"u_\mathrm{Rr}", "resistive part of the step-up transformer's short-circuit impedance", "%"),
    "step_up_hv_voltage": Term(r"U_\mathrm{rTHV}", "rated HV voltage of the generator step-up transformer", "kV"),
    "step_up_lv_voltage": Term(r"U_\mathrm{rTLV}", "rated LV voltage of the generator step-up transformer", "kV"),
    "step_up_tap_changer": Term(r"\mathrm{taps}_\mathrm{T}", "tap changer of the generator step-up transformer: on-load or off-circuit", "text"),
    "subtransient_reactance": Term(r"x''_\mathrm{d}", "saturated direct-axis subtransient reactance of the generator", "pu"),
    "auxiliary_transformer_rated_power": Term(r"S_\mathrm{rT,aux}", "rated power of the unit auxiliary transformer", "MVA"),
    "auxiliary_transformer_short_circuit_impedance": Term(r"u_\mathrm{kr,aux}", "short-circuit impedance of the unit auxiliary transformer", "%"),
    "auxiliary_transformer_resistive_impedance": Term(r"u_\mathrm{Rr,aux}", "resistive part of the unit auxiliary transformer's short-circuit impedance", "%"),
    "auxiliary_transformer_hv_voltage": Term(r"U_\mathrm{rTHV,aux}", "rated HV voltage of the unit auxiliary transformer", "kV"),
    "auxiliary_transformer_lv_voltage": Term(r"U_\mathrm{n,aux}", "rated LV voltage of the unit auxiliary transformer (nominal voltage of the auxiliary board)", "kV"),
    "motor_start_voltage_limit": Term(r"U_\mathrm{start,min}", "lowest acceptable board voltage while the largest motor starts", "%"),
    "required_power_factor_lagging": Term(r"\cos\varphi_\mathrm{req,lag}", "power factor the connection must reach delivering reactive power", ""),
    "required_power_factor_leading": Term(r"\cos\varphi_\mathrm{req,lead}", "power factor the connection must reach absorbing reactive power", ""),
    "grid_impedance": Term(r"Z_\mathrm{Q}", "short-circuit impedance of the grid feeder at the nominal voltage", "ohm"),
    "step_up_impedance": Term(r"Z_\mathrm{THV}", "short-circuit impedance of the step-up transformer at its HV side", "ohm"),
    "generator_subtransient_impedance": Term(r"X''_\mathrm{d}", "subtransient reactance of the generator in ohms", "ohm"),
    "step_up_unit_correction": Term(r"K_\mathrm{S}", "correction factor of the power-station unit for a fault on the HV side (K_S or K_SO)", ""),
    "unit_generator_correction": Term(r"K_\mathrm{G,S}", "correction factor of the generator for a fault between generator and unit transformer", ""),
    "unit_transformer_correction": Term(r"K_\mathrm{T,S}", "correction factor of the unit transformer for a fault between generator and unit transformer", ""),
    "auxiliary_transformer_correction": Term(r"K_\mathrm{T,aux}", "correction factor K_T of the unit auxiliary transformer (network transformer)", ""),
    "hv_fault_current": Term(r"I''_\mathrm{k,HV}", "initial symmetrical short-circuit current at the grid connection", "kA"),
    "hv_peak_current": Term(r"i_\mathrm{p,HV}", "peak short-circuit current at the grid connection", "kA"),
    "generator_partial_current": Term(r"I''_\mathrm{kG}", "partial short-circuit current from the generator for a fault at the generator bus", "kA"),
    "network_partial_current": Term(r"I''_\mathrm{kT}", "partial short-circuit current from the grid through the step-up transformer for a fault at the generator bus", "kA"),
    "generator_bus_fault_current": Term(r"I''_\mathrm{k,G}", "initial symmetrical short-circuit current at the generator bus", "kA"),
    "generator_bus_peak_current": Term(r"i_\mathrm{p,G}", "peak short-circuit current at the generator bus", "kA"),
    "motor_partial_current": Term(r"I''_\mathrm{kM}", "partial short-circuit current from the running motors for a fault at the auxiliary board", "kA"),
    "auxiliary_bus_fault_current": Term(r"I''_\mathrm{k,aux}", "initial symmetrical short-circuit current at the auxiliary board", "kA"),
    "auxiliary_bus_peak_current": Term(r"i_\mathrm{p,aux}", "peak short-circuit current at the auxiliary board", "kA"),
    "backfeed_source_impedance": Term(r"Z_\mathrm{src}", "source impedance at the auxiliary board with the generator off line (back-feed from the grid)", "ohm"),
    "voltage_before_motor_start": Term(r"U_\mathrm{0}", "auxiliary board voltage with the running load, before the motor start", "%"),
    "voltage_during_motor_start": Term(r"U_\mathrm{start}", "auxiliary board voltage while the largest motor starts", "%"),
    "motor_start_voltage_dip": Term(r"\Delta U_\mathrm{start}", "voltage dip at the auxiliary board when the largest motor starts", "%"),
    "connection_active_power": Term(r"P_\mathrm{c}", "active power at the grid connection at rated generator output", "MW"),
    "connection_reactive_lagging": Term(r"Q_\mathrm{c,max}", "largest reactive power delivered at the grid connection at rated generator output", "Mvar"),
    "connection_reactive_leading": Term(r"Q_\mathrm{c,min}", "most negative (absorbed) reactive power at the grid connection at rated generator output", "Mvar"),
    "required_reactive_lagging": Term(r"Q_\mathrm{req,lag}", "reactive power the connection must deliver at the required lagging power factor", "Mvar"),
    "required_reactive_leading": Term(r"Q_\mathrm{req,lead}", "reactive power the connection must absorb at the required leading power factor (negative)", "Mvar"),
    "lagging_reactive_margin": Term(r"\Delta Q_\mathrm{lag}", "lagging reactive capability at the connection beyond the requirement", "Mvar"),
    "leading_reactive_margin": Term(r"\Delta Q_\mathrm{lead}", "leading reactive capability at the connection beyond the requirement", "Mvar"),
    "hv_switchgear_breaking_current": Term(r"I_\mathrm{b,HV}", "rated short-circuit breaking current of the grid-connection switchgear", "kA"),
    "hv_switchgear_making_current": Term(r"i_\mathrm{ma,HV}", "rated short-circuit making current (peak) of the grid-connection switchgear", "kA"),
    "generator_switchgear_breaking_current": Term(r"I_\mathrm{b,G}", "rated short-circuit breaking current of the generator-bus switchgear", "kA"),
    "generator_switchgear_making_current": Term(r"i_\mathrm{ma,G}", "rated short-circuit making current (peak) of the generator-bus switchgear", "kA"),
    "auxiliary_switchgear_breaking_current": Term(r"I_\mathrm{b,aux}", "rated short-circuit breaking current of the auxiliary-board switchgear", "kA"),
    "auxiliary_switchgear_making_current": Term(r"i_\mathrm{ma,aux}", "rated short-circuit making current (peak) of the auxiliary-board switchgear", "kA"),
    # --- excitation system (calcs/excitation.py) ---
    # Symbols after IEC 60034-4-1 (I_f0, I_fk), IEEE Std 115 (air-gap line, saturation
    # increment), IEC 60146 (U_di0) and IEEE Std 421.5 (K_A, T_A); subscript f = field.
    "open_circuit_characteristic": Term(
        r"\mathrm{OCC}",
        "open-circuit characteristic: test points of field current and terminal line voltage at rated speed",
        "table",
    ),
    "air_gap_slope": Term(
        r"k_\mathrm{ag}^{*}",
        "given slope of the air-gap line (terminal voltage per field ampere); 0 takes it from the first OCC segment",
        "kV/A",
    ),
    "short_circuit_field_current": Term(
        r"I_\mathrm{fk}",
        "field current giving rated armature current on sustained three-phase short circuit (short-circuit characteristic)",
        "A",
    ),
    "potier_reactance": Term(r"x_\mathrm{p}", "Potier reactance, per unit on rated values", "pu"),
    "field_resistance_reference": Term(
        r"R_\mathrm{f1}",
        "d.c. resistance of the field winding measured at the reference temperature",
        "ohm",
    ),
    "field_reference_temperature": Term(
        r"\theta_1", "field winding temperature at which its resistance was measured", "degC"),
    "field_operating_temperature": Term(
        r"\theta_2", "field winding temperature at rated load (design operating temperature)", "degC"),
    "ceiling_factor": Term(
        r"k_\mathrm{ceil}",
        "exciter ceiling voltage as a multiple of the rated-load field voltage",
        "",
    ),
    "excitation_transformer_secondary_voltage": Term(
        r"U_\mathrm{T2}",
        "rated secondary line-to-line voltage of the excitation transformer feeding the thyristor bridge",
        "V",
    ),
    "excitation_transformer_rating": Term(
        r"S_\mathrm{ET}", "rated apparent power of the excitation transformer", "kVA"),
    "excitation_transformer_impedance": Term(
        r"u_\mathrm{k,ET}",
        "short-circuit impedance of the excitation transformer, in percent on its own rating",
        "%",
    ),
    "minimum_firing_angle": Term(
        r"\alpha_\mathrm{min}",
        "smallest firing angle the bridge control allows (delay kept for safe commutation)",
        "deg",
    ),
    "maximum_regulating_firing_angle": Term(
        r"\alpha_\mathrm{max}",
        "largest firing angle acceptable at rated load (beyond it the bridge is oversized and regulates coarsely)",
        "deg",
    ),
    "inverter_firing_angle_limit": Term(
        r"\alpha_\mathrm{inv}",
        "largest firing angle in inverter operation, used for field de-excitation (commutation margin kept)",
        "deg",
    ),
    "continuous_current_factor": Term(
        r"k_\mathrm{cont}",
        "continuous rating of the excitation equipment as a multiple of the rated-load field current",
        "",
    ),
    "ceiling_margin_required": Term(
        r"m_\mathrm{ceil,min}",
        "smallest acceptable margin of the bridge's maximum d.c. voltage above the ceiling voltage",
        "%",
    ),
    "avr_gain": Term(
        r"K_\mathrm{A}",
        "proportional gain of the voltage regulator and exciter (pu field voltage per pu voltage error)",
        "",
    ),
    "avr_time_constant": Term(
        r"T_\mathrm{A}", "time constant of the voltage regulator and static exciter (first-order lag)", "s"),
    "open_circuit_time_constant": Term(
        r"T'_\mathrm{d0}", "direct-axis transient open-circuit time constant of the generator", "s"),
    "reference_step": Term(
        r"\Delta u_\mathrm{ref}", "step in the voltage-regulator reference, per unit of rated voltage", "pu"),
    "voltage_rise_time_limit": Term(
        r"t_\mathrm{r,max}", "longest acceptable 10-90 % rise time of the terminal voltage after a reference step", "s"),
    "voltage_overshoot_limit": Term(
        r"M_\mathrm{p,max}", "largest acceptable terminal-voltage overshoot after a reference step", "%"),
    "voltage_settling_time_limit": Term(
        r"t_\mathrm{s,max}", "longest acceptable 2 % settling time of the terminal voltage after a reference step", "s"),
    "residual_correction_current": Term(
        r"\Delta I_\mathrm{f,res}",
        "field-current shift that corrects the open-circuit curve for residual voltage (curve through the origin)",
        "A",
    ),
    "air_gap_slope_used": Term(
        r"k_\mathrm{ag}", "slope of the air-gap line used (terminal voltage per field ampere)", "kV/A"),
    "air_gap_field_current": Term(
        r"I_\mathrm{fg}", "field current for rated voltage on the air-gap line", "A"),
    "no_load_field_current": Term(
        r"I_\mathrm{f0}", "field current for rated voltage at no load (on the open-circuit characteristic)", "A"),
    "saturation_factor": Term(
        r"k_\mathrm{sat}",
        "saturation factor at rated voltage: no-load field current over air-gap field current",
        "",
    ),
    "short_circuit_ratio": Term(
        r"K_\mathrm{C}",
        "short-circuit ratio: field current for rated voltage at no load over field current for rated current on short circuit",
        "",
    ),
    "unsaturated_direct_axis_reactance": Term(
        r"x_\mathrm{du}",
        "unsaturated direct-axis synchronous reactance from the air-gap line and the short-circuit characteristic",
        "pu",
    ),
    "short_circuit_current_slope": Term(
        r"k_\mathrm{sc}",
        "slope of the short-circuit characteristic: armature amperes per field ampere",
        "A/A",
    ),
    "occ_slope_at_rated_voltage": Term(
        r"k_\mathrm{occ}",
        "slope of the open-circuit characteristic at rated voltage (incremental voltage per field ampere)",
        "kV/A",
    ),
    "incremental_generator_gain": Term(
        r"K_\mathrm{G}",
        "incremental open-circuit gain at rated voltage, pu voltage per pu field current on the air-gap base",
        "",
    ),
    "potier_emf": Term(
        r"E_\mathrm{p}", "Potier EMF (voltage behind the Potier reactance) at the rated point", "pu"),
    "potier_emf_angle": Term(
        r"\delta_\mathrm{p}", "angle of the Potier EMF ahead of the terminal voltage at the rated point", "deg"),
    "potier_resultant_field_current": Term(
        r"I_\mathrm{fr}",
        "field current that gives the Potier EMF on the open-circuit characteristic (resultant air-gap MMF)",
        "A",
    ),
    "armature_reaction_field_current": Term(
        r"I_\mathrm{fa}",
        "field current equivalent to the armature reaction at rated current",
        "A",
    ),
    "potier_field_current": Term(
        r"I_\mathrm{fN,P}", "field current at rated load by the Potier-reactance method", "A"),
    "unsaturated_load_field_current": Term(
        r"I_\mathrm{fu}",
        "field current at rated load without saturation (air-gap and short-circuit field currents combined as phasors)",
        "A",
    ),
    "saturation_increment_current": Term(
        r"I_\mathrm{fs}",
        "saturation increment: open-circuit curve minus air-gap line, in field current, at the Potier EMF",
        "A",
    ),
    "saturation_allowance_field_current": Term(
        r"I_\mathrm{fN,S}", "field current at rated load by the saturation-allowance method", "A"),
    "field_current_method_difference": Term(
        r"\Delta I_\mathrm{fN}",
        "saturation-allowance result less the Potier result, in percent of the Potier result",
        "%",
    ),
    "rated_load_field_current": Term(
        r"I_\mathrm{fN}", "field current at rated load used for sizing (larger of the two methods)", "A"),
    "field_resistance_operating": Term(
        r"R_\mathrm{f2}", "field winding resistance at the operating temperature", "ohm"),
    "rated_field_voltage": Term(
        r"U_\mathrm{fN}", "field voltage at rated load and operating temperature", "V"),
    "rated_field_power": Term(
        r"P_\mathrm{fN}", "field power at rated load and operating temperature", "kW"),
    "no_load_field_voltage": Term(
        r"U_\mathrm{f0}", "field voltage at rated voltage, no load, with the hot field resistance", "V"),
    "ceiling_voltage": Term(
        r"U_\mathrm{fc}", "exciter ceiling voltage required at the field terminals", "V"),
    "ceiling_current": Term(
        r"I_\mathrm{fc}", "field current the ceiling voltage drives through the hot field winding", "A"),
    "bridge_ideal_dc_voltage": Term(
        r"U_\mathrm{di0}", "ideal no-load d.c. voltage of the thyristor bridge at zero firing angle", "V"),
    "commutation_reactance": Term(
        r"X_\mathrm{c}", "commutation reactance per phase on the bridge side (from the excitation transformer)", "ohm"),
    "no_load_firing_angle": Term(
        r"\alpha_0", "bridge firing angle at rated voltage, no load", "deg"),
    "rated_firing_angle": Term(
        r"\alpha_\mathrm{N}", "bridge firing angle at rated load", "deg"),
    "ceiling_firing_angle": Term(
        r"\alpha_\mathrm{c}", "bridge firing angle when delivering the ceiling voltage and current", "deg"),
    "bridge_maximum_dc_voltage": Term(
        r"U_\mathrm{d,max}", "largest d.c. voltage of the bridge: minimum firing angle, at ceiling current", "V"),
    "ceiling_voltage_margin": Term(
        r"m_\mathrm{ceil}", "margin of the bridge's largest d.c. voltage above the ceiling voltage", "%"),
    "required_secondary_voltage": Term(
        r"U_\mathrm{T2,req}",
        "excitation transformer secondary voltage just reaching the ceiling voltage at the minimum firing angle",
        "V",
    ),
    "negative_ceiling_voltage": Term(
        r"U_\mathrm{fc}^{-}",
        "magnitude of the negative field voltage in inverter operation (de-excitation) at the inverter "
        "firing-angle limit and rated-load current",
        "V",
    ),
    "bridge_ac_current": Term(
        r"I_\mathrm{ac}", "r.m.s. a.c. line current of the bridge at the continuous field current", "A"),
    "required_transformer_rating": Term(
        r"S_\mathrm{ET,req}", "apparent power the excitation transformer must carry continuously", "kVA"),
    "excitation_transformer_loading": Term(
        r"\lambda_\mathrm{ET}", "continuous loading of the excitation transformer in percent of its rating", "%"),
    "exciter_ceiling_per_unit": Term(
        r"e_\mathrm{fd,max}",
        "upper limit of the exciter output in pu of the air-gap field voltage (regulator ceiling)",
        "pu",
    ),
    "voltage_rise_time": Term(
        r"t_\mathrm{r}", "10-90 % rise time of the terminal voltage after the reference step (open circuit)", "s"),
    "voltage_overshoot": Term(
        r"M_\mathrm{p}", "terminal-voltage overshoot after the reference step, percent of the final change", "%"),
    "voltage_settling_time": Term(
        r"t_\mathrm{s}", "time until the terminal voltage stays within 2 % of its final change", "s"),
    # --- steam cycle (calcs/steam_cycle.py) ---
    # State points numbered as on the page: 1 condenser outlet, 2 condensate pump outlet,
    # 3 deaerator outlet, 4 feed pump outlet, 5 closed-heater outlet (boiler inlet), 6 live
    # steam, 7 heater extraction, 8 deaerator extraction, 9 turbine exhaust, 10 heater drain.
    "gross_electrical_output": Term(
        r"P_\mathrm{el,g}", "rated gross electrical output of the steam turbine generator at its terminals", "MW"),
    "live_steam_pressure": Term(r"p_6", "live-steam pressure at the turbine stop valve", "bar"),
    "live_steam_temperature": Term(r"T_6", "live-steam temperature at the turbine stop valve", "degC"),
    "boiler_pressure_drop": Term(
        r"\Delta p_\mathrm{b}",
        "pressure drop from feed pump discharge to turbine stop valve (heater, economiser, drum, "
        "superheater, main steam line)", "bar"),
    "heater_extraction_pressure": Term(
        r"p_7", "turbine extraction pressure feeding the closed feed-water heater (shell pressure)", "bar"),
    "deaerator_pressure": Term(
        r"p_8", "deaerator (feed-water tank) pressure, equal to its turbine extraction pressure", "bar"),
    "condenser_pressure_basis": Term(
        r"\mathrm{basis}_\mathrm{c}",
        "how the condenser pressure is fixed: given directly, or from the cooling water", "text"),
    "condenser_pressure": Term(r"p_\mathrm{c,in}", "condenser pressure as given by the project", "bar"),
    "cooling_water_inlet_temperature": Term(
        r"T_\mathrm{cw,in}", "cooling-water temperature at the condenser inlet", "degC"),
    "cooling_water_rise": Term(r"\Delta T_\mathrm{cw}", "cooling-water temperature rise across the condenser", "K"),
    "condenser_design_terminal_difference": Term(
        r"\Delta T_\mathrm{c,d}",
        "condenser terminal temperature difference (saturation less cooling-water outlet) used to "
        "derive the pressure from the cooling water", "K"),
    "condenser_minimum_terminal_difference": Term(
        r"\Delta T_\mathrm{c,min}",
        "smallest acceptable condenser terminal temperature difference", "K"),
    "hp_section_efficiency": Term(
        r"\eta_\mathrm{s,HP}", "isentropic efficiency of the turbine section from inlet to the heater extraction", ""),
    "ip_section_efficiency": Term(
        r"\eta_\mathrm{s,IP}",
        "isentropic efficiency of the turbine section from the heater extraction to the deaerator extraction", ""),
    "lp_section_efficiency": Term(
        r"\eta_\mathrm{s,LP}",
        "isentropic efficiency of the turbine section from the deaerator extraction to the exhaust", ""),
    "pump_efficiency": Term(r"\eta_\mathrm{s,P}", "isentropic efficiency of the condensate and feed pumps", ""),
    "heater_terminal_difference": Term(
        r"\mathrm{TTD}",
        "closed-heater terminal temperature difference: shell saturation temperature less feed-water outlet", "K"),
    "drain_cooler": Term(
        r"\mathrm{DC}", "whether the closed heater has a drain-cooling zone (none or fitted)", "text"),
    "drain_cooler_approach": Term(
        r"\mathrm{DCA}",
        "drain-cooler approach: heater drain outlet temperature less feed-water inlet temperature", "K"),
    "mechanical_efficiency": Term(
        r"\eta_\mathrm{m}", "mechanical efficiency of the turbine shaft train (bearings, gearbox)", ""),
    "generator_efficiency": Term(r"\eta_\mathrm{g}", "generator efficiency at the rated point", ""),
    "boiler_efficiency": Term(
        r"\eta_\mathrm{b}", "boiler efficiency: heat to the steam over fuel heat input on net calorific value", ""),
    "auxiliary_load": Term(
        r"P_\mathrm{aux}", "electrical auxiliary (unit) load of the steam unit, pump motors included", "MW"),
    "fuel_basis": Term(
        r"\mathrm{basis}_\mathrm{f}",
        "how the fuel heating value is given: dry basis with moisture, or as received", "text"),
    "fuel_lhv_dry": Term(
        r"q_\mathrm{net,d}", "net calorific value (lower heating value) of the fuel, dry basis", "MJ/kg"),
    "fuel_moisture": Term(r"M_\mathrm{ar}", "moisture content of the fuel as received, wet basis", "%"),
    "fuel_lhv_as_received": Term(
        r"q_\mathrm{net,ar,in}", "net calorific value of the fuel as received, as given by the project", "MJ/kg"),
    "exhaust_quality_limit": Term(
        r"x_\mathrm{min}", "lowest acceptable steam quality (dryness fraction) at the turbine exhaust", ""),
    "superheat_margin_minimum": Term(
        r"\Delta T_\mathrm{sh,min}", "smallest acceptable live-steam superheat", "K"),
    "feed_pump_discharge_pressure": Term(r"p_4", "feed pump discharge pressure (boiler inlet)", "bar"),
    "condenser_operating_pressure": Term(r"p_\mathrm{c}", "condenser pressure used in the cycle", "bar"),
    "condenser_saturation_temperature": Term(
        r"T_\mathrm{sat,c}", "saturation temperature at the condenser pressure", "degC"),
    "cooling_water_outlet_temperature": Term(
        r"T_\mathrm{cw,out}", "cooling-water temperature at the condenser outlet", "degC"),
    "condenser_terminal_difference": Term(
        r"\Delta T_\mathrm{c}", "condenser terminal temperature difference achieved (saturation less cooling-water outlet)", "K"),
    "live_steam_saturation_temperature": Term(
        r"T_\mathrm{sat,6}", "saturation temperature at the live-steam pressure", "degC"),
    "live_steam_superheat": Term(r"\Delta T_\mathrm{sh}", "superheat of the live steam above saturation", "K"),
    "heater_saturation_temperature": Term(
        r"T_\mathrm{sat,7}", "saturation temperature in the closed-heater shell", "degC"),
    "condenser_outlet_enthalpy": Term(r"h_1", "specific enthalpy of the condensate leaving the condenser (point 1)", "kJ/kg"),
    "condenser_outlet_entropy": Term(r"s_1", "specific entropy of the condensate leaving the condenser (point 1)", "kJ/(kg*K)"),
    "condensate_pump_outlet_enthalpy": Term(r"h_2", "specific enthalpy after the condensate pump (point 2)", "kJ/kg"),
    "deaerator_outlet_enthalpy": Term(r"h_3", "specific enthalpy of the saturated feed water leaving the deaerator (point 3)", "kJ/kg"),
    "deaerator_outlet_entropy": Term(r"s_3", "specific entropy of the feed water leaving the deaerator (point 3)", "kJ/(kg*K)"),
    "feed_pump_outlet_enthalpy": Term(r"h_4", "specific enthalpy after the feed pump (point 4)", "kJ/kg"),
    "feed_pump_outlet_temperature": Term(r"T_4", "feed-water temperature after the feed pump (point 4)", "degC"),
    "heater_outlet_temperature": Term(r"T_5", "feed-water temperature leaving the closed heater (point 5)", "degC"),
    "heater_outlet_enthalpy": Term(r"h_5", "specific enthalpy of the feed water entering the boiler (point 5)", "kJ/kg"),
    "live_steam_enthalpy": Term(r"h_6", "specific enthalpy of the live steam (point 6)", "kJ/kg"),
    "live_steam_entropy": Term(r"s_6", "specific entropy of the live steam (point 6)", "kJ/(kg*K)"),
    "heater_extraction_enthalpy": Term(r"h_7", "specific enthalpy of the heater extraction steam (point 7)", "kJ/kg"),
    "heater_extraction_entropy": Term(r"s_7", "specific entropy of the heater extraction steam (point 7)", "kJ/(kg*K)"),
    "deaerator_extraction_enthalpy": Term(r"h_8", "specific enthalpy of the deaerator extraction steam (point 8)", "kJ/kg"),
    "deaerator_extraction_entropy": Term(r"s_8", "specific entropy of the deaerator extraction steam (point 8)", "kJ/(kg*K)"),
    "turbine_exhaust_enthalpy": Term(r"h_9", "specific enthalpy of the steam at the turbine exhaust (point 9)", "kJ/kg"),
    "heater_drain_temperature": Term(r"T_{10}", "temperature of the drain leaving the closed heater (point 10)", "degC"),
    "heater_drain_enthalpy": Term(r"h_{10}", "specific enthalpy of the drain leaving the closed heater (point 10)", "kJ/kg"),
    "heater_shell_to_feedwater_difference": Term(
        r"\Delta T_\mathrm{FWH}", "closed-heater shell saturation temperature less feed-water outlet temperature", "K"),
    "heater_extraction_fraction": Term(
        r"y_7", "steam extracted to the closed heater per unit of live-steam flow", ""),
    "deaerator_extraction_fraction": Term(
        r"y_8", "steam extracted to the deaerator per unit of live-steam flow", ""),
    "condenser_steam_fraction": Term(
        r"y_9", "steam reaching the condenser per unit of live-steam flow", ""),
    "turbine_exhaust_quality": Term(r"x_9", "steam quality (dryness fraction) at the turbine exhaust", ""),
    "turbine_specific_work": Term(r"w_\mathrm{T}", "turbine work per unit of live-steam flow", "kJ/kg"),
    "pump_specific_work": Term(r"w_\mathrm{P}", "condensate and feed pump work per unit of live-steam flow", "kJ/kg"),
    "net_specific_work": Term(r"w_\mathrm{net}", "net cycle work per unit of live-steam flow", "kJ/kg"),
    "specific_heat_added": Term(r"q_\mathrm{in}", "heat added in the boiler per unit of live-steam flow", "kJ/kg"),
    "specific_heat_rejected": Term(r"q_\mathrm{out}", "heat rejected in the condenser per unit of live-steam flow", "kJ/kg"),
    "cycle_thermal_efficiency": Term(r"\eta_\mathrm{th}", "thermal efficiency of the steam cycle (net work over heat added)", ""),
    "carnot_efficiency": Term(
        r"\eta_\mathrm{C}", "Carnot efficiency between live-steam and condenser saturation temperatures", ""),
    "energy_balance_residual": Term(
        r"\varepsilon_\mathrm{E}", "cycle energy balance residual |in - out| / in", "%"),
    "live_steam_flow": Term(r"\dot m_6", "live-steam mass flow for the rated gross electrical output", "t/h"),
    "turbine_shaft_power": Term(r"P_\mathrm{T}", "turbine shaft power (steam work) at the rated output", "MW"),
    "mechanical_loss": Term(r"P_\mathrm{m,loss}", "mechanical loss of the shaft train at the rated output", "MW"),
    "generator_loss": Term(r"P_\mathrm{g,loss}", "generator loss at the rated output", "MW"),
    "cycle_pump_power": Term(
        r"P_\mathrm{P}", "power the condensate and feed pumps give the water (part of the auxiliary load)", "MW"),
    "boiler_heat_duty": Term(r"\dot Q_\mathrm{b}", "heat given to the steam in the boiler", "MW"),
    "fuel_heat_input": Term(r"\dot Q_\mathrm{f}", "fuel heat input on net calorific value as received", "MW"),
    "boiler_loss": Term(r"\dot Q_\mathrm{b,loss}", "boiler losses (fuel heat input less heat to the steam)", "MW"),
    "gross_electrical_efficiency": Term(
        r"\eta_\mathrm{el,g}", "gross electrical efficiency on fuel net calorific value", ""),
    "net_electrical_output": Term(r"P_\mathrm{el,n}", "net electrical export of the steam unit", "MW"),
    "net_electrical_efficiency": Term(
        r"\eta_\mathrm{el,n}", "net electrical efficiency on fuel net calorific value", ""),
    "fuel_lhv": Term(r"q_\mathrm{net,ar}", "net calorific value of the fuel as received, used for the fuel flow", "MJ/kg"),
    "fuel_mass_flow": Term(r"\dot m_\mathrm{f}", "as-received fuel mass flow at the rated output", "t/h"),
    "condenser_heat_rejection": Term(r"\dot Q_\mathrm{c}", "heat rejected in the condenser at the rated output", "MW"),
    "cooling_water_specific_heat": Term(
        r"c_{p,\mathrm{cw}}", "specific heat capacity of the cooling water at its mean temperature", "kJ/(kg*K)"),
    "cooling_water_flow": Term(r"\dot m_\mathrm{cw}", "condenser cooling-water mass flow", "t/h"),
}
