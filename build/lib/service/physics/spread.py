"""A figure with its plausible range, so no report claims more precision than it has."""

from dataclasses import dataclass


@dataclass(frozen=True, slots=True)
class Spread:
    """A figure with the low and high ends of its plausible range."""

    typical: float
    low: float
    high: float

    def __post_init__(self) -> None:
        if not self.low <= self.typical <= self.high:
            raise ValueError(
                f"the range {self.low:g} to {self.high:g} must contain the typical value "
                f"{self.typical:g}"
            )

    @classmethod
    def exact(cls, value: float) -> "Spread":
        """A figure known without spread."""
        return cls(value, value, value)

    def scaled(self, factor: "Spread") -> "Spread":
        """The product with another non-negative spread, end by end.

        >>> Spread(2.0, 1.0, 3.0).scaled(Spread(0.5, 0.25, 1.0))
        Spread(typical=1.0, low=0.25, high=3.0)
        """
        return Spread(self.typical * factor.typical, self.low * factor.low, self.high * factor.high)

    def widened_to(self, typical: float) -> "Spread":
        """This range moved to a new typical value, widened to hold it if need be.

        >>> Spread(0.25, 0.1, 0.4).widened_to(0.6)
        Spread(typical=0.6, low=0.1, high=0.6)
        """
        return Spread(typical, min(self.low, typical), max(self.high, typical))
