"""A round's route as the walk shows it: a page of traps in walking order, each with its
latest finding in the round, the round's progress, the next trap to test and where a trap
stands on the route, read by SQL a page at a time.

`RouteOf(session, survey)` answers for one request. The route is cut into segments,
one per area in walking order (`AREA_ORDER`) and the unplaced traps last, each counted
once; each segment into two lanes, the traps with a route position (by position, then
tag) and those without (by tag), which is `TRAP_ORDER_IN_AREA` with its nulls last. An
index holds traps in service by site, area, position and tag, so a lane is read in its
order from the index: a page, the next trap to test and a trap's place cost about the
same on a site of a thousand traps as on one of a hundred thousand, in areas of any
size. The order is `register.ROUTE_ORDER`'s on SQLite and PostgreSQL alike (a test holds
every page to it).
"""

from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from functools import cached_property
from typing import Any

from sqlalchemy import ColumnElement, Select, exists, func, select, tuple_
from sqlalchemy.orm import InstrumentedAttribute, Session

from service.physics.conditions import TrapCondition
from service.store.latest import is_latest_finding
from service.store.models import Area, Finding, Survey, Trap
from service.store.register import AREA_ORDER, ROUTE_ORDER

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


@dataclass(frozen=True, slots=True)
class _Lane:
    """Traps of a segment with a route position (`placed`) or without, and their order."""

    placed: bool

    def where(self) -> ColumnElement[bool]:
        position = Trap.route_position
        return position.is_not(None) if self.placed else position.is_(None)

    def key(self) -> tuple[InstrumentedAttribute[Any], ...]:
        return (Trap.route_position, Trap.tag) if self.placed else (Trap.tag,)

    def key_of(self, trap: Trap) -> tuple[Any, ...]:
        return (trap.route_position, trap.tag) if self.placed else (trap.tag,)

    def after(self, trap: Trap) -> ColumnElement[bool]:
        return tuple_(*self.key()) > tuple_(*self.key_of(trap))

    def before(self, trap: Trap) -> ColumnElement[bool]:
        return tuple_(*self.key()) < tuple_(*self.key_of(trap))


LANES = (_Lane(placed=True), _Lane(placed=False))


# A lane of a segment, and a condition on it (None: the whole lane).
_Reading = tuple[Segment, _Lane, ColumnElement[bool] | None]


def _lane_of(trap: Trap) -> int:
    return 0 if trap.route_position is not None else 1


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

    def _stops(self, traps: Sequence[Trap]) -> list[Stop]:
        """The traps as stops, each with its latest finding in the round (one query)."""
        if not traps:
            return []
        latest = {
            trap_id: (finding_id, condition)
            for trap_id, finding_id, condition in self.session.execute(
                select(Trap.id, Finding.id, Finding.condition)
                .join(Finding, is_latest_finding(survey_id=self.survey.id))
                .where(Trap.id.in_([trap.id for trap in traps]))
            )
        }
        area_names = dict(
            self.session.execute(
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

    def _lane(
        self, segment: Segment, lane: _Lane, where: ColumnElement[bool] | None = None
    ) -> Select[Trap]:
        """The lane's traps in service in its order (read from the index in that order)."""
        query = select(Trap).where(
            Trap.site_id == self.survey.site_id,
            Trap.in_service.is_(True),
            Trap.area_id.is_(None) if segment.area_id is None else Trap.area_id == segment.area_id,
            lane.where(),
        )
        if where is not None:
            query = query.where(where)
        return query.order_by(*lane.key())

    def _count(self, query: Select[Trap]) -> int:
        counted = self.session.scalar(
            select(func.count()).select_from(query.order_by(None).subquery())
        )
        return counted or 0

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
        shown: list[Trap] = []
        skip = offset
        for segment in chosen:
            if skip >= segment.traps:
                skip -= segment.traps
                continue
            for lane in LANES:
                if len(shown) == limit:
                    break
                found = list(
                    self.session.scalars(
                        self._lane(segment, lane).offset(skip).limit(limit - len(shown))
                    )
                )
                # Past this lane's end nothing came back: how far past it is its length.
                skip = max(0, skip - self._count(self._lane(segment, lane))) if not found else 0
                shown.extend(found)
        return self._stops(shown), sum(segment.traps for segment in chosen)

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

    def _first(self, lanes: Iterable[_Reading], untested: bool) -> Stop | None:
        """The first trap of the lanes, in their order (untested ones only, if asked)."""
        for segment, lane, where in lanes:
            query = self._lane(segment, lane, where)
            if untested:
                query = query.where(_untested(self.survey.id))
            trap = self.session.scalars(query.limit(1)).first()
            if trap is not None:
                return self._stops([trap])[0]
        return None

    @staticmethod
    def _whole(segments: Iterable[Segment]) -> list[_Reading]:
        return [(segment, lane, None) for segment in segments for lane in LANES]

    @staticmethod
    def _after(segment: Segment, trap: Trap) -> list[_Reading]:
        """The segment's lanes after `trap`: the rest of its own lane, then the later lane."""
        here = _lane_of(trap)
        later = [(segment, lane, None) for lane in LANES[here + 1 :]]
        return [(segment, LANES[here], LANES[here].after(trap)), *later]

    @staticmethod
    def _before(segment: Segment, trap: Trap) -> list[_Reading]:
        here = _lane_of(trap)
        earlier = [(segment, lane, None) for lane in LANES[:here]]
        return [*earlier, (segment, LANES[here], LANES[here].before(trap))]

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
        if after is None or here is None:
            return self._first(self._whole(chosen), untested=True)
        segment = chosen[here]
        wrapped = [
            *self._after(segment, after),
            *self._whole(chosen[here + 1 :] + chosen[:here]),
            *self._before(segment, after),
        ]
        return self._first(wrapped, untested=True)

    def place_of(self, trap: Trap) -> Place:
        """The trap's position on the route and the trap after it (in any condition)."""
        here = self._index_of(self.segments, trap) if trap.in_service else None
        if here is None:
            return Place(position=None, following=None)
        segment = self.segments[here]
        position = sum(earlier.traps for earlier in self.segments[:here]) + sum(
            self._count(self._lane(part, lane, where))
            for part, lane, where in self._before(segment, trap)
        )
        following = self._first(
            [*self._after(segment, trap), *self._whole(self.segments[here + 1 :])],
            untested=False,
        )
        return Place(position, following)

    def trap_ids(self) -> list[int]:
        """Every trap in service, in walking order (what a tablet keeps for a round
        offline)."""
        return [
            trap_id
            for segment, lane, _ in self._whole(self.segments)
            for trap_id in self.session.scalars(
                self._lane(segment, lane).with_only_columns(Trap.id)
            )
        ]
