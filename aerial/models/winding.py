"""The tank coil as wound: the record a site's ``[receiver.coil]`` and the tuning pass around.

Its physics (inductance, the turns for an inductance, loss and Q) is :mod:`aerial.models.coil`, which a
report loads only when a coil is to be worked out; this record alone is what the site reader and the
tuning need to carry one. :mod:`aerial.models.coil` gives it too.

>>> CoilWinding(form_diameter_m=0.06, wire_diameter_m=0.5e-3, turns=50, winding_length_m=0.025).pitch()
0.0005
>>> CoilWinding(form_diameter_m=0.06, wire_diameter_m=0.5e-3).pitch()  # close-wound
0.0005
"""

from __future__ import annotations

from aerial.core.records import NamedTuple
from aerial.models.conductor import COPPER_RESISTIVITY


class CoilWinding(NamedTuple):
    """A single-layer tank coil as wound.

    Attributes
    ----------
    form_diameter_m : float
        Outside diameter of the former. [m]
    wire_diameter_m : float
        Outside diameter of the wire (of the bundle for stranded wire). [m]
    turns : float or None
        Number of turns; None when the coil is still to be designed (the
        result then gives the turns and winding length). [1]
    winding_length_m : float or None
        Length of the winding; gives the pitch as length/turns. [m]
    pitch_m : float or None
        Turn spacing; default close-wound (one wire diameter). [m]
    strands : int
        Number of strands of a stranded (litz) wire; 1 for solid wire. [1]
    strand_diameter_m : float or None
        Bare diameter of one strand, needed when ``strands`` > 1. [m]
    resistivity_ohm_m : float
        Conductor resistivity, default annealed copper. [ohm m]
    """

    form_diameter_m: float
    wire_diameter_m: float
    turns: float | None = None
    winding_length_m: float | None = None
    pitch_m: float | None = None
    strands: int = 1
    strand_diameter_m: float | None = None
    resistivity_ohm_m: float = COPPER_RESISTIVITY

    def pitch(self) -> float:
        """Turn spacing. [m]"""
        if self.pitch_m is not None:
            return float(self.pitch_m)
        if self.winding_length_m is not None and self.turns:
            return float(self.winding_length_m) / float(self.turns)
        return float(self.wire_diameter_m)
