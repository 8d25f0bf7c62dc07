"""The demo motorhome's electrical system (see circuits/demo/__init__.py for what is planted)."""

from __future__ import annotations

from .tables import AC_IN_OUT, DC_DC, L_N_PE, System

MOTORHOME = System(
    vehicle="4TWLR18C5P0019022",
    title="48 V system with 230 V inverter/charger",
    dc=("red", "black"),
    ac=("brown", "blue", "green_yellow"),
    ac_volts=230,
    devices=f"""
House battery 1 | battery | battery_box | source | | Garage, front left | +: pos M8 10; -: neg M8 10
House battery 2 | battery | battery_box | source | | Garage, front right | +: pos M8 10; -: neg M8 10
Main busbar | busbar | body | | Garage electrical bay | | +: pos M10; -: neg M10
Inverter/charger | inverter_charger | body | input=16 | Garage electrical bay | | DC+: pos M10; DC-: neg M10; {AC_IN_OUT}; Case earth: earth M6
Shore inlet | shore_inlet | body | source | | Right rear wall | {L_N_PE}
AC consumer unit | ac_panel | body | | Wardrobe panel | | Main L: line screw; N bar: neutral screw; PE bar: earth screw; Breaker 1..4: line screw
Alternator | alternator | engine | source | | Engine bay | B+: pos M8
DC-DC charger 12/48 | dc_dc_charger | body | | Garage electrical bay | | {DC_DC}
Chassis earth point | other | body | | | Garage floor stud | Stud: earth M8
Kitchen sockets | load | body | | | Kitchen |
Induction hob | load | body | | | Kitchen |
Water heater | load | body | | | Garage |
Bedroom sockets | load | body | | | Rear bedroom |
""",  # noqa: E501
    circuits="""
C-01 | Battery interconnect | interconnect | House battery 1 > House battery 2 | 2/0 AWG | 60 | 0.5 m | colour.a=black; mark.a=heat_shrink:red:both; note=Positive cut from black welding cable, sleeved red at both lugs.
C-02 | Battery 2 to main busbar | main_feed | House battery 2 > Main busbar | 2/0 AWG | 120 | 1.5 m | fuse=200; at=0.1
C-03 | Inverter/charger DC feed | dc_branch | Main busbar > Inverter/charger | 1/0 AWG | 115 | 1.0 m | fuse=150
P-01 | Shore inlet to inverter/charger | shore | Shore inlet > Inverter/charger | 12 AWG | 16 | 4.0 m | breaker=20; at=0.5; ac_in
A-01 | Inverter/charger output to consumer unit | ac_branch | Inverter/charger > AC consumer unit | 10 AWG | 22 | 3.0 m | breaker=30; ac_out; to=Main L
A-02 | Kitchen sockets | ac_branch | AC consumer unit > Kitchen sockets | 12 AWG | 13 | 5.0 m | breaker=20; from=Breaker 1; splice=black; note=Extended behind the fridge with an offcut.
A-03 | Induction hob | ac_branch | AC consumer unit > Induction hob | 12 AWG | 15 | 3.0 m | continuous; breaker=20; from=Breaker 2
A-04 | Water heater | ac_branch | AC consumer unit > Water heater | 14 AWG | 6 | 4.0 m | continuous; breaker=15; from=Breaker 3
A-05 | Bedroom sockets | ac_branch | AC consumer unit > Bedroom sockets | 14 AWG | 8 | 7.0 m | breaker=15; from=Breaker 4
G-01 | Alternator to DC-DC charger | charging | Alternator > DC-DC charger 12/48 | 6 AWG | 40 | 6.0 m | V=12; pos; engine; fuse=60; at=0.3; loop; to=IN+
G-02 | DC-DC charger to main busbar | charging | DC-DC charger 12/48 > Main busbar | 10 AWG | 10 | 1.5 m | fuse=15; from=OUT+
E-01 | Inverter/charger case bonding | bonding | Inverter/charger > Chassis earth point | 6 AWG | 1 | 1.0 m | earth; from=Case earth
""",  # noqa: E501
)
