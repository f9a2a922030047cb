"""What a trap was found doing, and what that means for steam, condensate and risk.

The condition words are the trade's own. Only a trap that leaks, blows through or
cycles rapidly wastes live steam; a plugged or flooded trap wastes none but backs
condensate up into the equipment, so it is a risk to report, not a zero to forget.

Each finding falls in one accounting category (`Finding category`): a failure (its
live steam is a loss a repair removes), a risk, unknown (not accessible), working, or
out of service. Installation losses (flash vented, condensate drained) are not a
category of finding: they follow from where a trap discharges, whatever it was found
doing, and a repair does not remove them.
"""

from enum import StrEnum

from service.physics.spread import Spread


class TrapCondition(StrEnum):
    WORKING = "working"
    LEAKING = "leaking"
    BLOW_THROUGH = "blow_through"
    PLUGGED = "plugged"
    FLOODED = "flooded"
    RAPID_CYCLING = "rapid_cycling"
    OUT_OF_SERVICE = "out_of_service"
    NOT_ACCESSIBLE = "not_accessible"


class FindingCategory(StrEnum):
    """Which part of a site's accounting a finding belongs to."""

    FAILURE = "failure"  # wastes live steam: a repair recovers it
    RISK = "risk"  # floods the equipment: listed and counted, not priced
    UNKNOWN = "unknown"  # not accessible in this round: its state is not known
    WORKING = "working"
    OUT_OF_SERVICE = "out_of_service"


NO_LOSS = Spread.exact(0.0)

# Fraction of the orifice's full steam capacity a trap in each condition passes.
# Common practice, no single confirmed source: blow-through 1.0,
# leaking 0.25, rapid cycling 0.2. The ranges are our own judgement of the spread: a
# blowing trap on a loaded line passes condensate too, which cuts its steam.
DEFAULT_LOSS_FACTORS: dict[TrapCondition, Spread] = {
    TrapCondition.WORKING: NO_LOSS,
    TrapCondition.LEAKING: Spread(0.25, 0.10, 0.40),
    TrapCondition.BLOW_THROUGH: Spread(1.00, 0.70, 1.00),
    TrapCondition.PLUGGED: NO_LOSS,
    TrapCondition.FLOODED: NO_LOSS,
    TrapCondition.RAPID_CYCLING: Spread(0.20, 0.10, 0.30),
    TrapCondition.OUT_OF_SERVICE: NO_LOSS,
    TrapCondition.NOT_ACCESSIBLE: NO_LOSS,
}

# In the order a site's settings list their loss factors.
LIVE_STEAM_CONDITIONS = (
    TrapCondition.LEAKING,
    TrapCondition.BLOW_THROUGH,
    TrapCondition.RAPID_CYCLING,
)
_FLOODING_RISK = frozenset({TrapCondition.PLUGGED, TrapCondition.FLOODED})
# Traps that pass no condensate: failed shut, or valved out.
_DISCHARGES_NOTHING = frozenset({TrapCondition.PLUGGED, TrapCondition.OUT_OF_SERVICE})

RISK_NOTES: dict[TrapCondition, str] = {
    TrapCondition.PLUGGED: (
        "Failed closed: condensate backs up into the equipment (water hammer, lost heat "
        "transfer, corrosion, frozen lines in winter)."
    ),
    TrapCondition.FLOODED: (
        "Backing up condensate: the equipment floods (water hammer, lost heat transfer, corrosion)."
    ),
}


def wastes_live_steam(condition: TrapCondition) -> bool:
    """True where the condition passes live steam (leaking, blow-through, rapid cycling)."""
    return condition in LIVE_STEAM_CONDITIONS


def is_flooding_risk(condition: TrapCondition) -> bool:
    """True where the trap holds condensate back (plugged, flooded)."""
    return condition in _FLOODING_RISK


def discharges_condensate(condition: TrapCondition) -> bool:
    """True where condensate still leaves through the trap.

    A trap that was not accessible is taken to discharge as designed: its condensate
    losses belong to the installation, whatever the trap's state.
    """
    return condition not in _DISCHARGES_NOTHING


def category_of(condition: TrapCondition) -> FindingCategory:
    """The accounting category of a finding.

    >>> category_of(TrapCondition.PLUGGED).value
    'risk'
    """
    if wastes_live_steam(condition):
        return FindingCategory.FAILURE
    if is_flooding_risk(condition):
        return FindingCategory.RISK
    if condition is TrapCondition.NOT_ACCESSIBLE:
        return FindingCategory.UNKNOWN
    if condition is TrapCondition.OUT_OF_SERVICE:
        return FindingCategory.OUT_OF_SERVICE
    return FindingCategory.WORKING


def is_failed(condition: TrapCondition) -> bool:
    """True for a trap that needs repair: it wastes steam or floods the equipment."""
    return wastes_live_steam(condition) or is_flooding_risk(condition)
