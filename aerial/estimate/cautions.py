"""Electrical-safety cautions printed with every report.

These are the usual cautions of the trade. They do not replace local codes:
the local electrical code, the authority that enforces it and a licensed
electrician decide what is required where the aerial is put up.
"""

from __future__ import annotations

from aerial.models.tank import BLEED_REMEDY

GENERAL_CAUTIONS: tuple[str, ...] = (
    "Lightning: an outdoor wire collects static charge and can be struck. Disconnect the lead-in and connect it "
    "to earth when the receiver is not in use and whenever a storm is near; fit an antenna discharge unit "
    "(lightning arrester) where the lead-in enters the building.",
    "Power lines: put the wire, its supports and the lead-in where nothing can fall or blow onto a power line, "
    "even if a support breaks; never cross over or under a power line. Contact is often fatal.",
    "Never use gas piping as an earth.",
    "Do not open mains outlets or rely on the mains (protective) earth for the aerial without a licensed electrician.",
    "Bond the aerial's earth to the building's grounding electrode system as your local code requires.",
    "The figures here are estimates. Local electrical codes and licensed practice govern the installation.",
)


def cautions_for(site, coupling: str | None = None) -> list[str]:
    """The general cautions plus those the site's own earth system calls for; ``coupling``: the tuning's
    coupling when it differs from the site's (designed with the coil), default the site's."""
    out = list(GENERAL_CAUTIONS)
    kinds = {e.kind for e in site.electrodes}
    if "water_pipe" in kinds:
        out.append(
            "Water-pipe earth: a metal cold-water pipe is an earth only if no plastic section (a repair, a meter, "
            "a filter) interrupts it between you and the ground; a pipe can also be made plastic later by a plumber. "
            "Codes require a supplementary electrode and bonding; ask a licensed electrician."
        )
    if "building_earth" in kinds:
        out.append(
            "Building protective earth: it exists to clear mains faults, can carry fault and leakage current, and "
            "brings mains noise with it. Connect to it only at the building's earthing terminal or bonding point, "
            "through a licensed electrician, never through an outlet."
        )
    if _at_a_flat(site):
        out.append(
            "Building: its steel, its pipes and its mains earth are bonded to the building's earthing. The aerial's "
            "earth joins them only at the main earthing terminal or a bonding point, and only through a licensed "
            "electrician; keep the wire clear of other flats' balconies and of any cable on the facade."
        )
    if any(w.role == "counterpoise" for w in site.wires):
        out.append(
            "Counterpoise: it is not an earth for lightning or static; keep a separate earth connection for "
            "the discharge unit."
        )
    if (coupling or site.receiver.coupling) == "series capacitor":
        out.append(
            "Series coupling capacitor: the aerial has no DC path to earth and will build up static charge; add "
            f"{BLEED_REMEDY}."
        )
    return out


def _at_a_flat(site) -> bool:
    """Whether the wire is at a flat: the plan says so, or the building the site describes has a balcony floor."""
    return site.apartment or (site.building is not None and site.building.balcony_floor_m is not None)
