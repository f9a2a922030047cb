"""The page templates (Jinja2), shipped inside the package as `service.templates`."""
