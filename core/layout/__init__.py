"""From printed lines to paragraphs: how Counterdraft reads a page that has no structure of
its own (a PDF's text layer; plain text for comparison).

Data flow: a reader makes :class:`.lines.Line` objects (one per printed line: words, position,
fonts) -> :mod:`.cleanup` drops running headers, footers and page numbers -> the line
labeller (:mod:`.labeller`, over the features of :mod:`.features`) says which lines start a
paragraph or a provision, with a label, a heading, and at what level -> :mod:`.assemble`
joins the lines into :class:`core.model.Block` objects (hyphenation undone) for
:mod:`core.structure`.

Where the labeller comes from (:mod:`.store`): the shipped default (``resources/
layout_model.npz``, trained by ``scripts/train_layout_model.py`` on open licence texts), or a
precedent set's own, trained on the set's .docx and .odt agreements laid out as printed lines
(:mod:`.simulate`, answers from :mod:`.answers`).  Nothing here imports Qt or reads XML.
"""
