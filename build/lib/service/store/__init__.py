"""Domain services for storage: the data model, the database, and what reads and writes it."""
