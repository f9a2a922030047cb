"""The JSON API, version 1: one router module per resource."""
