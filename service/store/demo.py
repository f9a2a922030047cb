"""Loads the demo plant (seed_data/, an invented mill) into an empty database."""

import json
from pathlib import Path

from sqlalchemy import func, select
from sqlalchemy.orm import Session

from service.shipped import SEED_DATA
from service.store import imports, register, surveys
from service.store.models import Site
from service.store.schemas import SiteCreate, SurveyCreate


def _applied(plan: imports.ImportPlan[imports.Data], name: str) -> imports.ImportPlan[imports.Data]:
    if not plan.clean:
        problems = "; ".join(f"row {p.row} {p.column}: {p.message}" for p in plan.problems[:5])
        raise ValueError(f"seed_data/{name} does not import: {problems}")
    return plan


def load_demo(*, session: Session, folder: Path = SEED_DATA) -> Site | None:
    """The demo site, loaded in the caller's transaction; None if the database has sites."""
    if session.scalar(select(func.count()).select_from(Site)):
        return None
    site_fields = json.loads((folder / "site.json").read_text(encoding="utf-8"))
    site = register.create_site(session=session, data=SiteCreate.model_validate(site_fields))
    content = (folder / "register.csv").read_bytes()
    plan = _applied(
        imports.plan_register(session=session, site=site, content=content, create_areas=True),
        "register.csv",
    )
    imports.apply_register(session=session, site=site, plan=plan)
    for entry in json.loads((folder / "surveys.json").read_text(encoding="utf-8")):
        # Recorded while in progress, then put in the state the file gives it (closed).
        findings_file, status = entry.pop("findings"), entry.pop("status")
        survey = surveys.create_survey(
            session=session, site=site, data=SurveyCreate.model_validate(entry)
        )
        content = (folder / findings_file).read_bytes()
        found = imports.plan_findings(session=session, survey=survey, content=content)
        imports.apply_findings(session=session, survey=survey, plan=_applied(found, findings_file))
        surveys.update_survey(session=session, survey=survey, changes={"status": status})
    content = (folder / "repairs.csv").read_bytes()
    repairs = imports.plan_repairs(session=session, site=site, content=content)
    imports.apply_repairs(session=session, site=site, plan=_applied(repairs, "repairs.csv"))
    return site
