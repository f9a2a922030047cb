"""The stylesheets and the walk's script, shipped inside the package as `service.static`."""
