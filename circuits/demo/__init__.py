"""Demo electrical systems for the demo jobs (shop.demo): devices, terminals, circuits with
their terminations, the shop's default torque specs, and one lead's waiver.

Everything is invented for showing the app: no real products. Each system has a few
realistic problems planted for the rules to find:
  van        a 2 AWG positive battery interconnect beside a 4/0 main feed (bottleneck);
             a 16 AWG cord from the shore inlet to a 30 A inverter/charger input; black
             used for DC negatives and the AC line in one cabinet; a solar string whose
             breaker sits at the controller (protection distance, waived by the lead).
             Also shown: the main fuse holder as the protection of the runs either side
             of it (rating read from the holder), a campground pedestal (an external
             supply off the vehicle, 30 A breaker, 120 V) with its shore cord protected
             at the pedestal, and a bare braided bonding strap
  truck      the alternator-to-charger run from the engine to the chassis without a
             confirmed service loop
  motorhome  a kitchen-socket run spliced onto a black offcut (colour change at a splice);
             a 2/0 interconnect whose positive is black welding cable re-marked red with
             heat-shrink at both ends (a note: re-marking at the ends is accepted for
             4 AWG and larger)
  boat       a bare "4" written where the 4/0 main feed was meant; one untinned run

The systems are written as small tables, one device or circuit a line (tables.py: see
`device_spec` and `circuit_spec` for the columns), which keeps them readable as a schedule;
one module a vehicle (van.py, truck.py, motorhome.py, boat.py), loaded by loading.py.

Loading is idempotent: devices are keyed by job + name, terminals by device + name,
circuits by job + tag (terminations come with their circuit), torque defaults by stud size
+ kind, the waiver by job + code + subject. Anything already there is left as it is.
"""

from __future__ import annotations

from .boat import BOAT
from .loading import SYSTEMS, load, system_load, torque_defaults_load
from .motorhome import MOTORHOME
from .tables import TORQUE_DEFAULTS, System
from .truck import TRUCK
from .van import VAN

__all__ = [
    "BOAT",
    "MOTORHOME",
    "SYSTEMS",
    "TORQUE_DEFAULTS",
    "TRUCK",
    "VAN",
    "System",
    "load",
    "system_load",
    "torque_defaults_load",
]
