"""A manager's changes to one trap: edit its register fields, retire it, record a repair.
Each is audited like every write; technicians are not offered them."""

from fastapi import APIRouter, Request
from fastapi.responses import HTMLResponse, RedirectResponse, Response
from pydantic import ValidationError
from sqlalchemy.orm import Session

from service.store import register, surveys
from service.store.errors import ConflictError, FieldError
from service.store.models import Site, Trap
from service.store.schemas import RepairCreate
from service.web.access import Managing
from service.web.dependencies import Db, RecordId
from service.web.forms import Form
from service.web.pages import trap_form
from service.web.pages.register import trap_page_answer
from service.web.pages.templating import display_for, page

router = APIRouter(include_in_schema=False)


def _edit_page(
    request: Request, session: Session, trap: Trap, form: Form, status_code: int = 200
) -> HTMLResponse:
    site = session.get_one(Site, trap.site_id)
    return page(
        request,
        "trap_edit.html",
        site=site,
        trap=trap,
        form=form,
        status_code=status_code,
        **trap_form.choices(session, site),
    )


@router.get("/traps/{trap_id}/edit", response_class=HTMLResponse)
def edit_form(request: Request, trap_id: RecordId, db: Db, viewer: Managing) -> HTMLResponse:
    with db.reading() as session:
        trap = viewer.get(session, Trap, trap_id)
        site = session.get_one(Site, trap.site_id)
        typed = trap_form.typed_from_trap(trap, display_for(site))
        return _edit_page(request, session, trap, Form(typed))


@router.post("/traps/{trap_id}/edit", response_class=HTMLResponse)
async def edit(request: Request, trap_id: RecordId, db: Db, viewer: Managing) -> Response:
    form = await Form.of(request)
    with db.writing(viewer.actor) as session:
        trap = viewer.get(session, Trap, trap_id)
        site = session.get_one(Site, trap.site_id)
        changes = trap_form.trap_fields(form, display_for(site))
        if form.ok:
            try:
                register.update_trap(session=session, trap=trap, changes=changes)
                return RedirectResponse(f"/traps/{trap_id}", status_code=303)
            except (ValidationError, FieldError) as error:
                form.absorb(error, trap_form.FORM_NAMES)
            except ConflictError as error:
                form.errors["tag"] = str(error)
        # A refused edit changed nothing: the checks run before any field is set.
        return _edit_page(request, session, trap, form, 422)


@router.post("/traps/{trap_id}/retire", response_class=HTMLResponse)
async def retire(request: Request, trap_id: RecordId, db: Db, viewer: Managing) -> Response:
    """Take a trap out of service, keeping its findings and repairs (one with none is
    deleted, as the API's DELETE does)."""
    with db.writing(viewer.actor) as session:
        trap = viewer.get(session, Trap, trap_id)
        site_id = trap.site_id
        deleted = register.retire_or_delete_trap(session=session, trap=trap)
    return RedirectResponse(
        f"/sites/{site_id}/register" if deleted else f"/traps/{trap_id}", status_code=303
    )


@router.post("/traps/{trap_id}/repairs", response_class=HTMLResponse)
async def record_repair(request: Request, trap_id: RecordId, db: Db, viewer: Managing) -> Response:
    form = await Form.of(request)
    fields = {
        "repaired_on": form.text("repaired_on") or None,
        "kind": form.text("kind") or None,
        "cost": form.number("cost"),
        "notes": form.text("notes"),
    }
    with db.writing(viewer.actor) as session:
        trap = viewer.get(session, Trap, trap_id)
        if form.ok:
            try:
                surveys.record_repair(
                    session=session, trap=trap, data=RepairCreate.model_validate(fields)
                )
                return RedirectResponse(f"/traps/{trap_id}#history-title", status_code=303)
            except ValidationError as error:
                form.absorb(error)
        return trap_page_answer(request, session, trap, viewer, form, status_code=422)
