"""What the store refuses, and why; the web layer answers 404, 409 or 422 for them."""


class NotFoundError(LookupError):
    """No such record (or none the asker may see)."""

    def __init__(self, kind: str, key: object) -> None:
        super().__init__(f"no {kind} {key}")
        self.kind = kind


class ConflictError(Exception):
    """The change would break a rule of the register: a duplicate, or a record in use."""


class FieldError(ValueError):
    """A value the store cannot accept, tied to the field it came from."""

    def __init__(self, field: str, message: str) -> None:
        super().__init__(message)
        self.field = field
