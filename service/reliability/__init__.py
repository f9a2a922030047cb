"""How long traps last and how often to test them: a pure calculation core (no I/O, no
web, no database), fed with each trap's tests and repairs by `service.reports`."""
