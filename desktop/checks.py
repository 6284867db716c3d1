"""The drafting checks view: what the engine's checks found in the draft
(:attr:`core.model.Review.checks`), grouped by kind.

Each group heading names the kind and how many were found; under it one entry per check, the
clause first and then what the check found.  A changed definition lists, under its entry, the
provisions that use the term.  Choosing an entry (or a provision under it) emits
``provisionRequested(document, provision id)``; the window brings that provision into view
in the side-by-side rows.  No business logic: the words come from :mod:`core.review.checks`
and :func:`core.labels.check_label`.
"""

from __future__ import annotations

from PySide6.QtCore import Qt, Signal
from PySide6.QtGui import QBrush, QColor, QFont
from PySide6.QtWidgets import QTreeWidget, QTreeWidgetItem, QVBoxLayout, QWidget

from core.labels import check_label, find_provision, provision_label
from core.model import Review
from core.review.checks import CHECK_KINDS, CHECK_TITLES, Check

from .palette import CHECKS, MUTED_INK
from .state import Change, Workspace
from .widgets import muted_label

__all__ = ["ChecksPanel", "checks_tab_title"]

#: Where an entry keeps the provision it points at: (document, provision id).
TARGET_ROLE = Qt.ItemDataRole.UserRole + 1


def checks_tab_title(review: Review | None) -> str:
    """The tab's title: "Drafting checks", with the count once a review is open."""
    if review is None:
        return "Drafting checks"
    return f"Drafting checks ({len(review.checks)})"


class ChecksPanel(QWidget):
    #: The reviewer chose an entry: (document "draft" | "precedent", provision id).
    provisionRequested = Signal(str, str)

    def __init__(self, workspace: Workspace, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._ws = workspace
        intro = muted_label(
            "What a careful read of the draft's drafting finds: capitalised terms it never "
            "defines, definitions it never uses, the precedent's name of a renamed term left "
            "behind, cross-references to provisions it does not have, and definitions whose "
            "words changed (every clause using the term changes with them). Choose an entry "
            "to see its provision.", self)
        self.tree = QTreeWidget(self)
        self.tree.setObjectName("checksTree")
        self.tree.setHeaderHidden(True)
        self.tree.setColumnCount(1)
        self.tree.setWordWrap(True)
        self.tree.setUniformRowHeights(False)
        self.tree.setIndentation(14)
        self.tree.currentItemChanged.connect(lambda cur, _prev: self._chosen(cur))
        self.empty = muted_label("", self)
        self.empty.setObjectName("checksEmpty")
        lay = QVBoxLayout(self)
        lay.setContentsMargins(4, 4, 4, 4)
        lay.addWidget(intro)
        lay.addWidget(self.empty)
        lay.addWidget(self.tree, 1)

    def on_change(self, change: Change) -> None:
        if change & Change.REVIEW:
            self.set_review(self._ws.review)

    def set_review(self, review: Review | None) -> None:
        self.tree.clear()
        checks = review.checks if review is not None else ()
        self.empty.setText("Open a comparison to check the draft." if review is None
                           else "The drafting checks found nothing in the draft." if not checks else "")
        self.empty.setVisible(review is None or not checks)
        if review is None:
            return
        for kind in CHECK_KINDS:
            of_kind = [c for c in checks if c.kind == kind]
            if not of_kind:
                continue
            group = QTreeWidgetItem([f"{CHECK_TITLES[kind]} \u00b7 {len(of_kind)}"])
            font = QFont(group.font(0))
            font.setBold(True)
            group.setFont(0, font)
            group.setForeground(0, QBrush(QColor(CHECKS.heading_ink)))
            group.setBackground(0, QBrush(QColor(CHECKS.heading_ground)))
            group.setFlags(Qt.ItemFlag.ItemIsEnabled)
            self.tree.addTopLevelItem(group)
            for c in of_kind:
                group.addChild(self._entry(review, c))
            group.setExpanded(True)

    def _entry(self, review: Review, c: Check) -> QTreeWidgetItem:
        item = QTreeWidgetItem([f"{check_label(review, c, compact=True)}\n{c.message}"])
        item.setToolTip(0, c.text or c.message)
        item.setData(0, TARGET_ROLE, (c.document, c.provision) if c.provision else None)
        if c.kind == "definition-changed":
            for pid in c.provisions:
                prov = find_provision(review.draft, pid)
                if prov is None:
                    continue
                use = QTreeWidgetItem([f"uses the term: {provision_label(prov, doc=review.draft, compact=True)}"])
                use.setForeground(0, QBrush(QColor(MUTED_INK)))
                use.setData(0, TARGET_ROLE, ("draft", pid))
                item.addChild(use)
        return item

    def entries(self) -> list[QTreeWidgetItem]:
        """Every entry, in the order shown (group headings left out)."""
        out: list[QTreeWidgetItem] = []
        for i in range(self.tree.topLevelItemCount()):
            group = self.tree.topLevelItem(i)
            if group is not None:
                out.extend(c for j in range(group.childCount()) if (c := group.child(j)) is not None)
        return out

    def _chosen(self, item: QTreeWidgetItem | None) -> None:
        target = item.data(0, TARGET_ROLE) if item is not None else None
        if target:
            self.provisionRequested.emit(*target)
