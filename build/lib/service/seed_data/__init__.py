"""The demo plant (invented), shipped inside the package as `service.seed_data`."""
