"""The demo retrofit's small electrical system: a second roof panel on the demo van, its
own charge controller and the van's busbar. Invented for showing the app, like the other
demo systems (circuits.demo), and written in the same tables; the handed-over demo job
needs a system to have been read, signed and approved at all.

Loaded with circuits.demo's own loaders (devices by job + name, circuits by job + tag),
so it is idempotent in the same way."""

from __future__ import annotations

from circuits.demo.loading import system_load
from circuits.demo.tables import System

# Terminal torques are the (invented) device manuals' values in N·m; the busbar's 5/16 in
# studs take the shop default for crimped lugs (circuits.demo.tables.TORQUE_DEFAULTS).
RETROFIT = System(
    vehicle="1BFVC12E3R0004217",
    title="Retrofit: add second solar string",
    dc=("red", "black"),
    ac=("black", "white", "green"),
    ac_volts=120,
    devices="""
Rear roof panel | other | body | source | | Roof rack, rear | PV+: pos screw 1.8; PV-: neg screw 1.8
Second charge controller | charge_controller | body | | Electrical cabinet | | PV+: pos screw 2.4; PV-: neg screw 2.4; BAT+: pos screw 2.4; BAT-: neg screw 2.4
DC busbar | busbar | body | | Electrical cabinet | | +: pos 5/16in; -: neg 5/16in
""",  # noqa: E501
    circuits="""
S-03 | Rear panel to second controller | charging | Rear roof panel > Second charge controller | 10 AWG | 11 | 16 ft | V=20; fuse=15; at=0.3; to=PV+; to.neg=PV-; note=Inline fuse in the panel's lead, at the roof gland.
S-04 | Second controller to DC busbar | charging | Second charge controller > DC busbar | 8 AWG | 20 | 3 ft | fuse=30; at=0.2; from=BAT+; from.neg=BAT-
""",  # noqa: E501
)


def retrofit_system_load(job) -> None:
    """Give the retrofit job its devices and circuits (those missing)."""
    system_load(job, RETROFIT)
