"""The web layer: the FastAPI application, its JSON API and (later) its pages."""
