"""People, for admins: who may sign in, in which role, for which sites."""

from fastapi import APIRouter, Request
from fastapi.responses import HTMLResponse, RedirectResponse, Response
from sqlalchemy import select
from sqlalchemy.orm import Session

from service.accounts import users
from service.accounts.passwords import MIN_PASSWORD_LENGTH
from service.store.errors import ConflictError, FieldError
from service.store.models import Role, Site, User
from service.store.records import get
from service.web.access import Administering
from service.web.dependencies import Db, RecordId, record_id
from service.web.forms import Form
from service.web.pages.templating import page

router = APIRouter(include_in_schema=False)


def _people_page(
    request: Request, session: Session, form: Form, status_code: int = 200
) -> HTMLResponse:
    form.typed.pop("password", None)
    return page(
        request,
        "people.html",
        people=session.scalars(select(User).order_by(User.name)).all(),
        all_sites=session.scalars(select(Site).order_by(Site.name)).all(),
        roles=list(Role),
        form=form,
        min_length=MIN_PASSWORD_LENGTH,
        status_code=status_code,
    )


@router.get("/admin/users", response_class=HTMLResponse)
def people(request: Request, db: Db, viewer: Administering) -> HTMLResponse:
    with db.reading() as session:
        return _people_page(request, session, Form({"role": Role.TECHNICIAN.value}))


async def _site_ids(request: Request) -> list[int]:
    chosen = (await request.form()).getlist("site_id")
    return [site for text in chosen if isinstance(text, str) and (site := record_id(text))]


@router.post("/admin/users", response_class=HTMLResponse)
async def add_person(request: Request, db: Db, viewer: Administering) -> Response:
    form = await Form.of(request)
    site_ids = await _site_ids(request)
    role = form.text("role")
    if role not in {each.value for each in Role}:
        form.errors["role"] = "Choose technician, manager or admin."
    if form.ok:
        try:
            with db.writing(viewer.actor) as session:
                users.add_user(
                    session,
                    name=form.text("name"),
                    role=Role(role),
                    password=form.typed.get("password", ""),
                    site_ids=site_ids,
                )
        except FieldError as error:
            form.errors[error.field if error.field != "site" else "name"] = str(error)
        except ConflictError as error:
            form.errors["name"] = str(error)
    if not form.ok:
        with db.reading() as session:
            return _people_page(request, session, form, status_code=422)
    return RedirectResponse("/admin/users", status_code=303)


@router.post("/admin/users/{user_id}/access", response_class=HTMLResponse)
async def change_access(
    request: Request, user_id: RecordId, db: Db, viewer: Administering
) -> Response:
    """Disable or enable a person, or set their sites."""
    form = await Form.of(request)
    site_ids = await _site_ids(request)
    with db.writing(viewer.actor) as session:
        person = get(session, User, user_id)
        if form.text("action") == "disable" and person.id != viewer.user_id:
            users.disable_user(session, person)
        elif form.text("action") == "enable":
            users.enable_user(session, person)
        elif form.text("action") == "sites":
            users.assign_sites(session, person, site_ids)
    return RedirectResponse("/admin/users", status_code=303)
