"""The procedure tests' ship, written out: a fixed copy of the fictional sample ship.

A third, general-form circuit (``aux``) has its return going to the tank in use. Kept
here, not read from ``areas_sample/``, so that changes to the sample never move the
checks. FICTIONAL: the ship, its fuels and its figures describe nothing real.
"""

from __future__ import annotations

SHIP = """
[ship]
name = "MV Test Petrel"
imo = "9999993"
fictional = true

[inlet]
target_cst = 14.0
min_cst = 2.5
max_cst = 18.0
max_rate_c_per_min = 1.5
supply_temperature_c = 38.0
max_temperature_c = 150.0

[fuels.vlsfo]
grade = "RMG 380"
bdn_ref = "TP-0001 (fictional)"
sulphur_pct = 0.48
density_kg_m3 = 975.0
viscosity_cst = 290.0
viscosity_ref_c = 50.0

[fuels.mgo]
grade = "DMA"
bdn_ref = "TP-0002 (fictional)"
sulphur_pct = 0.08
density_kg_m3 = 850.0
viscosity_cst = 3.5
viscosity_ref_c = 40.0
viscosity2_cst = 1.9
viscosity2_ref_c = 80.0

[tanks.vlsfo_service]
capacity_m3 = 45.0
fuel = "vlsfo"
volume_m3 = 38.0

[tanks.mgo_service]
capacity_m3 = 30.0
fuel = "mgo"
volume_m3 = 26.0

[tanks.mgo_storage]
capacity_m3 = 120.0
fuel = "mgo"
volume_m3 = 85.0

[consumers.main_engine]
kind = "main_engine"
mcr_kw = 9000.0
sfoc_g_kwh = 171.0
ref_speed_kn = 14.0
ref_load_pct = 85.0

[consumers.dg1]
kind = "generator"
power_kw = 420.0
rated_kw = 700.0
sfoc_g_kwh = 205.0

[consumers.dg3]
kind = "generator"
power_kw = 300.0
sfoc_g_kwh = 210.0

[consumers.aux_boiler]
kind = "boiler"
fuel_t_h = 0.3

[volumes.supply_line]
kind = "pipe"
length_m = 30.0
bore_mm = 40.0

[volumes.mixing_tank]
kind = "stirred"
volume_m3 = 0.5

[volumes.heaters]
kind = "stirred"
volume_m3 = 0.12

[volumes.engine_line]
kind = "pipe"
volume_m3 = 0.03

[volumes.return_line]
kind = "pipe"
length_m = 20.0
bore_mm = 32.0

[volumes.boiler_line]
kind = "pipe"
length_m = 40.0
bore_mm = 25.0

[volumes.burner_heater]
kind = "stirred"
volume_m3 = 0.03

[volumes.aux_line]
kind = "stirred"
volume_m3 = 0.08

[circuits.main]
tanks = ["vlsfo_service", "mgo_service"]
consumers = ["main_engine", "dg1"]
chain = ["supply_line", "mixing_tank"]
loop = ["heaters", "engine_line"]
loop_flow_m3h = 5.0
loop_return = ["return_line"]

[circuits.boiler]
tanks = ["vlsfo_service", "mgo_service"]
consumers = ["aux_boiler"]
chain = ["boiler_line", "burner_heater"]

[circuits.aux]
tanks = ["vlsfo_service", "mgo_service"]
consumers = ["dg3"]
links = [
  { from = "valve", to = "aux_line", flow = "consumption", factor = 3.0 },
  { from = "aux_line", to = "dg3" },
  { from = "aux_line", to = "tank_in_use", flow = "rest" },
]
"""

