"""The demo boat's electrical system (see circuits/demo/__init__.py for what is planted)."""

from __future__ import annotations

from .tables import System

BOAT = System(
    vehicle="QKW12345D616",
    title="Replace house bank and rewire the DC panel",
    dc=("red", "yellow"),
    ac=("black", "white", "green"),
    ac_volts=120,
    devices="""
House battery 1 | battery | battery_box | source | | Battery box under the saloon berth | +: pos 3/8in 10; -: neg 3/8in 10
House battery 2 | battery | battery_box | source | | Battery box under the saloon berth | +: pos 3/8in 10; -: neg 3/8in 10
Battery switch | other | battery_box | | | Bulkhead beside the battery box | 1: pos 3/8in; COM: pos 3/8in
DC main panel | dc_panel | body | | Nav station panel | | + in: pos 5/16in; - bus: neg 5/16in; Way 1..5: pos screw; Bonding bus: earth screw
AC panel | ac_panel | body | | Nav station panel | | Main L: line screw; N bar: neutral screw; PE bar: earth screw; Breaker 1: line screw
Shore inlet | shore_inlet | body | source | | Cockpit, starboard | L: line screw; N: neutral screw; PE: earth screw
Battery charger | inverter_charger | body | input=10 | | Cockpit locker | DC+: pos M6; DC-: neg M6; AC in L: line screw; AC in N: neutral screw; AC in PE: earth screw
Engine block | other | engine | | | Engine compartment | Bonding stud: earth M8
Navigation lights | load | body | | | Bow and stern |
Bilge pump | load | body | | | Bilge |
VHF radio | load | body | | | Nav station |
Cabin lights | load | body | | | Saloon and cabins |
Fridge | load | body | | | Galley |
""",  # noqa: E501
    circuits="""
C-01 | Battery interconnect, positive | interconnect | House battery 1 > House battery 2 | 4/0 | 150 | 1 ft | pos
C-02 | Battery interconnect, negative | interconnect | House battery 1 > House battery 2 | 4/0 | 150 | 1 ft | neg
C-03 | House battery 1 to battery switch | main_feed | House battery 1 > Battery switch | 4 | 150 | 3 ft | pos; fuse=250; at=0.15; to=1; note=Terminal fuse on the battery post.
C-04 | Battery switch to DC main panel | main_feed | Battery switch > DC main panel | 4/0 | 150 | 6 ft | pos; from=COM; to=+ in
C-05 | House battery 2 negative to DC main panel | main_feed | House battery 2 > DC main panel | 4/0 | 150 | 7 ft | neg
P-01 | Shore inlet to AC panel | shore | Shore inlet > AC panel | 10 AWG | 24 | 10 ft | breaker=30; at=0.9; to=Main L
A-01 | Battery charger AC supply | ac_branch | AC panel > Battery charger | 14 AWG | 8 | 6 ft | breaker=15; from=Breaker 1; to=AC in L
G-01 | Battery charger to DC main panel | charging | Battery charger > DC main panel | 8 AWG | 30 | 5 ft | fuse=40; to=+ in
D-01 | Navigation lights | dc_branch | DC main panel > Navigation lights | 12 AWG | 2 | 25 ft | critical; fuse=10; from=Way 1
D-02 | Bilge pump | dc_branch | DC main panel > Bilge pump | 12 AWG | 5 | 15 ft | critical; fuse=10; from=Way 2
D-03 | VHF radio | dc_branch | DC main panel > VHF radio | 12 AWG | 6 | 12 ft | critical; fuse=10; from=Way 3
D-04 | Cabin lights | dc_branch | DC main panel > Cabin lights | 14 AWG | 3 | 20 ft | fuse=10; from=Way 4
D-05 | Fridge | dc_branch | DC main panel > Fridge | 10 AWG | 6 | 15 ft | continuous; untinned; fuse=15; from=Way 5; note=Run reused from the old installation.
E-01 | Engine bonding | bonding | DC main panel > Engine block | 8 AWG | 1 | 10 ft | earth; loop
""",  # noqa: E501
)
