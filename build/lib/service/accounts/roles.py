"""What each role may do. A pure table: the web layer asks it before every route.

- technician: read the sites assigned to them, record findings, add a trap found in the field;
- manager: everything about their sites (register, surveys, repairs, costs, settings,
  imports, the audit trail);
- admin: every site, and the people, the sites themselves and who is assigned to which.
"""

from enum import StrEnum

from service.store.models import Role


class Permission(StrEnum):
    READ = "read"
    RECORD = "record"
    MANAGE = "manage"
    ADMINISTER = "administer"


GRANTS: dict[Role, frozenset[Permission]] = {
    Role.TECHNICIAN: frozenset({Permission.READ, Permission.RECORD}),
    Role.MANAGER: frozenset({Permission.READ, Permission.RECORD, Permission.MANAGE}),
    Role.ADMIN: frozenset(Permission),
}


def may(role: Role, permission: Permission) -> bool:
    """Whether `role` carries `permission`.

    >>> may(Role.TECHNICIAN, Permission.RECORD), may(Role.TECHNICIAN, Permission.MANAGE)
    (True, False)
    """
    return permission in GRANTS[role]


def sees_every_site(role: Role) -> bool:
    """An admin sees every site; the others see the sites assigned to them."""
    return role is Role.ADMIN
