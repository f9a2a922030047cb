"""Alembic environment: runs migrations on the engine the caller hands over."""

from alembic import context

from service.store.models import Base

engine = context.config.attributes["engine"]

with engine.begin() as connection:
    context.configure(
        connection=connection,
        target_metadata=Base.metadata,
        render_as_batch=engine.dialect.name == "sqlite",
        compare_type=True,
    )
    context.run_migrations()
