"""A round's route as the walk shows it: a page of traps in walking order, each with its
latest finding in the round, the round's progress, the next trap to test and where a trap
stands on the route, read by SQL a page at a time.

`RouteOf(session, survey)` answers for one request. The route is cut into segments,
one per area in walking order (`AREA_ORDER`) and the unplaced traps last, each counted
once (an index holds traps in service by site and area). A page reads only the segments
it spans, ordered within the area (`TRAP_ORDER_IN_AREA`): the cost of a page grows with
the size of an area, not of the site. The order is `register.ROUTE_ORDER`'s on SQLite
and PostgreSQL alike (a test holds every page to it).
"""

from collections.abc import Sequence
from dataclasses import dataclass
from functools import cached_property

from sqlalchemy import ColumnElement, Select, and_, exists, func, or_, select
from sqlalchemy.orm import Session

from service.physics.conditions import TrapCondition
from service.store.latest import is_latest_finding
from service.store.models import Area, Finding, Survey, Trap
from service.store.register import AREA_ORDER, ROUTE_ORDER, TRAP_ORDER_IN_AREA

NO_AREA = "(no area)"


@dataclass(frozen=True, slots=True)
class Stop:
    """One trap on the route, with its latest finding in the round if it has one."""

    trap_id: int
    tag: str
    area_name: str | None
    location: str
    finding_id: int | None
    condition: TrapCondition | None


@dataclass(frozen=True, slots=True)
class Segment:
    """An area's traps in service (area None: the unplaced ones), and how many."""

    area_id: int | None
    area_name: str | None
    traps: int

    @property
    def label(self) -> str:
        return self.area_name or NO_AREA


@dataclass(frozen=True, slots=True)
class Progress:
    """How far the round has come over the traps in service."""

    total: int
    done: int
    areas: list[str]  # in walking order, NO_AREA last where traps are unplaced


@dataclass(frozen=True, slots=True)
class Place:
    """Where a trap stands: its 0-based position on the route and the trap after it."""

    position: int | None  # None: out of service, so not on the route
    following: Stop | None


def _in_segment(site_id: int, segment: Segment) -> Select[Trap]:
    query = select(Trap).where(Trap.site_id == site_id, Trap.in_service.is_(True))
    if segment.area_id is None:
        return query.where(Trap.area_id.is_(None))
    return query.where(Trap.area_id == segment.area_id)


def _after(trap: Trap) -> ColumnElement[bool]:
    """Traps of the same segment after `trap` in `TRAP_ORDER_IN_AREA` (unplaced last)."""
    if trap.route_position is None:
        return and_(Trap.route_position.is_(None), Trap.tag > trap.tag)
    return or_(
        Trap.route_position > trap.route_position,
        and_(Trap.route_position == trap.route_position, Trap.tag > trap.tag),
        Trap.route_position.is_(None),
    )


def _before(trap: Trap) -> ColumnElement[bool]:
    """Traps of the same segment before `trap` in `TRAP_ORDER_IN_AREA`."""
    if trap.route_position is None:
        return or_(
            Trap.route_position.is_not(None),
            and_(Trap.route_position.is_(None), Trap.tag < trap.tag),
        )
    return or_(
        Trap.route_position < trap.route_position,
        and_(Trap.route_position == trap.route_position, Trap.tag < trap.tag),
    )


def _stops(session: Session, survey_id: int, traps: Sequence[Trap]) -> list[Stop]:
    """The traps as stops, each with its latest finding in the round (one query)."""
    if not traps:
        return []
    latest = {
        trap_id: (finding_id, condition)
        for trap_id, finding_id, condition in session.execute(
            select(Trap.id, Finding.id, Finding.condition)
            .join(Finding, is_latest_finding(survey_id=survey_id))
            .where(Trap.id.in_([trap.id for trap in traps]))
        )
    }
    area_names = dict(
        session.execute(
            select(Area.id, Area.name).where(
                Area.id.in_({trap.area_id for trap in traps if trap.area_id is not None})
            )
        ).all()
    )
    return [
        Stop(
            trap_id=trap.id,
            tag=trap.tag,
            area_name=area_names.get(trap.area_id) if trap.area_id is not None else None,
            location=trap.location,
            finding_id=latest.get(trap.id, (None, None))[0],
            condition=latest.get(trap.id, (None, None))[1],
        )
        for trap in traps
    ]


def _untested(survey_id: int) -> ColumnElement[bool]:
    return ~exists().where(Finding.survey_id == survey_id, Finding.trap_id == Trap.id)


class RouteOf:
    """The route of one round, read a page at a time; the segments are read once."""

    def __init__(self, session: Session, survey: Survey) -> None:
        self.session = session
        self.survey = survey

    @cached_property
    def segments(self) -> list[Segment]:
        """The route's segments in walking order, empty areas left out."""
        counts: dict[int | None, int] = dict(
            self.session.execute(
                select(Trap.area_id, func.count())
                .where(Trap.site_id == self.survey.site_id, Trap.in_service.is_(True))
                .group_by(Trap.area_id)
            ).all()
        )
        areas = self.session.execute(
            select(Area.id, Area.name)
            .where(Area.site_id == self.survey.site_id)
            .order_by(*AREA_ORDER)
        )
        found = [Segment(id_, name, counts[id_]) for id_, name in areas if id_ in counts]
        if None in counts:
            found.append(Segment(None, None, counts[None]))
        return found

    def _chosen(self, area: str | None) -> list[Segment]:
        return [segment for segment in self.segments if area in (None, "", segment.label)]

    def _in(self, segment: Segment) -> Select[Trap]:
        return _in_segment(self.survey.site_id, segment)

    def _stops(self, traps: Sequence[Trap]) -> list[Stop]:
        return _stops(self.session, self.survey.id, traps)

    def _not_accessible_ids(self, area: str | None) -> list[int]:
        """Traps in service whose latest finding in the round is "not accessible", in
        route order: few, so read whole."""
        survey_id = self.survey.id
        query = (
            select(Trap.id)
            .outerjoin(Area, Trap.area_id == Area.id)
            .join(Finding, is_latest_finding(survey_id=survey_id))
            .where(
                # The round's "not accessible" findings lead (an index holds them by
                # condition), not every trap of the site.
                Trap.id.in_(
                    select(Finding.trap_id).where(
                        Finding.survey_id == survey_id,
                        Finding.condition == TrapCondition.NOT_ACCESSIBLE,
                    )
                ),
                Trap.in_service.is_(True),
                Finding.condition == TrapCondition.NOT_ACCESSIBLE,
            )
            .order_by(*ROUTE_ORDER)
        )
        if area == NO_AREA:
            query = query.where(Trap.area_id.is_(None))
        elif area:
            query = query.where(Area.name == area)
        return list(self.session.scalars(query))

    def page(
        self, *, area: str | None, retest: bool, offset: int, limit: int
    ) -> tuple[list[Stop], int]:
        """A page of the route (one area's, or only the traps to test again) and how many
        traps the whole of that route holds."""
        if retest:
            again = self._not_accessible_ids(area)
            chosen_ids = again[offset : offset + limit]
            traps = {
                trap.id: trap
                for trap in self.session.scalars(select(Trap).where(Trap.id.in_(chosen_ids)))
            }
            return self._stops([traps[trap_id] for trap_id in chosen_ids]), len(again)
        chosen = self._chosen(area)
        traps_shown: list[Trap] = []
        start = 0
        for segment in chosen:
            end = start + segment.traps
            if end > offset and start < offset + limit:
                traps_shown.extend(
                    self.session.scalars(
                        self._in(segment)
                        .order_by(*TRAP_ORDER_IN_AREA)
                        .offset(max(0, offset - start))
                        .limit(limit - len(traps_shown))
                    )
                )
            start = end
        return self._stops(traps_shown), sum(segment.traps for segment in chosen)

    def progress(self) -> Progress:
        """Traps in service, how many have a finding in the round, and the areas, in
        walking order."""
        out_of_service = select(Trap.id).where(
            Trap.site_id == self.survey.site_id, Trap.in_service.is_(False)
        )
        tested = select(func.count(func.distinct(Finding.trap_id))).where(
            Finding.survey_id == self.survey.id
        )
        done = (self.session.scalar(tested) or 0) - (
            self.session.scalar(tested.where(Finding.trap_id.in_(out_of_service))) or 0
        )
        return Progress(
            total=sum(segment.traps for segment in self.segments),
            done=done,
            areas=[segment.label for segment in self.segments],
        )

    def not_accessible(self) -> int:
        """How many traps in service were last found not accessible in the round."""
        return len(self._not_accessible_ids(None))

    def _first(
        self, segment: Segment, where: ColumnElement[bool] | None, untested: bool
    ) -> Stop | None:
        query = self._in(segment)
        if untested:
            query = query.where(_untested(self.survey.id))
        if where is not None:
            query = query.where(where)
        trap = self.session.scalars(query.order_by(*TRAP_ORDER_IN_AREA).limit(1)).first()
        return self._stops([trap])[0] if trap is not None else None

    def _index_of(self, segments: list[Segment], trap: Trap) -> int | None:
        return next(
            (index for index, segment in enumerate(segments) if segment.area_id == trap.area_id),
            None,
        )

    def next_untested(self, *, area: str | None = None, after: Trap | None = None) -> Stop | None:
        """The first trap with no finding in the round, from the start of the route (or of
        one area's), or after `after`, wrapping round to the start."""
        chosen = self._chosen(area)
        here = self._index_of(chosen, after) if after is not None and after.in_service else None
        order: list[tuple[Segment, ColumnElement[bool] | None]] = [(s, None) for s in chosen]
        if after is not None and here is not None:
            later = chosen[here + 1 :] + chosen[:here]
            order = [
                (chosen[here], _after(after)),
                *((segment, None) for segment in later),
                (chosen[here], _before(after)),
            ]
        for segment, where in order:
            found = self._first(segment, where, untested=True)
            if found is not None:
                return found
        return None

    def place_of(self, trap: Trap) -> Place:
        """The trap's position on the route and the trap after it (in any condition)."""
        here = self._index_of(self.segments, trap) if trap.in_service else None
        if here is None:
            return Place(position=None, following=None)
        segment = self.segments[here]
        within = self.session.scalar(
            select(func.count()).select_from(self._in(segment).where(_before(trap)).subquery())
        )
        position = sum(earlier.traps for earlier in self.segments[:here]) + (within or 0)
        candidates: list[tuple[Segment, ColumnElement[bool] | None]] = [(segment, _after(trap))]
        candidates += [(later, None) for later in self.segments[here + 1 :]]
        for candidate, where in candidates:
            following = self._first(candidate, where, untested=False)
            if following is not None:
                return Place(position, following)
        return Place(position, None)

    def trap_ids(self) -> list[int]:
        """Every trap in service, in walking order (what a tablet keeps for a round
        offline)."""
        ids: list[int] = []
        for segment in self.segments:
            ids.extend(
                self.session.scalars(
                    self._in(segment).with_only_columns(Trap.id).order_by(*TRAP_ORDER_IN_AREA)
                )
            )
        return ids
