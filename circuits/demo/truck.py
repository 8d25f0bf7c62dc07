"""The demo truck's electrical system (see circuits/demo/__init__.py for what is planted)."""

from __future__ import annotations

from .tables import CONTROLLER, DC_DC, System

TRUCK = System(
    vehicle="5KWTR24X9S0000388",
    title="24 V house system for the box body",
    dc=("red", "black"),
    ac=("black", "white", "green"),
    ac_volts=120,
    devices=f"""
House battery | battery | battery_box | source | | Rear locker | +: pos M8 10; -: neg M8 10
Main busbar | busbar | body | | Locker panel | | +: pos M8; -: neg M8
DC distribution | dc_panel | body | | Locker panel | | + in: pos M6; - bus: neg M6; Way 1..5: pos screw
Alternator | alternator | engine | source | | Engine, left side | B+: pos M8
DC-DC charger | dc_dc_charger | chassis | | | Sealed box on the chassis rail, behind the cab | {DC_DC}
Roof solar array | other | body | source | | Box-body roof, two strings, fused in a roof junction box | PV+: pos -; PV-: neg -
Solar charge controller | charge_controller | body | | Locker panel | | {CONTROLLER}
Compressor fridge | load | body | | | Kitchen block |
Cabin lights | load | body | | | Ceiling |
Water pump | load | body | | | Under the bench |
Diesel heater | load | body | | | Rear locker |
Roof fan | load | body | | | Roof, over the kitchen |
""",  # noqa: E501
    circuits="""
C-01 | House battery to main busbar | main_feed | House battery > Main busbar | 1/0 AWG | 120 | 1.2 m | fuse=200; at=0.1; note=Terminal fuse on the battery's positive post.
C-02 | DC distribution feed | dc_branch | Main busbar > DC distribution | 6 AWG | 40 | 1.0 m | fuse=60; to=+ in
G-01 | Alternator to DC-DC charger | charging | Alternator > DC-DC charger | 8 AWG | 25 | 2.5 m | pos; engine; fuse=40; at=0.4
G-02 | DC-DC charger to main busbar | charging | DC-DC charger > Main busbar | 8 AWG | 20 | 4.0 m | fuse=30; loop; from=OUT+; note=Loop left where the run crosses onto the subframe.
S-01 | Solar array to charge controller | charging | Roof solar array > Solar charge controller | 10 AWG | 19 | 5.0 m | V=40; fuse=25; at=0.5; to=PV+; to.neg=PV-
S-02 | Charge controller to main busbar | charging | Solar charge controller > Main busbar | 8 AWG | 30 | 1.0 m | fuse=40; from=BAT+; from.neg=BAT-
D-01 | Compressor fridge | dc_branch | DC distribution > Compressor fridge | 14 AWG | 3 | 4.0 m | continuous; critical; fuse=10; from=Way 1
D-02 | Cabin lights | dc_branch | DC distribution > Cabin lights | 14 AWG | 2 | 6.0 m | fuse=10; from=Way 2
D-03 | Water pump | dc_branch | DC distribution > Water pump | 14 AWG | 4 | 3.0 m | fuse=10; from=Way 3
D-04 | Diesel heater | dc_branch | DC distribution > Diesel heater | 14 AWG | 5 | 3.0 m | fuse=10; from=Way 4
D-05 | Roof fan | dc_branch | DC distribution > Roof fan | 14 AWG | 2 | 4.0 m | fuse=10; from=Way 5
""",  # noqa: E501
)
