"""Alembic environment: runs migrations on the engine the program hands over, or, from
Alembic's own command line (alembic.ini), on the database the program would open."""

from alembic import context

from service.settings import Settings
from service.store.database import Database
from service.store.models import Base

engine = context.config.attributes.get("engine")
if engine is None:
    url = context.get_x_argument(as_dictionary=True).get("database_url")
    engine = Database.at(Settings.from_environment(database_url=url).database_url).engine

with engine.begin() as connection:
    context.configure(
        connection=connection,
        target_metadata=Base.metadata,
        render_as_batch=engine.dialect.name == "sqlite",
        compare_type=True,
    )
    context.run_migrations()
