"""The printed lookahead: a black-and-white sheet the foreman hands to the crews.

Layout, top to bottom on every page: the header (site, revision, status and data date, window,
forecast finish and its float), the day columns, one row per activity that must or may run in
the window, the crew-load rows, then the levelling suggestion, the readiness items to chase and
the reasons; each page ends with the legend, the caution that the sheet is a plan and not a
permit, and the page number. Pages are ``page_lines`` long and separated by a form feed.

Cells use fieldlog's own marks, chosen to survive a photocopier: a solid block where the
activity MUST run, a light shade where it MAY, a small dot where it CANNOT, and nothing on a day
its calendar does not work. ``--ascii`` swaps them for ``#``, ``:`` and ``.`` and turns every
name into plain ASCII.

Two widths: 80 columns (names abbreviated so fourteen day cells fit) and 132 columns (longer
names, early start and late finish columns, wider cells). The bytes depend only on the
lookahead: no clock, no locale, ``\\n`` line ends.
"""

from __future__ import annotations

from dataclasses import dataclass

from fieldlog.engine.progress import Status
from fieldlog.lookahead import fewest_text
from fieldlog.lookahead.build import ActivityRow, Lookahead
from fieldlog.lookahead.classify import Cell
from fieldlog.lookahead.reasons import MONTHS, WEEKDAYS, date_text, working_days
from fieldlog.reports.text_fit import abbreviate, fit, right, to_ascii, width, wrap
from fieldlog.reports.words import against_required, count, days

PAGE_LINES = 60
MIN_NAME = 10

CAUTION = (
    "This sheet is a plan, not a permit. Confirm permits, inspections, temporary works and "
    "safety arrangements with the responsible people before work starts. Local codes and the "
    "contract govern."
)


@dataclass(frozen=True)
class Glyphs:
    """The marks a sheet is drawn with."""

    must: str
    may: str
    cannot: str
    done: str
    """After the late finish: nothing left to do."""
    rule: str
    cut: str
    """Ends a name that had to be shortened."""


UNICODE = Glyphs(
    must="\u2588", may="\u2591", cannot="\u00b7", done="-", rule="\u2500", cut="\u2026"
)
ASCII = Glyphs(must="#", may=":", cannot=".", done="-", rule="-", cut="~")


@dataclass(frozen=True)
class Layout:
    """Column widths of one sheet."""

    width: int
    days: int
    id_w: int
    name_w: int
    tf_w: int
    dates: bool
    """Show early start and late finish columns (wide sheets)."""
    cell_w: int

    @property
    def left_w(self) -> int:
        """Columns before the first day cell."""
        return self.width - self.days * self.cell_w


def layout_for(sheet_width: int, days: int) -> Layout:
    """Column widths for ``days`` day cells on a ``sheet_width``-column sheet.

    Raises:
        ValueError: the days do not fit even with one-column cells.
    """
    wide = sheet_width >= 132
    id_w, tf_w = (10, 4) if wide else (8, 4)
    fixed = 2 + id_w + 1 + 1 + tf_w + (14 if wide else 0) + 1
    for cell_w in range(4 if wide else 3, 0, -1):
        name_w = sheet_width - fixed - days * cell_w
        if name_w >= MIN_NAME:
            return Layout(sheet_width, days, id_w, name_w, tf_w, wide, cell_w)
    raise ValueError(f"{days} days do not fit on a {sheet_width}-column sheet")


def render_text(
    la: Lookahead, sheet_width: int = 80, *, ascii_only: bool = False, page_lines: int = PAGE_LINES
) -> str:
    """The printable sheet.

    Args:
        la: the lookahead.
        sheet_width: 80 or 132 columns (any width of 60 or more works).
        ascii_only: plain ASCII marks and names.
        page_lines: lines per page; pages are separated by a form feed.

    Raises:
        ValueError: the window's days do not fit across the sheet.
    """
    return _Sheet(la, layout_for(sheet_width, len(la.days)), ascii_only, page_lines).render()


class _Sheet:
    def __init__(self, la: Lookahead, lay: Layout, ascii_only: bool, page_lines: int) -> None:
        self.la = la
        self.lay = lay
        self.ascii = ascii_only
        self.g = ASCII if ascii_only else UNICODE
        self.page_lines = page_lines

    def t(self, text: str) -> str:
        """User or generated text, made ASCII on an ASCII sheet."""
        return to_ascii(text) if self.ascii else text

    # -- whole sheet --------------------------------------------------------------------------

    def render(self) -> str:
        shown = list(self.la.rows_with_work)
        grid = [[self._row(row)] for row in shown] or [
            ["  Nothing must or may run in this window."]
        ]
        grid += self._crew_blocks()
        text = (
            self._levelling()
            + self._fewest()
            + self._to_chase()
            + self._why(shown)
            + self._finished()
        )
        hidden = len(self.la.rows) - len(shown)
        if hidden:
            text.append(
                [""]
                + self._wrap(
                    f"{count(hidden, 'more open activity has', 'more open activities have')} "
                    "nothing to do in this window; the JSON and CSV outputs list every one."
                )
            )
        pages = self._paginate(grid, text)
        out = []
        for n, body in enumerate(pages, 1):
            lines = self._header() + body + self._footer(n, len(pages))
            out.append("\n".join(line.rstrip() for line in lines) + "\n")
        sheet = "\f".join(out)
        if self.ascii:
            sheet.encode("ascii")  # a non-ASCII character here is a bug: fail loudly
        return sheet

    def _paginate(self, grid: list[list[str]], text: list[list[str]]) -> list[list[str]]:
        """Fill pages with blocks; grid pages repeat the day columns; blocks split if huge."""
        room = self.page_lines - len(self._header()) - len(self._footer(1, 1))
        day_head = self._day_header()
        if room - len(day_head) < 1:
            raise ValueError(f"{self.page_lines} lines per page leave no room for the rows")
        pages: list[list[str]] = []
        page: list[str] = []
        free = 0
        for kind, block in [("grid", b) for b in grid] + [("text", b) for b in text]:
            for part in _split(block, room - len(day_head) if kind == "grid" else room):
                if page and len(part) > free:
                    pages.append(page)
                    page = []
                if not page:
                    page = list(day_head) if kind == "grid" else []
                    free = room - len(page)
                    if kind == "text" and part and not part[0]:
                        part = part[1:]  # the header already ends in a blank line
                page += part
                free -= len(part)
        if page:
            pages.append(page)
        return pages

    # -- page furniture ---------------------------------------------------------------------

    def _header(self) -> list[str]:
        la = self.la
        w = self.lay.width
        n = len(la.days)
        lines = [
            fit(self.t(f"{la.site} - lookahead, schedule revision {la.revision}"), w, self.g.cut),
            f"Status as of the end of {date_text(la.as_of)}; data date {date_text(la.data_date)}",
            f"Window {date_text(la.days[0])} to {date_text(la.days[-1])} ({days(n)})",
        ]
        lines += self._wrap(self._finish_text())
        return [*lines, ""]

    def _finish_text(self) -> str:
        la = self.la
        text = f"Forecast finish {date_text(la.finish)}"
        if la.finish_by is None or la.finish_float is None:
            return text + " (no required finish set: float is measured to the forecast finish)"
        return f"{text}; required {date_text(la.finish_by)}: {against_required(la.finish_float)}"

    def _footer(self, page: int, pages: int) -> list[str]:
        g, w = self.g, self.lay.cell_w
        legend = (
            f"{g.must * w} must run, or the job slips",
            f"{g.may * w} may run (has float)",
            f"{self._cell(Cell.CANNOT).strip()} cannot run",
            f"{self._cell(Cell.DONE).strip()} done (after its late finish)",
            "blank: not a working day",
            "! late (negative float)",
            "? readiness item to chase",
            "~ already running",
            "TF total float, working days",
            "crew: people per day, ! over",
        )
        lines = ["", *_pack(legend, self.lay.width), *self._wrap(CAUTION)]
        left = self.t(
            f"{self.la.site}, revision {self.la.revision}, as of {self.la.as_of.isoformat()}"
        )
        tag = f"page {page} of {pages}"
        lines.append(fit(left, self.lay.width - len(tag) - 1, self.g.cut) + " " + tag)
        return lines

    def _day_header(self) -> list[str]:
        lay, days = self.lay, self.la.days
        w = lay.cell_w
        months, weekdays, numbers = [], [], []
        taken = 0
        for k, d in enumerate(days):
            if (k == 0 or d.day == 1) and k * w >= taken:
                months.append((k * w, MONTHS[d.month - 1]))
                taken = k * w + 4
            name = WEEKDAYS[d.weekday()][: 2 if w >= 2 else 1]
            weekdays.append(_centre(name, w))
            numbers.append(_centre(f"{d.day:02d}" if w >= 2 else str(d.day % 10), w))
        month_row = [" "] * (len(days) * w)
        for at, label in months:
            month_row[at : at + len(label)] = label
        head = (
            "  "
            + fit("ID", lay.id_w)
            + " "
            + fit("Activity", lay.name_w)
            + " "
            + right("TF", lay.tf_w)
        )
        sub = " " * width(head)
        if lay.dates:
            head += " " + fit("Early", 6) + " " + fit("Late", 6)
            sub += " " + fit("start", 6) + " " + fit("finish", 6)
        blank = " " * lay.left_w
        return [
            blank + "".join(month_row)[: len(days) * w],
            fit(head, lay.left_w) + "".join(weekdays),
            fit(sub, lay.left_w) + "".join(numbers),
            self.g.rule * lay.width,
        ]

    # -- grid ---------------------------------------------------------------------------------

    def _cell(self, cell: Cell) -> str:
        w = self.lay.cell_w
        if cell is Cell.MUST:
            return self.g.must * w
        if cell is Cell.MAY:
            return self.g.may * w
        if cell is Cell.CANNOT:
            return _centre(self.g.cannot, w)
        if cell is Cell.DONE:
            return _centre(self.g.done, w)
        return " " * w

    def _row(self, row: ActivityRow) -> str:
        lay = self.lay
        running = row.status is Status.IN_PROGRESS
        flags = ("!" if row.late else " ") + ("?" if row.not_ready else "~" if running else " ")
        left = (
            flags
            + fit(self.t(row.id), lay.id_w, self.g.cut)
            + " "
            + abbreviate(self.t(row.name), lay.name_w, self.g.cut)
            + " "
            + _number(row.total_float, lay.tf_w)
        )
        if lay.dates:
            left += " " + _short(row.early_start) + " " + _short(row.late_finish)
        return fit(left, lay.left_w) + "".join(self._cell(c) for c in row.cells)

    def _crew_blocks(self) -> list[list[str]]:
        loads = [c for c in self.la.crews if any(c.most) or any(c.early)]
        if not loads:
            return []
        title = self.t("Crew load, people per day (! more than the crew has)")
        blocks = [["", fit(title, self.lay.width)]]
        fewest = {a.crew: a.load for a in self.la.fewest.crews} if self.la.fewest else {}
        for load in loads:
            rows = [("must", load.must), ("most", load.most), ("early", load.early)]
            if load.levelled is not None and load.levelled != load.early:
                rows.append(("levelled", load.levelled))
            if load.crew in fewest and fewest[load.crew] != load.early:
                rows.append(("fewest", fewest[load.crew]))
            block = []
            for k, (label, values) in enumerate(rows):
                name = self.t(f"{load.crew} (has {load.available})") if k == 0 else ""
                left = fit("  " + name, self.lay.left_w - 10) + right(label, 9) + " "
                block.append(
                    left + "".join(_count(v, v > load.available, self.lay.cell_w) for v in values)
                )
            blocks.append(block)
        return blocks

    # -- text sections --------------------------------------------------------------------------

    def _wrap(self, text: str, indent: str = "", first: str = "") -> list[str]:
        return wrap(self.t(text), self.lay.width, indent, first)

    def _levelling(self) -> list[list[str]]:
        lev = self.la.levelling
        if lev is None:
            return []
        block = [
            "",
            *self._wrap(
                f"Levelling suggestion ({lev.method}) for crews over their "
                f"headcount if all work starts early: {', '.join(lev.crews)}"
            ),
        ]
        if not lev.moves:
            block += self._wrap(
                "No start inside the float lowers the load: more people, or "
                "a later finish, would be needed.",
                "  ",
                "  ",
            )
            return [block]
        for m in lev.moves:
            block += self._wrap(
                f"start {m.activity} ({m.name}) {date_text(m.start)} instead of "
                f"{date_text(m.early_start)}, using {working_days(m.float_used)} of its float",
                "    ",
                "  - ",
            )
        peaks = []
        for load in self.la.crews:
            if load.crew in lev.crews and load.levelled is not None:
                peaks.append(
                    f"{load.crew} {max(load.early)} -> {max(load.levelled)} (has {load.available})"
                )
        block += self._wrap(
            f"Peak in the window: {'; '.join(peaks)}. Sum of squared daily headcounts "
            f"{lev.sum_of_squares_before} -> {lev.sum_of_squares_after}. Every link and the "
            "forecast finish are kept.",
            "  ",
            "  ",
        )
        must_over = [load.crew for load in self.la.crews if load.over_must]
        if must_over:
            block += self._wrap(
                f"MUST work alone needs more people than {', '.join(must_over)} "
                "has on some days: add people or expect a slip.",
                "  ",
                "  ",
            )
        return [block]

    def _fewest(self) -> list[list[str]]:
        fewest = self.la.fewest
        if fewest is None:
            return []
        block = ["", *self._wrap(fewest_text.title(fewest))]
        for sentence in fewest_text.lines(fewest, self.la.days):
            block += self._wrap(sentence, "    ", "  ")
        return [block]

    def _to_chase(self) -> list[list[str]]:
        rows = [row for row in self.la.rows if row.not_ready]
        if not rows:
            return []
        blocks = []
        for row in rows:
            block = []
            for flag in row.not_ready:
                block += self._wrap(f"{row.id} ({row.name}) {flag}", "    ", "  ? ")
            blocks.append(block)
        return _titled(
            [
                "",
                *self._wrap("Readiness items to chase (no expected date, or the date has passed)"),
            ],
            blocks,
        )

    def _why(self, shown: list[ActivityRow]) -> list[list[str]]:
        blocks = []
        for row in shown:
            if not row.reasons:
                continue
            block = self._wrap(f"{row.id} {row.name}", "  ")
            for reason in row.reasons:
                block += self._wrap(reason, "    ", "  - ")
            blocks.append(block)
        return _titled(["", *self._wrap("Why: reasons for the MAY and CANNOT days")], blocks)

    def _finished(self) -> list[list[str]]:
        if not self.la.finished:
            return []
        block = ["", *self._wrap(f"Finished since {date_text(self.la.days[0])}")]
        for f in self.la.finished:
            block += self._wrap(
                f"{f.id} {f.name}: finished {date_text(f.actual_finish)}", "    ", "  "
            )
        return [block]


def _titled(title: list[str], blocks: list[list[str]]) -> list[list[str]]:
    """A section: its title glued to its first block (never alone at the foot of a page)."""
    if not blocks:
        return []
    return [title + blocks[0], *blocks[1:]]


def _pack(items: tuple[str, ...], columns: int, gap: str = "   ") -> list[str]:
    """Place whole items on lines of at most ``columns``, separated by ``gap``."""
    lines, line = [], ""
    for item in items:
        if line and width(line) + len(gap) + width(item) > columns:
            lines.append(line)
            line = ""
        line = f"{line}{gap}{item}" if line else item
    return [*lines, line]


def _split(block: list[str], room: int) -> list[list[str]]:
    """A block as pieces of at most ``room`` lines (one piece when it fits)."""
    if len(block) <= room:
        return [block]
    return [block[k : k + room] for k in range(0, len(block), room)]


def _centre(text: str, w: int) -> str:
    pad = (w - len(text)) // 2
    return (" " * pad + text).ljust(w)[:w]


def _short(d) -> str:
    return f"{d.day:02d} {MONTHS[d.month - 1]}"


def _number(value: int, w: int) -> str:
    """``value`` right-aligned in ``w`` columns; stars (keeping a minus) when it will not fit,
    never a number cut short."""
    text = str(value)
    if len(text) > w:
        text = ("-" + "*" * (w - 1)) if value < 0 else "*" * w
    return text.rjust(w)


def _count(value: int, over: bool, w: int) -> str:
    """A headcount in a day cell: ``-`` for nobody, a trailing ``!`` when over, ``*`` when the
    number does not fit."""
    mark = "!" if over else " "
    digits = str(value) if value else "-"
    if w == 1:
        return "!" if over else (digits if len(digits) == 1 else "*")
    if len(digits) + 1 > w:
        digits = "*" * (w - 1)
    return (digits + mark).rjust(w)
