"""The demo van's electrical system (see circuits/demo/__init__.py for what is planted)."""

from __future__ import annotations

from .tables import AC_IN_OUT, CONTROLLER, DC_DC, L_N_PE, System

VAN = System(
    vehicle="1BFVC12E3R0004217",
    title="Full electrical build: lithium bank, solar, inverter/charger",
    dc=("red", "black"),
    ac=("black", "white", "green"),
    ac_volts=120,
    devices=f"""
House battery 1 | battery | battery_box | source | | Under the rear bed, left | +: pos M8 10; -: neg M8 10
House battery 2 | battery | battery_box | source | | Under the rear bed, right | +: pos M8 10; -: neg M8 10
Main fuse | protection | battery_box | fuse=300 | | Battery box lid | In: pos M10; Out: pos M10
DC busbar | busbar | body | | Electrical cabinet | | +: pos 5/16in; -: neg 5/16in
DC fuse panel | dc_panel | body | | Electrical cabinet | | + in: pos 1/4in; - bus: neg 1/4in; Way 1..6: pos screw
Inverter/charger | inverter_charger | body | input=30 | Electrical cabinet | | DC+: pos 5/16in; DC-: neg 5/16in; {AC_IN_OUT}; Case earth: earth M6
AC panel | ac_panel | body | | Electrical cabinet | | Main L: line screw; N bar: neutral screw; PE bar: earth screw; Breaker 1..3: line screw
Shore inlet | shore_inlet | body | source | | Rear left side panel | {L_N_PE}
Campground pedestal | external_supply | off_vehicle | source breaker=30 V=120 | | Campsite hook-up post, 30 A socket | {L_N_PE}
Roof solar array | other | body | source | | Roof, two 200 W panels in series | PV+: pos -; PV-: neg -
Solar charge controller | charge_controller | body | | Electrical cabinet | | {CONTROLLER}
Alternator | alternator | engine | source | | Engine bay | B+: pos M8
DC-DC charger | dc_dc_charger | body | | | Under the passenger seat | {DC_DC}
Chassis earth point | other | body | | | Floor stud behind the cabinet | Stud: earth M8
LED lights | load | body | | | Ceiling, whole length |
Compressor fridge | load | body | | | Galley |
Roof fan | load | body | | | Roof, over the bed |
Water pump | load | body | | | Under the sink |
12 V and USB sockets | load | body | | | Galley and bed |
Diesel heater | load | body | | | Under the passenger seat box |
Galley outlets | load | body | | | Galley splashback |
Bed outlets | load | body | | | Bed head |
Water heater element | load | body | | | Rear locker |
""",  # noqa: E501
    circuits="""
C-01 | Battery interconnect, positive | interconnect | House battery 1 > House battery 2 | 2 AWG | 150 | 1.5 ft | pos; note=Short jumper supplied with the batteries.
C-02 | Battery interconnect, negative | interconnect | House battery 1 > House battery 2 | 4/0 AWG | 150 | 1.5 ft | neg
C-03 | Battery 2 positive to main fuse | main_feed | House battery 2 > Main fuse | 4/0 AWG | 250 | 0.5 ft | pos; prot=Main fuse; to=In
C-04 | Main fuse to DC busbar | main_feed | Main fuse > DC busbar | 4/0 AWG | 250 | 5 ft | pos; prot=Main fuse; from=Out
C-05 | Battery 1 negative to DC busbar | main_feed | House battery 1 > DC busbar | 4/0 AWG | 250 | 5 ft | neg
C-06 | Inverter/charger DC feed | dc_branch | DC busbar > Inverter/charger | 2/0 AWG | 185 | 3 ft | fuse=250
C-07 | DC fuse panel feed | dc_branch | DC busbar > DC fuse panel | 6 AWG | 45 | 2 ft | fuse=60; to=+ in
S-01 | Solar array to charge controller | charging | Roof solar array > Solar charge controller | 10 AWG | 13 | 20 ft | V=40; breaker=20; at=6.1; to=PV+; to.neg=PV-; note=Two panels in series; the breaker beside the controller is the PV disconnect.
S-02 | Charge controller to DC busbar | charging | Solar charge controller > DC busbar | 6 AWG | 30 | 3 ft | fuse=40; from=BAT+; from.neg=BAT-
G-01 | Alternator to DC-DC charger | charging | Alternator > DC-DC charger | 6 AWG | 38 | 16 ft | pos; engine; fuse=50; at=0.46; loop; to=IN+; note=Loop left at the engine before the bulkhead.
G-02 | DC-DC charger to DC busbar | charging | DC-DC charger > DC busbar | 6 AWG | 30 | 6 ft | fuse=40; from=OUT+
P-00 | Shore cord, pedestal to inlet | shore | Campground pedestal > Shore inlet | 10 AWG | 24 | 25 ft | cord; prot=Campground pedestal; note=30 A cord set, kept in the rear locker.
P-01 | Shore inlet to inverter/charger | shore | Shore inlet > Inverter/charger | 16 AWG | 24 | 10 ft | cord; breaker=30; at=0.3; ac_in; note=Inner run made from an extension-cord lead.
A-01 | Inverter/charger output to AC panel | ac_branch | Inverter/charger > AC panel | 10 AWG | 24 | 3 ft | breaker=30; ac_out; to=Main L
A-02 | Galley outlets | ac_branch | AC panel > Galley outlets | 12 AWG | 16 | 15 ft | breaker=20; from=Breaker 1
A-03 | Bed outlets | ac_branch | AC panel > Bed outlets | 14 AWG | 10 | 20 ft | breaker=15; from=Breaker 2
A-04 | Water heater element | ac_branch | AC panel > Water heater element | 12 AWG | 12 | 8 ft | continuous; breaker=20; from=Breaker 3
D-01 | LED lights | dc_branch | DC fuse panel > LED lights | 14 AWG | 4 | 15 ft | fuse=10; from=Way 1
D-02 | Compressor fridge | dc_branch | DC fuse panel > Compressor fridge | 12 AWG | 6 | 12 ft | continuous; critical; fuse=15; from=Way 2
D-03 | Roof fan | dc_branch | DC fuse panel > Roof fan | 14 AWG | 4 | 12 ft | fuse=10; from=Way 3
D-04 | Water pump | dc_branch | DC fuse panel > Water pump | 14 AWG | 6 | 10 ft | fuse=10; from=Way 4
D-05 | 12 V and USB sockets | dc_branch | DC fuse panel > 12 V and USB sockets | 12 AWG | 10 | 10 ft | fuse=15; from=Way 5
D-06 | Diesel heater | dc_branch | DC fuse panel > Diesel heater | 12 AWG | 10 | 8 ft | fuse=15; from=Way 6
E-01 | Inverter/charger case bonding | bonding | Inverter/charger > Chassis earth point | 6 AWG | 1 | 3 ft | earth; colour.earth=bare; from=Case earth; note=Bare tinned braided strap.
""",  # noqa: E501
    waivers=(
        (
            "PROTECTION_TOO_FAR",
            "S-01",
            "Two-panel series string: its short-circuit current is barely above its working "
            "current and the 10 AWG run carries several times that, so the breaker at the "
            "controller serves as the PV disconnect.",
        ),
    ),
)
