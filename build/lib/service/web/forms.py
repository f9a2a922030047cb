"""Reading HTML forms: typed text kept as typed, numbers in the site's units, and each
problem attached to the field it belongs to."""

from dataclasses import dataclass, field
from typing import Any

from pydantic import ValidationError

from service.physics.units import Dimension
from service.store.errors import FieldError
from service.web.display import Display


@dataclass
class Form:
    """What was typed (as text) and what is wrong with it, field by field."""

    typed: dict[str, str]
    errors: dict[str, str] = field(default_factory=dict)

    @classmethod
    async def of(cls, request: Any) -> "Form":
        data = await request.form()
        return cls({name: str(value) for name, value in data.items() if isinstance(value, str)})

    def text(self, name: str) -> str:
        return self.typed.get(name, "").strip()

    def optional_text(self, name: str) -> str | None:
        return self.text(name) or None

    def number(
        self, name: str, display: Display | None = None, dimension: Dimension | None = None
    ) -> float | None:
        """The field's number in the program's units, or None (blank or wrong: see errors)."""
        typed = self.text(name)
        # A decimal comma (4,5) is read as a decimal point; thousands separators are not.
        text = typed.replace(",", ".") if typed.count(",") == 1 and "." not in typed else typed
        if not text:
            return None
        try:
            value = float(text)
        except ValueError:
            self.errors[name] = f"'{typed}' is not a number"
            return None
        if value != value or value in (float("inf"), float("-inf")):
            self.errors[name] = "enter a finite number"
            return None
        if display is not None and dimension is not None:
            return display.read(dimension, value)
        return value

    def absorb(
        self, error: ValidationError | FieldError, names: dict[str, str] | None = None
    ) -> None:
        """Attach a model's validation errors to the form's fields (`names` maps a model
        field to its form field where they differ)."""
        names = names or {}
        if isinstance(error, FieldError):
            self.errors[names.get(error.field, error.field)] = str(error)
            return
        for entry in error.errors():
            field_name = str(entry["loc"][0]) if entry["loc"] else "form"
            self.errors.setdefault(
                names.get(field_name, field_name), entry["msg"].removeprefix("Value error, ")
            )

    @property
    def ok(self) -> bool:
        return not self.errors
