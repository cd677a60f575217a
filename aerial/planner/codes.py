"""Typical code requirements that apply to a receiving-aerial layout, as checklist text.

Only codes whose text the authors know are written here, and from memory: each
line says so and asks the reader to check the edition in force. Local adoption
and amendments vary; the authority having jurisdiction and a licensed
electrician decide. Nothing here says a layout *complies* with a code: where
the site file lets aerial check a figure it says "pass" or "attention" for
that figure alone.

References
----------
.. [1] NFPA 70, National Electrical Code, Article 810 (radio and television
   equipment: receiving antennas) and Article 250 (grounding electrodes).
   (from memory; several editions, 2017-2023; check the edition adopted.)
.. [2] EN 60728-11 / IEC 60728-11, Cable networks for television signals,
   sound signals and interactive services -- Part 11: Safety (antenna
   earthing and equipotential bonding). (from memory; check the edition and
   national annexes.)
"""

from __future__ import annotations

from dataclasses import dataclass, field

from aerial.core import units
from aerial.core.lengthtext import metres, stated_length, words

US_REGIONS = ("us", "usa", "united states")
EUROPE_REGIONS = (
    "eu", "europe", "uk", "gb", "at", "be", "bg", "ch", "cy", "cz", "de", "dk", "ee", "es", "fi", "fr", "gr", "hr",
    "hu", "ie", "is", "it", "lt", "lu", "lv", "mt", "nl", "no", "pl", "pt", "ro", "se", "si", "sk",
)

#: Open-span limits of the minimum-size table for receiving-antenna conductors [m]:
#: under 35 ft (10.7 m), 35-150 ft (10.7-45.7 m), over 150 ft (NFPA 70, 810.16(A); from memory).
SPAN_LIMITS_M = (10.668, 45.72)
#: Minimum AWG by open span (three bands above) and material (NFPA 70, 810.16(A) table; from memory).
MIN_AWG_BY_MATERIAL = {
    "hard-drawn copper": (19, 14, 12),
    "copper-clad steel, bronze or other high-strength material": (20, 17, 14),
}
#: Grounding (earthing) conductor: at least 10 AWG copper (NFPA 70, 810.21(H); from memory).
EARTH_CONDUCTOR_AWG = 10
#: Bonding jumper from a separate electrode to the building's electrode system: 6 AWG copper (810.21(J); from memory).
BONDING_AWG = 6
#: Lead-in clearance from open power conductors: 600 mm (2 ft) for circuits up to 250 V, 3.0 m (10 ft) above
#: (810.18(A); from memory). [m]
LEAD_IN_CLEARANCE_M = (0.6, 3.0)
#: The same clearances as the code writes them, metric and US customary.
LEAD_IN_CLEARANCE_STATED = (("600 mm", "2 ft"), ("3.0 m", "10 ft"))
#: Lead-in clearance from lightning-protection conductors: 1.8 m (6 ft) (810.18(A); from memory). [m]
LIGHTNING_CONDUCTOR_CLEARANCE_M = 1.8
#: A metal underground water pipe is an electrode with at least 3 m in contact with the earth (250.52(A)(1); from memory). [m]
WATER_PIPE_CONTACT_M = 3.0
#: The same as the code writes it, metric and US customary.
WATER_PIPE_CONTACT_STATED = ("3.0 m", "10 ft")
#: EN 60728-11 earthing conductor (16 mm² copper) and bonding conductor (4 mm² copper), from memory. [m²]
EN_EARTHING_AREA_M2 = 16e-6
EN_BONDING_AREA_M2 = 4e-6

DISCLAIMER = ("This is a list of typical requirements, not a compliance check: local adoption and amendments vary, "
              "and the authority having jurisdiction and a licensed electrician decide.")


@dataclass
class LayoutFacts:
    """What the checklist can check about one layout (lengths in metres)."""

    open_spans_m: list
    wire_diameter_m: float
    wire_material: str
    wire_described: str
    lead_in_paths: list = field(default_factory=list)  # plan LineStrings/Points of the lead-in
    support_kinds: list = field(default_factory=list)
    layout_name: str = "this layout"


def region_code(region) -> str | None:
    """Which code text applies to a region name: "nfpa70", "en60728", or None."""
    if not region:
        return None
    norm = str(region).strip().lower()
    if norm in US_REGIONS or norm.startswith("us-"):
        return "nfpa70"
    if norm in EUROPE_REGIONS:
        return "en60728"
    return None


def minimum_awg(span_m: float, material: str) -> tuple[int, str]:
    """Smallest AWG size for an open span of a receiving-aerial wire (NFPA 70, 810.16(A), from memory).

    Parameters
    ----------
    span_m : float
        Open span between supports. [m]
    material : str
        aerial's conductor name ("copper", "copper-clad steel", ...).

    Returns
    -------
    (int, str)
        The AWG number and the table row used.

    Examples
    --------
    >>> minimum_awg(22.0, "copper")
    (14, 'hard-drawn copper')
    >>> minimum_awg(60.0, "copper")
    (12, 'hard-drawn copper')
    """
    row = "hard-drawn copper" if material in ("copper", "aluminium") else \
        "copper-clad steel, bronze or other high-strength material"
    band = 0 if span_m < SPAN_LIMITS_M[0] else (1 if span_m <= SPAN_LIMITS_M[1] else 2)
    return MIN_AWG_BY_MATERIAL[row][band], row


def _lead_in_clearance():
    """The start of the checklist line on power conductors: the lead-in's two clearances."""
    return words("810.13 / 810.18(A) power conductors: never cross over them; keep the lead-in at least {low} from "
                 "power circuits up to 250 V and {high} above 250 V",
                 low=stated_length(LEAD_IN_CLEARANCE_M[0], *LEAD_IN_CLEARANCE_STATED[0]),
                 high=stated_length(LEAD_IN_CLEARANCE_M[1], *LEAD_IN_CLEARANCE_STATED[1]))


def _awg_diameter(n: int) -> float:
    return units.awg_diameter(n)


def _nfpa70(site, plan, facts: LayoutFacts) -> list[str]:
    out = [f"US NFPA 70 (National Electrical Code), Article 810, receiving antennas — typical requirements for "
           f"{facts.layout_name}, from memory: check the edition your jurisdiction adopted. {DISCLAIMER}"]
    # conductor size by open span
    for span in facts.open_spans_m:
        awg, row = minimum_awg(span, facts.wire_material)
        need_d = _awg_diameter(awg)
        ok = facts.wire_diameter_m >= need_d * 0.995
        verdict = "pass (size only)" if ok else "ATTENTION: thinner than the table minimum"
        extra = " The table is for hard-drawn copper; soft copper stretches and sags." if row.startswith("hard") else ""
        if facts.wire_material == "aluminium":
            extra = " The table row for aluminium alloy is the copper row; check yours."
        if facts.wire_material == "steel":
            extra = " Galvanised steel is not in the copper row; check the table's other rows."
        out.append(words("810.16(A) conductor size: open span {span} of {wire} ({diameter}); the table asks for at "
                         "least {awg} AWG {row} ({need}): {verdict}.{extra}", span=metres(span),
                         wire=facts.wire_described, diameter=metres(facts.wire_diameter_m), awg=awg,
                         row=row, need=metres(need_d), verdict=verdict, extra=extra))
    # power conductors
    power = plan.power_lines if plan is not None else []
    if power and facts.lead_in_paths:
        nearest = min(float(p.distance(ln.path)) for p in facts.lead_in_paths for ln in power)
        verdict = "pass for the overhead lines you listed" if nearest >= LEAD_IN_CLEARANCE_M[1] else "ATTENTION"
        out.append(_lead_in_clearance() + ". Nearest listed overhead line: " + metres(nearest)
                   + f" in plan: {verdict}. Wiring inside the building and lines you did not list are not checked.")
    else:
        out.append(_lead_in_clearance() + " (no overhead lines are listed, so aerial cannot check).")
    kinds = set(facts.support_kinds)
    if "pole" in kinds:
        out.append("810.12 supports: ATTENTION — a support is a pole: it must not be a pole that carries power or "
                   "service conductors, nor the electric service mast.")
    else:
        out.append("810.12 supports: do not fix the aerial to the electric service mast or to a pole carrying power "
                   "conductors (no support here is described as a pole).")
    out.append("810.20 discharge unit: each lead-in needs a listed antenna discharge unit, outside or inside at the "
               "point nearest where the lead-in enters, away from combustible material (aerial cannot see it: check).")
    out.append(words("810.18(A): keep the lead-in at least {gap} from lightning-protection conductors, if the building "
                     "has them.", gap=stated_length(LIGHTNING_CONDUCTOR_CLEARANCE_M, "1.8 m", "6 ft")))
    # grounding conductor
    lead = next((w for w in site.wires if w.role == "earth lead"), None)
    need = _awg_diameter(EARTH_CONDUCTOR_AWG)
    if lead is not None:
        ok = lead.size.radius_m * 2 >= need * 0.995 and lead.size.material in ("copper", "copper-clad steel", "aluminium")
        out.append(f"810.21 grounding conductor: at least {EARTH_CONDUCTOR_AWG} AWG copper (" + metres(need)
                   + "), run as straight as practicable; the site's earth lead is "
                   + lead.size.described_as + f" {lead.size.material}: "
                   + ("pass (size only)." if ok else "ATTENTION: thinner than that."))
    else:
        out.append(f"810.21 grounding conductor: at least {EARTH_CONDUCTOR_AWG} AWG copper (" + metres(need)
                   + "), run as straight as practicable (no earth lead is described in the site file).")
    kinds_e = {e.kind for e in site.electrodes}
    if kinds_e & {"rods", "buried_wires", "water_pipe"} and "building_earth" not in kinds_e:
        out.append(f"810.21(F)/(J) bonding: ATTENTION — connect to the building's grounding electrode system; a "
                   f"separate rod or wire of your own must be bonded to it with at least {BONDING_AWG} AWG copper.")
    else:
        out.append("810.21(F) bonding: the grounding conductor goes to the building's grounding electrode system "
                   "(through a licensed electrician).")
    for e in site.electrodes:
        if e.kind == "water_pipe":
            ok = e.length_m >= WATER_PIPE_CONTACT_M
            out.append(words("250.52(A)(1) water pipe: an electrode only with at least {contact} of metal pipe in "
                             "contact with the earth, and it must be supplemented; the site gives {length}: ",
                             contact=stated_length(WATER_PIPE_CONTACT_M, *WATER_PIPE_CONTACT_STATED),
                             length=metres(e.length_m))
                       + ("pass (length only)." if ok else "ATTENTION: too short."))
    out.append("250.52(B): metal underground gas piping is never a grounding electrode.")
    return out


def _en60728(site, plan, facts: LayoutFacts) -> list[str]:
    out = [f"EN 60728-11 (IEC 60728-11), antenna earthing and equipotential bonding — typical requirements for "
           f"{facts.layout_name}, from memory: check the edition and your national annex. {DISCLAIMER}"]
    d16 = 2 * (EN_EARTHING_AREA_M2 / 3.141592653589793) ** 0.5
    lead = next((w for w in site.wires if w.role == "earth lead"), None)
    size = "" if lead is None else (" The site's earth lead is " + lead.size.described_as + ": "
                                    + ("pass (size only)." if lead.size.radius_m * 2 >= d16 * 0.995 else
                                       "ATTENTION: thinner than that."))
    out.append("Earthing conductor: an outdoor aerial and its supports are earthed through a conductor of at least "
               "16 mm² copper (about " + metres(d16) + " solid), run straight and vertical where "
               "possible, unless the aerial lies in the zone the standard exempts (well below the roof edge and close "
               "to the wall)." + size)
    out.append("Equipotential bonding: the lead-in's earth side is bonded at the building's main earthing terminal "
               "with at least 4 mm² copper (through a licensed electrician).")
    power = plan.power_lines if plan is not None else []
    out.append("Overhead lines: keep the aerial clear of them so that nothing can fall on them"
               + (" (the power-line rule here is stricter than the standard's distances)." if power else
                  " (no overhead lines are listed, so aerial cannot check)."))
    out.append("Never use gas piping as an earth; a water pipe is an earth only if no plastic section interrupts it.")
    return out


def code_checklist(site, plan, facts: LayoutFacts) -> list[str]:
    """The code checklist lines for a layout on a site, by the site's region.

    Parameters
    ----------
    site : Site
    plan : Plan or None
    facts : LayoutFacts
        What can be checked about the layout.

    Returns
    -------
    list of str
        Checklist lines; one line saying no code text is available when the
        region is unknown.
    """
    which = region_code(site.region)
    if which == "nfpa70":
        return _nfpa70(site, plan, facts)
    if which == "en60728":
        return _en60728(site, plan, facts)
    shown = f'region "{site.region}"' if site.region else "no region"
    return [f"The site gives {shown}: aerial has no code text for it. Ask the local authority which electrical code "
            "applies to receiving aerials (lead-in clearances, wire sizes, discharge unit, earthing and bonding); "
            "a licensed electrician decides. Set [site] region = \"US\" or a European country code to see typical "
            "requirements from NFPA 70 Article 810 or EN 60728-11."]
